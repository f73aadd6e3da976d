#pragma once
// Helpers shared by the tests of the command line: run it in process, as the strewn binary does
// (app/commands.cpp), and read a file whole.
#include <filesystem>
#include <fstream>
#include <iterator>
#include <sstream>
#include <string>
#include <vector>

#include "app/commands.hpp"

namespace strewn::test {

struct CommandResult {
  int status;
  std::string out, err;
};

/// Runs `strewn ARGS...` in this process (a single-process job) and returns its status and output.
inline CommandResult run(std::vector<std::string> args) {
  args.insert(args.begin(), "strewn");
  std::vector<const char*> argv;
  for (const auto& a : args) argv.push_back(a.c_str());
  std::ostringstream out, err;
  const int status = run_command_line(static_cast<int>(argv.size()), argv.data(), out, err);
  return {status, out.str(), err.str()};
}

/// A file's bytes.
inline std::string slurp(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

}  // namespace strewn::test
