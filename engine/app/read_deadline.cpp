#include "app/read_deadline.hpp"

#include <unistd.h>

#include <algorithm>
#include <chrono>

#include "app/commands.hpp"
#include "core/text.hpp"

namespace strewn {

ReadDeadline::ReadDeadline(std::string path, double limit_seconds) : path_(std::move(path)) {
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
