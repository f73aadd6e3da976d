#pragma once
// Signals on the ranks of a job. One process stops cleanly on a first SIGINT or SIGTERM and
// resumes from its checkpoint (commands.cpp); a rank of several cannot: the others would wait for
// its rows. So a rank that is sent SIGINT, SIGTERM or SIGHUP (by the user, by the scheduler at the
// end of its time, or by the launcher ending the job because another rank failed or died), or
// SIGUSR1, SIGUSR2 or SIGALRM (which the launcher forwards, and which a scheduler sends as a
// warning; each would end the process anyway), ends at once: it removes the temporary and lock
// files it holds (store/output_file.hpp, RemovedOnSignal), says which rank was ended by which
// signal and from which process, and exits with status 4. The launcher sees a rank end without
// finishing and ends the others the same way, so the whole job ends within seconds, leaving no
// partial file.
#include <array>
#include <csignal>

namespace strewn {

/// Installed on every rank of a job of several processes until after MPI_Finalize (a rank that
/// has done its part still waits there for the others), and for a sweep on one process (`rank`
/// -1: the message names no rank; its finished cases are kept for the next run); restores the
/// previous handlers after.
class EndRankOnSignals {
 public:
  explicit EndRankOnSignals(int rank);
  ~EndRankOnSignals();
  EndRankOnSignals(const EndRankOnSignals&) = delete;
  EndRankOnSignals& operator=(const EndRankOnSignals&) = delete;

 private:
  static constexpr std::array<int, 6> kSignals{SIGINT, SIGTERM, SIGHUP, SIGUSR1, SIGUSR2, SIGALRM};
  std::array<struct sigaction, kSignals.size()> old_{};
};

}  // namespace strewn
