#pragma once
// The HDF5 results file of a study (layout in docs/results.md), through the HDF5 C++ API, whose
// objects close themselves (RAII).
//
// Root attributes: format_version, engine_version, created, seed, samples, completed, failed,
// scenario_sha256, threads. /scenario: the scenario text exactly as read. /samples/<column>:
// one 1-D dataset per column (chunked, shuffled and deflated), with the attribute body_names.
//
// The file is written under a temporary name beside the final one and renamed when complete, so
// a file under the final name is always whole.
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "scenario/scenario.hpp"
#include "study/study.hpp"

namespace strewn {

inline constexpr int kResultsFormatVersion = 1;

struct RunProvenance {
  std::uint64_t seed = 0;
  int threads = 1;
};

/// Writes a results file as a study runs: rows are appended round by round (a RowSink, fed on
/// the study's writer thread), then finish() adds the counts, closes the file and renames it into
/// place. A writer destroyed unfinished removes its temporary file. Errors are IoError naming the
/// path; no file is ever left under the final name by a failed write.
class ResultsWriter : public RowSink {
 public:
  ResultsWriter(const std::string& path, const Scenario& scenario,
                const std::vector<std::string>& input_names, std::size_t rows, bool keep_samples);
  ~ResultsWriter() override;
  ResultsWriter(const ResultsWriter&) = delete;
  ResultsWriter& operator=(const ResultsWriter&) = delete;

  void write(const StudyColumns& columns, std::size_t first, std::size_t end) override;
  void finish(const StudyResult& result, const RunProvenance& provenance);

 private:
  struct Open;
  std::unique_ptr<Open> open_;
  std::string path_, temporary_;
};

/// Writes a finished study's results file in one go (see ResultsWriter).
void write_results(const std::string& path, const Scenario& scenario, const StudyResult& result,
                   const RunProvenance& provenance, bool keep_samples = true);

/// Runs the study and writes its results file as it goes: each finished round of samples is
/// compressed and written while the next one computes.
StudyResult run_and_write(const SampleModel& model, StudyOptions options, const std::string& path,
                          const RunProvenance& provenance, bool keep_samples = true);

/// A results file read back (the per-sample columns and the root attributes).
struct ResultsFile {
  int format_version = 0;
  std::string engine_version, created, scenario_sha256, scenario_text;
  std::uint64_t seed = 0, samples = 0, completed = 0, failed = 0;
  std::vector<std::string> body_names;
  StudyColumns columns;
};

/// Reads a results file. Throws IoError for a missing, truncated or foreign file, or another
/// format version.
ResultsFile read_results(const std::string& path);

/// SHA-256 of a text, as 64 hexadecimal digits (OpenSSL).
std::string sha256_hex(const std::string& text);

}  // namespace strewn
