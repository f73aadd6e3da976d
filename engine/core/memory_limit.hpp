#pragma once
// How much memory this process may use: the least of the machine's memory, the process's
// resource limits (ulimit -v, ulimit -d) and its control group's memory limit (cgroup v2
// memory.max, or v1 memory.limit_in_bytes), so that a study is sized against the limit that will
// actually stop it.
#include <cstdint>
#include <string>

namespace strewn {

struct MemoryLimit {
  double bytes = 0.0;  ///< 0 when nothing could be learnt
  std::string what;    ///< which limit it is, in words ("this machine's memory", ...)
};

/// The tightest of the limits this process runs under.
MemoryLimit memory_limit();

/// The limit of the control group whose memory files are at `cgroup_v2_file` (memory.max: a
/// number, or "max") or `cgroup_v1_file` (memory.limit_in_bytes); 0 when neither sets one. Split
/// out so that tests can give files of their own.
double cgroup_memory_limit(const std::string& cgroup_v2_file, const std::string& cgroup_v1_file);

}  // namespace strewn
