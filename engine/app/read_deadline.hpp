#pragma once
// A time limit on reading a results file. The seal refuses every damaged file before the HDF5
// library parses it, but a crafted file sealed again by its author reaches the library, and
// fuzzing found files on which HDF5 1.10's global-heap reader loops for ever. A report must end:
// when the reading takes longer than its limit, the process says so and ends with status 2.
#include <condition_variable>
#include <cstdint>
#include <mutex>
#include <string>
#include <thread>

namespace strewn {

/// Held while a results file is read: when it is not destroyed within `limit_seconds`, writes
/// "<path>: ..." to standard error and ends the process at once with status 2 (refused: the file
/// is damaged or crafted). Nothing has been written by then; the outputs are written after the
/// reading. Throws std::bad_alloc when the watch's thread cannot be started for want of memory
/// for its stack, std::system_error when it cannot for another reason.
class ReadDeadline {
 public:
  ReadDeadline(std::string path, double limit_seconds);
  ~ReadDeadline();
  ReadDeadline(const ReadDeadline&) = delete;
  ReadDeadline& operator=(const ReadDeadline&) = delete;

  /// The limit for a file of `bytes`: 10 s, and 1 s more per 16 MiB (a healthy file is read at
  /// well over 100 MiB/s).
  static double limit_for(std::uintmax_t bytes);

 private:
  /// Starts the watch; std::thread's std::system_error when it cannot.
  void start(double limit_seconds);

  std::string path_;
  std::mutex mutex_;
  std::condition_variable done_changed_;
  bool done_ = false;
  std::thread watch_;
};

}  // namespace strewn
