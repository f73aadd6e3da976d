#pragma once
// The results file of a sweep (docs/results.md): /sweep (the sweep file as read), /cases/<index>/
// laid out like a study's file (scenario, samples, footprint; its provenance and axis values as
// attributes) and /summary (one row per case: the axis values, the containment radius and its
// upper bound at each level per body and for all, and each rule's status), also returned as CSV.
#include <string>
#include <vector>

namespace strewn {

/// A finished case: its study's results file and its axis values.
struct SweepCaseSource {
  std::string file;
  std::vector<double> values;
};

/// The summary of a sweep: as CSV (every column), and as text for a terminal (a line a case).
struct SweepSummary {
  std::string csv, text;
};

/// Gathers the cases, in order, into `path` (written whole, then renamed). Returns the summary.
/// Throws IoError naming the path.
SweepSummary write_sweep_file(const std::string& path, const std::string& sweep_text,
                              const std::vector<std::string>& axis_keys, bool zip,
                              const std::vector<SweepCaseSource>& cases, int ranks);

}  // namespace strewn
