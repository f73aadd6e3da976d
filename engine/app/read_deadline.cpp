#include "app/read_deadline.hpp"

#include <pthread.h>
#include <sys/mman.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <new>
#include <system_error>

#include "app/commands.hpp"
#include "core/text.hpp"

namespace strewn {

namespace {

// True when a thread's stack, of the size new threads get, cannot be mapped now: pthread_create
// fails with EAGAIN both for that and for a limit on the number of threads (pthread_create(3)),
// and only the first is memory running out.
bool no_room_for_a_stack() {
  std::size_t bytes = 8u << 20;  // glibc's default, from ulimit -s (pthread_create(3))
  pthread_attr_t defaults;
  if (pthread_getattr_default_np(&defaults) == 0) {
    pthread_attr_getstacksize(&defaults, &bytes);
    pthread_attr_destroy(&defaults);
  }
  void* stack = ::mmap(nullptr, bytes, PROT_NONE, MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
  if (stack == MAP_FAILED) return true;
  ::munmap(stack, bytes);
  return false;
}

}  // namespace

ReadDeadline::ReadDeadline(std::string path, double limit_seconds) : path_(std::move(path)) {
  try {
    start(limit_seconds);
  } catch (const std::system_error& e) {
    // Under an address-space limit (ulimit -v) the watch's stack is the first thing a report
    // cannot map: that is memory running out, said as such (status 3, "ran out of memory").
    if (e.code() == std::errc::resource_unavailable_try_again && no_room_for_a_stack())
      throw std::bad_alloc();
    throw;
  }
}

void ReadDeadline::start(double limit_seconds) {
  watch_ = std::thread([this, limit_seconds] {
    std::unique_lock<std::mutex> lock(mutex_);
    if (done_changed_.wait_for(lock, std::chrono::duration<double>(limit_seconds),
                               [this] { return done_; }))
      return;
    // Written straight to the descriptor and ended with _exit: the reading thread is stuck
    // inside the HDF5 library, whose state (and its lock) cannot be trusted any more.
    const std::string message =
        "error: " + printable(path_) +
        ": reading the results file did not end in time; it is damaged or crafted (refused)\n";
    (void)!::write(STDERR_FILENO, message.data(), message.size());
    ::_exit(kExitInvalid);
  });
}

ReadDeadline::~ReadDeadline() {
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    done_ = true;
  }
  done_changed_.notify_one();
  watch_.join();
}

double ReadDeadline::limit_for(std::uintmax_t bytes) {
  // At most a day: a longer wait would overflow the clock's time point and end at once.
  return std::min(10.0 + static_cast<double>(bytes) / (16.0 * 1024 * 1024), 86400.0);
}

}  // namespace strewn
