// Resources: the memory a study may use is the tightest of the machine's memory, the process's
// limits and its control group's; an allocation that fails anyway ends the command with status 3
// and a message saying memory ran out, never a crash.
#include <gtest/gtest.h>

#include <H5Cpp.h>
#include <pthread.h>
#include <sys/resource.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "app/read_deadline.hpp"
#include "command_line.hpp"
#include "core/memory_limit.hpp"
#include "store/file_seal.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::run;

// AddressSanitizer maps terabytes of shadow memory: no address-space limit can be set under it.
#if defined(__SANITIZE_ADDRESS__)
#define STREWN_UNDER_ASAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define STREWN_UNDER_ASAN 1
#endif
#endif

TEST(Resources, ControlGroupLimitsAreReadAsTheKernelWritesThem) {
  const test::ScratchFolder dir("resources-test");
  const auto v2 = (dir / "memory.max").string(), v1 = (dir / "limit_in_bytes").string();
  // Linux, Documentation/admin-guide/cgroup-v2.rst ("memory.max": a byte count, or "max").
  std::ofstream(v2) << "max\n";
  std::ofstream(v1) << "9223372036854771712\n";  // v1's "no limit" (from memory)
  EXPECT_EQ(cgroup_memory_limit(v2, v1), 0.0);
  std::ofstream(v2, std::ios::trunc) << "536870912\n";
  EXPECT_EQ(cgroup_memory_limit(v2, v1), 536870912.0);
  EXPECT_EQ(cgroup_memory_limit((dir / "missing").string(), v1), 0.0);
  std::ofstream(v1, std::ios::trunc) << "1073741824\n";
  EXPECT_EQ(cgroup_memory_limit((dir / "missing").string(), v1), 1073741824.0);
}

// The time limit on reading a results file grows with its size and never overflows the clock
// (a size of 2^64 - 1, what a failed size query returns, once made it end at once).
TEST(Resources, TheReadTimeLimitIsBounded) {
  EXPECT_EQ(ReadDeadline::limit_for(0), 10.0);
  EXPECT_EQ(ReadDeadline::limit_for(std::uintmax_t{16} << 20), 11.0);
  EXPECT_EQ(ReadDeadline::limit_for(static_cast<std::uintmax_t>(-1)), 86400.0);
  const auto missing = run({"report", "/nonexistent/strewn-missing.h5", "--json"});
  EXPECT_EQ(missing.status, 2);
  EXPECT_NE(missing.err.find("no such results file"), std::string::npos) << missing.err;
}

TEST(Resources, AnAddressSpaceLimitIsTheLimit) {
#ifdef STREWN_UNDER_ASAN
  GTEST_SKIP() << "no address-space limit under AddressSanitizer";
#else
  rlimit saved{};
  ASSERT_EQ(getrlimit(RLIMIT_AS, &saved), 0);
  const MemoryLimit before = memory_limit();
  ASSERT_GT(before.bytes, 0.0);
  rlimit tighter = saved;
  tighter.rlim_cur = static_cast<rlim_t>(before.bytes / 2);
  if (saved.rlim_max != RLIM_INFINITY && tighter.rlim_cur > saved.rlim_max)
    tighter.rlim_cur = saved.rlim_max;
  ASSERT_EQ(setrlimit(RLIMIT_AS, &tighter), 0);
  const MemoryLimit limited = memory_limit();
  ASSERT_EQ(setrlimit(RLIMIT_AS, &saved), 0);
  EXPECT_EQ(limited.bytes, static_cast<double>(tighter.rlim_cur));
  EXPECT_NE(limited.what.find("ulimit -v"), std::string::npos) << limited.what;
#endif
}

#ifndef STREWN_UNDER_ASAN
// The size a process maps now (VmSize of /proc/self/status, proc(5)), in bytes.
double mapped_bytes() {
  std::ifstream in("/proc/self/status");
  std::string key;
  double kib = 0.0;
  while (in >> key)
    if (key == "VmSize:") {
      in >> kib;
      break;
    }
  return kib * 1024.0;
}

// The status of a small study (200 samples) written to `file`.
int small_study(const std::string& file) {
  return run({"run", STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml", "-n", "200", "-o", file,
              "--quiet"})
      .status;
}

