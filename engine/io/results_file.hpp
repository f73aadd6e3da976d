#pragma once
// The HDF5 results file of a study (layout in docs/results.md), through the HDF5 C++ API, whose
// objects close themselves (RAII).
//
// Root attributes: format_version, engine_version, created, seed, samples, completed, failed,
// scenario_sha256, threads, rounds. /scenario: the scenario text exactly as read.
// /samples/<column>: one 1-D dataset per column (chunked, shuffled and deflated), with the
// attribute body_names. /footprint: the statistics of the study (io/footprint_file.hpp).
//
// The file is written under a temporary name beside the final one and renamed when complete, so
// a file under the final name is always whole.
#include <atomic>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "io/study_record.hpp"
#include "scenario/scenario.hpp"
#include "study/study.hpp"

namespace strewn {

// 2: /footprint; 3: the model-range columns and warnings, the choice columns, "all" as one release
inline constexpr int kResultsFormatVersion = 3;

/// Refuses (UsageError, status 2) an output path that strewn must not write: a folder, an existing
/// entry that is not a regular file (a device such as /dev/null, a pipe, a link: writing a whole
/// file under the name would replace it), one of `inputs`, the files the command reads, or a path
/// or name too long to be written. The message starts with `origin` (where the path came from,
/// e.g. "file:line: output.file: ").
void refuse_unsafe_output(const std::string& path, const std::string& origin,
                          const std::vector<std::string>& inputs = {});

/// Refuses an unsafe output (refuse_unsafe_output) and a checkpoint beside it
/// (`<path>.checkpoint`) that is not a regular file (a link planted there would have the study
/// write through it), makes the folder of an output file (and its
/// parents) when it is missing (with `make`; without, as `check` does, only finds that it could
/// be made), and checks that a file can be made there by making and removing one. With `make`,
/// also removes the temporary files that killed runs on this machine left under this name (their
/// process is gone; remove_stale_partials). Throws UsageError (status 2: refused before anything
/// runs).
void prepare_output(const std::string& path, const std::string& origin, bool make,
                    const std::vector<std::string>& inputs = {});

/// What strewn adds to an output's name while it writes it: ".partial-<host>-<process id>". The
/// host name keeps two machines sharing a folder (a cluster's shared file system) from taking
/// each other's process ids for their own.
std::string partial_suffix();

/// The temporary name a results file is written under until it is complete: beside it, with
/// partial_suffix() added.
std::string temporary_path_of(const std::string& path);

/// Removes from `folder` the temporary files (partial_suffix) left by killed runs of this machine
/// whose process is gone, for the output named `output_name`, or for every output when it is
/// empty. Files of other machines, of live processes, and any a process holds locked (HDF5
/// locks a file it writes) are left alone.
void remove_stale_partials(const std::string& folder, const std::string& output_name);

/// Opens `path` for writing as a new regular file, never through a link: an entry already there
/// under the name (a leftover, or a link planted to redirect the write) is removed first, then
/// the file is made with O_EXCL | O_NOFOLLOW. Returns the descriptor, or -1 with errno set.
int create_new_file(const std::string& path);

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
};

/// Writes a finished study's results file in one go (see ResultsWriter).
void write_results(const std::string& path, const Scenario& scenario, const StudyResult& result,
                   const StudyRecord& record, bool keep_samples = true);

/// Appends the rows of a later part (or another rank's block) to a study's rows, in order.
void append_rows(StudyResult& total, StudyResult&& part);

/// The next sample count of a study grown toward `target` (relative width): widths of
/// order-statistic bounds shrink about as 1/sqrt(n), so n (w / target)^2 with a 20 % margin, at
/// least 1.5 and at most 4 times n; an undetermined bound asks for the samples it needs. Rounded
/// up to a multiple of 1024, at most max_samples.
std::uint64_t next_sample_count(std::uint64_t n, double width, double target,
                                const Footprint& footprint, std::uint64_t max_samples);

/// How a run may be stopped and taken up again.
struct RunControl {
  const std::atomic<bool>* stop = nullptr;  ///< set (by SIGINT or SIGTERM) to stop early
  bool checkpoint = false;  ///< keep `<path>.checkpoint` as the study runs (io/checkpoint.hpp)
  bool resume = false;      ///< start from the rows of an existing checkpoint
};

/// A study run to its end: every row, and its record with the footprint.
struct StudyRun {
  StudyResult result;
  StudyRecord record;
  std::uint64_t resumed = 0;  ///< samples taken from the checkpoint of an earlier, stopped run
};

/// Runs the study and writes its results file as it goes: each finished round of samples is
/// compressed and written while the next one computes; the footprint follows. With
/// study.target_width, parts of samples are added (indices continuing, so reproducibly) until
/// the widest containment bound is that tight or study.max_samples is reached.
/// With a RunControl: a stopped run returns with result.interrupted set, no file under the final
/// name, and its finished rows kept in the checkpoint; a resumed run flies only what the
/// checkpoint lacks.
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

}  // namespace strewn
