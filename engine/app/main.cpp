#include <iostream>

#include "app/commands.hpp"
#include "cluster/job.hpp"

int main(int argc, char** argv) {
  const strewn::Job job(argc, argv);  // MPI, when built with it
  return strewn::run_command_line(argc, argv, std::cout, std::cerr, job);
}
