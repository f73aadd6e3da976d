#include "core/memory_limit.hpp"

#include <sys/resource.h>
#include <unistd.h>

#include <fstream>
#include <sstream>

namespace strewn {

namespace {

// The first word of a file, or "" when it cannot be read.
std::string first_word(const std::string& path) {
  std::ifstream in(path);
  std::string word;
  in >> word;
  return word;
}

double number_or_zero(const std::string& word) {
  if (word.empty() || word == "max") return 0.0;
  std::istringstream in(word);
  double value = 0.0;
  in >> value;
  return in && value > 0.0 ? value : 0.0;
}

// The folder of this process's control group in the unified (v2) hierarchy: the line "0::<path>"
// of /proc/self/cgroup (Linux, Documentation/admin-guide/cgroup-v2.rst, "Processes").
std::string own_cgroup_v2_folder() {
  std::ifstream in("/proc/self/cgroup");
  std::string line;
  while (std::getline(in, line))
    if (line.rfind("0::", 0) == 0) return "/sys/fs/cgroup" + line.substr(3);
  return "/sys/fs/cgroup";
}

void tighten(MemoryLimit& limit, double bytes, const char* what) {
  if (bytes > 0.0 && (limit.bytes <= 0.0 || bytes < limit.bytes)) limit = {bytes, what};
}

}  // namespace

double cgroup_memory_limit(const std::string& cgroup_v2_file, const std::string& cgroup_v1_file) {
  if (const double v2 = number_or_zero(first_word(cgroup_v2_file)); v2 > 0.0) return v2;
  // cgroup v1 says "no limit" with a huge number (the largest page-aligned long): not a limit.
  const double v1 = number_or_zero(first_word(cgroup_v1_file));
  return v1 > 0.0 && v1 < 1e18 ? v1 : 0.0;
}

MemoryLimit memory_limit() {
  MemoryLimit limit;
  tighten(limit,
          static_cast<double>(::sysconf(_SC_PHYS_PAGES)) *
              static_cast<double>(::sysconf(_SC_PAGE_SIZE)),
          "this machine's memory");
  for (const auto& [resource, what] :
       {std::pair{RLIMIT_AS, "the process's address-space limit (ulimit -v)"},
        std::pair{RLIMIT_DATA, "the process's data limit (ulimit -d)"}}) {
    rlimit r{};
    if (::getrlimit(resource, &r) == 0 && r.rlim_cur != RLIM_INFINITY)
      tighten(limit, static_cast<double>(r.rlim_cur), what);
  }
  tighten(limit,
          cgroup_memory_limit(own_cgroup_v2_folder() + "/memory.max",
                              "/sys/fs/cgroup/memory/memory.limit_in_bytes"),
          "the control group's memory limit (cgroup)");
  return limit;
}

}  // namespace strewn
