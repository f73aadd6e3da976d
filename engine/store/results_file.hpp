#pragma once
// The HDF5 results file of a study (layout in docs/results.md), through the HDF5 C++ API, whose
// objects close themselves (RAII).
//
// Root attributes: format_version, engine_version, created, seed, samples, completed, failed,
// scenario_sha256, threads, rounds. /scenario: the scenario text exactly as read.
// /samples/<column>: one 1-D dataset per column (chunked, shuffled and deflated), with the
// attribute body_names. /footprint: the statistics of the study (store/footprint_file.hpp).
//
// The file is written under a temporary name beside the final one and renamed when complete, so
// a file under the final name is always whole.
#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "pipeline/study_pipeline.hpp"
#include "pipeline/study_record.hpp"
#include "scenario/scenario.hpp"
#include "store/checkpoint.hpp"
#include "store/output_file.hpp"
#include "study/study.hpp"

namespace strewn {

// 2: /footprint; 3: the model-range columns and warnings, the choice columns, "all" as one release;
// 4: sealed with the SHA-256 of its bytes in the user block (store/file_seal.hpp)
inline constexpr int kResultsFormatVersion = 5;

/// Writes a results file as a study runs: rows are appended round by round (a RowSink, fed on
/// the study's writer thread), then finish() adds the counts, closes the file and renames it into
/// place. A writer destroyed unfinished removes its temporary file. Errors are IoError naming the
/// path; no file is ever left under the final name by a failed write.
class ResultsWriter : public RowSink {
 public:
  ResultsWriter(const std::string& path, const Scenario& scenario,
                const std::vector<std::string>& input_names, std::size_t choices, std::size_t rows,
                bool keep_samples);
  ~ResultsWriter() override;
  ResultsWriter(const ResultsWriter&) = delete;
  ResultsWriter& operator=(const ResultsWriter&) = delete;

  void write(const StudyColumns& columns, std::size_t first, std::size_t end) override;
  /// Writes the counts and the footprint, closes the file and renames it into place.
  void finish(const StudyRecord& record);

 private:
  struct Open;
  std::unique_ptr<Open> open_;
  std::string path_, temporary_;
  std::unique_ptr<RemovedOnSignal> removed_on_signal_;  // the temporary file
};

/// Writes a finished study's results file in one go (see ResultsWriter).
void write_results(const std::string& path, const Scenario& scenario, const StudyResult& result,
                   const StudyRecord& record, bool keep_samples = true);

/// A study's store (pipeline/study_pipeline.hpp): its results file (ResultsWriter) and, with
/// control.checkpoint or control.resume, its checkpoint `<path>.checkpoint` (store/checkpoint.hpp),
/// read back first on resume. Made before the first flight, so that a file that cannot be
/// written stops the run before it starts.
class ResultsStore final : public StudyStore {
 public:
  ResultsStore(const std::string& path, const SampleModel& model, std::uint64_t samples,
               bool keep_samples, const RunControl& control);
  void write(const StudyColumns& columns, std::size_t first, std::size_t end) override;
  void keep(const StudyColumns& columns, std::size_t first, std::size_t end,
            std::size_t study_row) override;
  std::vector<KeptRows> take_kept() override;
  void finish(const StudyRecord& record) override;

 private:
  ResultsWriter writer_;
  std::optional<Checkpoint> checkpoint_;
};

/// A study on this process's threads written to its results file: run_pipeline with a
/// ResultsStore and LocalFlights. Each finished round of samples is compressed and written while
/// the next one computes; the footprint follows. With a RunControl: a stopped run returns with
/// result.interrupted set, no file under the final name, and its finished rows kept in the
/// checkpoint; a resumed run flies only what the checkpoint lacks.
StudyRun run_and_write(const SampleModel& model, const World& world, StudyOptions options,
                       const std::string& path, int threads, bool keep_samples = true,
                       const RunControl& control = {});

/// A results file read back: the record (root attributes and /footprint) and, when asked and
/// kept, the per-sample columns.
struct ResultsFile {
  int format_version = 0;
  std::vector<std::string> body_names;
  StudyRecord record;
  bool has_samples = false;
  StudyColumns columns;
};

/// Reads a results file, or with `sweep_case` one case of a sweep's file (its /cases/<index>).
/// Throws InputFileError for a missing, truncated or foreign file, another format version, a
/// sweep's file read without a case, or a case the sweep does not hold.
ResultsFile read_results(const std::string& path, bool with_samples = true,
                         std::optional<std::uint64_t> sweep_case = std::nullopt);

/// The footprint as bytes (an in-memory HDF5 image of /footprint, through the same code as the
/// results file), to pass between processes, and back.
std::vector<std::byte> footprint_image(const StudyRecord& record);
Footprint footprint_from_image(std::span<const std::byte> image);

/// True after an HDF5 file failed to close (a full disk): the library then cannot shut down
/// cleanly, so the program should end without its exit-time clean-up (app/main.cpp).
bool hdf5_left_unclean();

/// SHA-256 of a text, as 64 hexadecimal digits (OpenSSL).
std::string sha256_hex(const std::string& text);
/// The SHA-256 of a scenario's text and of every file it reads (tables, soundings, ensemble
/// members), as they are on disk now: what a checkpoint belongs to, so that a resume after any of
/// them changed is refused.
std::string inputs_sha256(const Scenario& scenario);
/// The same of any input: its `text` and the files it reads after the first (files_read[0] is the
/// file `text` was read from), as a sweep file and what it reads.
std::string inputs_sha256(const std::string& text, const std::vector<std::string>& files_read);

}  // namespace strewn
