// strewn: the command-line entry point. All the work is in app/commands.cpp.
#include <iostream>

#include "app/commands.hpp"

int main(int argc, char** argv) {
  return strewn::run_command_line(argc, argv, std::cout, std::cerr);
}
