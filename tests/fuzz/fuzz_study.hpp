#pragma once
// A real study's results file for the fuzz targets to start from: a small invented study (a crate
// released over open sea at invented coordinates) run once, in process, into a scratch folder.
#include <stdlib.h>

#include <cstdio>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "app/commands.hpp"

namespace strewn::fuzz {

/// Runs the strewn command line in process; returns its status (output kept in `out`).
inline int command(std::vector<std::string> args, std::string* out = nullptr) {
  args.insert(args.begin(), "strewn");
  std::vector<const char*> argv;
  for (const auto& a : args) argv.push_back(a.c_str());
  std::ostringstream o, e;
  const int status = run_command_line(static_cast<int>(argv.size()), argv.data(), o, e);
  if (out) *out = o.str();
  return status;
}

/// A scratch folder for the whole fuzzing session (made once, in $TMPDIR or /tmp).
inline const std::string& scratch() {
  static const std::string folder = [] {
    std::string pattern = "/tmp/strewn-fuzz-XXXXXX";
    if (!mkdtemp(pattern.data())) std::abort();
    return pattern;
  }();
  return folder;
}

/// The path of the results file of the small study, run on first use.
inline const std::string& study_file() {
  static const std::string path = [] {
    const std::string scenario = scratch() + "/study.toml";
    std::ofstream(scenario) << R"(title = "fuzz seed study"
[site]
ground = 0.0
latitude = -31.5
longitude = 171.25
[release]
altitude = 600.0
speed = 25.0
track = 60.0
[[body]]
name = "crate"
mass = { dist = "uniform", min = 9.0, max = 11.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.2 }
area = 0.2
[[body]]
name = "panel"
mass = 2.0
[body.drag]
model = "area"
cd = 1.1
area = 0.4
[output]
samples = true
)";
    const std::string results = scratch() + "/study.h5";
    if (command({"run", scenario, "-n", "300", "-o", results, "--quiet"}) != 0) std::abort();
    return results;
  }();
  return path;
}

}  // namespace strewn::fuzz
