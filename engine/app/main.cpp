#include <cerrno>
#include <csignal>
#include <cstdlib>
#include <cstring>
#include <iostream>
#include <optional>

#include "app/commands.hpp"
#include "app/printable_output.hpp"
#include "app/rank_signals.hpp"
#include "cluster/job.hpp"
#include "store/results_file.hpp"

namespace {
int finish(int status) {
  if (!strewn::hdf5_left_unclean()) return status;
  // The HDF5 library would fail in its exit-time clean-up of a file whose close failed (the disk
  // was full); every file of ours is already removed or in place, so end without it.
  std::cout.flush();
  std::cerr.flush();
  std::_Exit(status);
}
}  // namespace

int main(int argc, char** argv) {
  // A file-size limit (ulimit -f) must fail a write, not kill the process: the error is reported
  // and nothing is left under the final name.
  std::signal(SIGXFSZ, SIG_IGN);
  // Likewise a reader that goes away (`strewn run ... --json | head`): the write fails, the run
  // ends with status 3 and its files in order, instead of being killed with its lock left.
  std::signal(SIGPIPE, SIG_IGN);
  int status = 0;
  // A rank of several that is signalled ends at once, without litter (app/rank_signals.hpp); the
  // handlers outlive the job, whose end (MPI_Finalize) waits for the other ranks.
  std::optional<strewn::EndRankOnSignals> end_on_signals;
  {
    const strewn::Job job(argc, argv);  // MPI, when built with it
    if (job.size() > 1) end_on_signals.emplace(job.rank());
    // Everything written to the terminal is made inert (app/printable_output.hpp).
    strewn::PrintableOutput out_text(std::cout.rdbuf()), err_text(std::cerr.rdbuf());
    std::ostream out(&out_text), err(&err_text);
    status = strewn::run_command_line(argc, argv, out, err, job);
    // What could not be written to standard output (a full disk behind `> summary.json`) is a
    // failure of the run, not a success: status 3, as for any file that cannot be written.
    errno = 0;
    out.flush();
    if (out_text.failed() || !out) {
      const int error = out_text.error() != 0 ? out_text.error() : errno;
      err << "strewn: writing to standard output failed"
          << (error != 0 ? std::string(": ") + std::strerror(error) : std::string()) << '\n';
      if (status == 0) status = 3;
    }
    err.flush();
  }
  return finish(status);
}
