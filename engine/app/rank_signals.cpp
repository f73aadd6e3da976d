#include "app/rank_signals.hpp"

#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <charconv>
#include <cstring>
#include <string_view>

#include "app/commands.hpp"
#include "store/output_file.hpp"

namespace strewn {
namespace {

std::atomic<int> this_rank{0};
static_assert(std::atomic<int>::is_always_lock_free);

std::string_view signal_name(int signal_number) {
  switch (signal_number) {
    case SIGINT:
      return "SIGINT";
    case SIGTERM:
      return "SIGTERM";
    case SIGHUP:
      return "SIGHUP";
    case SIGUSR1:
      return "SIGUSR1";
    case SIGUSR2:
      return "SIGUSR2";
    case SIGALRM:
      return "SIGALRM";
    default:
      return "a signal";
  }
}

// Appends to a fixed buffer: the handler may not allocate (signal-safety(7)); std::to_chars and
// memcpy touch only the memory given.
struct Line {
  char text[256] = {};
  std::size_t size = 0;
  void add(std::string_view part) {
    const std::size_t n = std::min(part.size(), sizeof text - size);
    std::memcpy(text + size, part.data(), n);
    size += n;
  }
  void add(long number) {
    const auto [end, error] = std::to_chars(text + size, text + sizeof text, number);
    if (error == std::errc()) size = static_cast<std::size_t>(end - text);
  }
};

extern "C" void end_rank(int signal_number, siginfo_t* info, void*) {
  remove_files_held_for_signals();
  Line line;
  if (const int rank = this_rank.load(); rank >= 0) {
    line.add("\nstrewn: rank ");
    line.add(static_cast<long>(rank));
    line.add(" ended by ");
  } else {
    line.add("\nstrewn: ended by ");
  }
  line.add(signal_name(signal_number));
  if (info != nullptr && info->si_pid > 0) {
    line.add(" from process ");
    line.add(static_cast<long>(info->si_pid));
  }
  line.add("; the files it was writing removed\n");
  [[maybe_unused]] const ssize_t ignored = ::write(STDERR_FILENO, line.text, line.size);
  ::_exit(kExitInterrupted);
}

}  // namespace

EndRankOnSignals::EndRankOnSignals(int rank) {
  this_rank = rank;
  struct sigaction action {};
  action.sa_sigaction = end_rank;
  action.sa_flags = SA_SIGINFO;
  sigemptyset(&action.sa_mask);
  // One handler at a time: a second signal waits until the first has ended the process.
  for (int signal_number : kSignals) sigaddset(&action.sa_mask, signal_number);
  for (std::size_t k = 0; k < kSignals.size(); ++k) sigaction(kSignals[k], &action, &old_[k]);
}

EndRankOnSignals::~EndRankOnSignals() {
  for (std::size_t k = 0; k < kSignals.size(); ++k) sigaction(kSignals[k], &old_[k], nullptr);
}

}  // namespace strewn