// `report file --json` with an address-space limit that leaves `room` bytes beyond what the
// process maps now; the limit is restored after.
test::CommandResult report_with_room(const std::string& file, double room) {
  rlimit saved{};
  EXPECT_EQ(getrlimit(RLIMIT_AS, &saved), 0);
  rlimit tighter = saved;
  tighter.rlim_cur = static_cast<rlim_t>(mapped_bytes() + room);
  EXPECT_EQ(setrlimit(RLIMIT_AS, &tighter), 0);
  auto result = run({"report", file, "--json"});
  EXPECT_EQ(setrlimit(RLIMIT_AS, &saved), 0);
  return result;
}
#endif

TEST(Resources, AnAllocationThatFailsIsStatusThree) {
#ifdef STREWN_UNDER_ASAN
  GTEST_SKIP() << "no address-space limit under AddressSanitizer";
#else
  const test::ScratchFolder dir("resources-test");
  const auto file = (dir / "study.h5").string();
  ASSERT_EQ(small_study(file), 0);
  // A results file (sealed again) whose figure declares 1000 times the file's size in values:
  // within what the file's size allows for deflated data, but four times what the limit set below
  // leaves free.
  const double declared = 1000.0 * static_cast<double>(std::filesystem::file_size(file));
  {
    H5::H5File crafted(file, H5F_ACC_RDWR);
    crafted.unlink("footprint/all/containment/level");
    const hsize_t rows = static_cast<hsize_t>(declared / 8.0), chunk = 1 << 16;
    H5::DSetCreatPropList properties;
    properties.setChunk(1, &chunk);
    properties.setDeflate(1);
    crafted.createDataSet("footprint/all/containment/level", H5::PredType::NATIVE_DOUBLE,
                          H5::DataSpace(1, &rows), properties);
  }
  seal_file(file);
  const auto result = report_with_room(file, declared / 4.0);
  EXPECT_EQ(result.status, 3) << result.err;
  EXPECT_NE(result.err.find("ran out of memory"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("ulimit -v"), std::string::npos) << result.err;
  EXPECT_TRUE(result.out.empty());
#endif
}

// Found by a tester: `report` under an address-space limit too tight for a thread's stack (the
// thread that times the reading of the results file) ended with status 3 but said "Resource
// temporarily unavailable", pthread_create's EAGAIN, instead of that memory ran out.
TEST(Resources, AThreadWithoutRoomForItsStackIsMemoryRunningOut) {
#ifdef STREWN_UNDER_ASAN
  GTEST_SKIP() << "no address-space limit under AddressSanitizer";
#else
  // glibc keeps the stacks of ended threads for new ones (nptl's stack cache), already mapped:
  // after another test's threads the report's thread needs no new room. ctest runs each test in
  // a process of its own. (This test counts itself among the successful ones while it runs.)
  const auto* tests = ::testing::UnitTest::GetInstance();
  if (tests->successful_test_count() + tests->failed_test_count() + tests->skipped_test_count() > 1)
    GTEST_SKIP() << "needs a process of its own (run it alone, as ctest does)";
  // The stack a new thread maps: glibc's default, from ulimit -s (pthread_create(3)).
  pthread_attr_t defaults;
  ASSERT_EQ(pthread_getattr_default_np(&defaults), 0);
  std::size_t stack = 0;
  ASSERT_EQ(pthread_attr_getstacksize(&defaults, &stack), 0);
  pthread_attr_destroy(&defaults);
  if (stack < (std::size_t{4} << 20)) GTEST_SKIP() << "thread stacks of " << stack << " bytes";
  const test::ScratchFolder dir("resources-test");
  const auto file = (dir / "study.h5").string();
  ASSERT_EQ(small_study(file), 0);
  // Room for the command's own allocations (a few hundred kilobytes), not for a thread's stack.
  const auto result = report_with_room(file, static_cast<double>(stack) / 2.0);
  EXPECT_EQ(result.status, 3) << result.err;
  EXPECT_NE(result.err.find("ran out of memory"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("ulimit -v"), std::string::npos) << result.err;
#endif
}

}  // namespace
}  // namespace strewn
