#include <csignal>
#include <cstdlib>
#include <iostream>

#include "app/commands.hpp"
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
  int status = 0;
  {
    const strewn::Job job(argc, argv);  // MPI, when built with it
    status = strewn::run_command_line(argc, argv, std::cout, std::cerr, job);
  }
  return finish(status);
}
