#pragma once
// Parameter sweeps: one base scenario, axes of values for numeric scenario keys, every case a
// complete study (docs/cluster.md, sweep file in docs/commands.md).
//
// A sweep is checked whole before any case runs: every axis names a numeric key of the scenario
// (by its key path, bodies by name, e.g. "release.altitude", "bundle.mass.mean"), every value list
// is non-empty, "zip" axes are equally long, and every case is a valid scenario. Cases are dealt
// out as workers finish: to the ranks of an MPI job by a manager thread on rank 0, and to threads
// on one machine. Each finished case is a results file of its own (written whole, then renamed)
// in a folder beside the sweep's output, so a stopped sweep resumes where it stopped; rank 0 then
// gathers them into one file. The results do not depend on who ran which case.
#include <cstddef>
#include <cstdint>
#include <exception>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "cluster/job.hpp"

namespace strewn {

struct SweepAxis {
  std::string key;
  std::vector<double> values;
  long line = 0;          ///< where its key stands in the sweep file, for messages
  bool integers = false;  ///< every value written as a TOML integer: placed as integers
};

struct SweepCase {
  std::vector<double> values;  ///< one per axis
  std::string text;            ///< the case's scenario (TOML)
};

struct SweepPlan {
  std::string path, text;  ///< the sweep file as given and as read
  std::string base_path;   ///< the base scenario, resolved against the sweep file's folder
  bool zip = false;
  std::vector<SweepAxis> axes;
  std::vector<SweepCase> cases;         ///< grid: the first axis varies slowest
  std::string output;                   ///< the sweep's results file
  long output_line = 0;                 ///< where the sweep file names it (0: it does not)
  std::uint64_t samples = 0;            ///< per case (the base scenario's, or -n)
  std::vector<std::string> files_read;  ///< the sweep file, the base scenario and its tables
};

/// Reads and checks a sweep file and every case. Throws ScenarioError with every problem (the
/// sweep file's line and key path), before anything runs.
SweepPlan load_sweep(const std::string& path, std::uint64_t samples_override = 0);

struct SweepOptions {
  int threads = 0;             ///< threads per rank (0: all)
  bool fresh = false;          ///< ignore finished cases of an earlier, stopped run
  std::string output;          ///< overrides the plan's output
  bool force = false;          ///< replace the results file and summary when they exist
  bool allow_outside = false;  ///< let the sweep file's `output` lie outside its folder
};

/// What a sweep tells as it runs; `app` prints it. Empty functions are skipped.
struct SweepEvents {
  /// On rank 0, before any case runs: `finished` of `cases` are already done in `folder` (by an
  /// earlier, stopped run) and are skipped.
  std::function<void(std::size_t finished, std::size_t cases, const std::string& folder)> resumed;
  /// On the rank that ran it: case `index` (its axis values in words: `label`) is done.
  std::function<void(std::size_t index, const std::string& label)> case_done;
  /// On a rank of a job of several whose case failed, while the other ranks may be waiting for
  /// it: says so and ends the whole job (Job::abort). Should it return, the job is ended anyway.
  std::function<void(const std::exception& error)> failed_on_rank;
};

/// Where a finished sweep's results are.
struct SweepOutcome {
  std::size_t cases = 0;
  std::string output;        ///< the sweep's results file
  std::string summary_csv;   ///< every figure of every case
  std::string summary_text;  ///< a line per case, for a terminal
};

/// Runs the sweep on every rank of the job; rank 0 writes the sweep's file and its CSV summary
/// and returns where they are, the other ranks return nothing. Errors are thrown; on a job of
/// several ranks, a case that fails calls events.failed_on_rank instead (the others would wait).
std::optional<SweepOutcome> run_sweep(const Job& job, const SweepPlan& plan,
                                      const SweepOptions& options, const SweepEvents& events = {});

}  // namespace strewn
