#pragma once
// The checkpoint of a study: the rows finished so far, appended beside the output
// (`<output>.checkpoint`) round by round as the study runs, each record flushed to disk
// (fdatasync) and guarded by a CRC-32, so that after any interruption, even SIGKILL or a power
// cut, `run --resume` finds every record that was complete and flies only the rest. Rows depend
// only on their sample index, so the resumed study's file equals an uninterrupted one's.
//
// The rows need not be in order: a study stopped by a signal keeps every sample it finished,
// and those beyond the rounds written in order are whole samples scattered over the blocks that
// were flying. Each record says where its rows start.
//
// Layout: a text header (format 3, the SHA-256 of the scenario and every file it reads, seed,
// samples, bodies, named columns), then records: magic, first row, row count, payload size, payload
// (the rows, column by column), CRC-32 of the payload. A record torn by a crash fails its size or
// CRC check and is cut off with all after it.
#include <cstdint>
#include <cstdio>
#include <string>
#include <vector>

#include "pipeline/study_pipeline.hpp"

namespace strewn {

class Checkpoint {
 public:
  /// What the checkpoint belongs to; a checkpoint of another study is refused on resume.
  struct Identity {
    std::string scenario_sha256;  ///< of the scenario and its files (inputs_sha256)
    std::uint64_t seed = 0, samples = 0;
    std::size_t bodies = 0, inputs = 0;
  };

  /// Starts `path` afresh, or with `resume` reads back the complete records it holds (none when
  /// it does not exist). Throws UsageError when it belongs to another study, IoError when it
  /// cannot be written.
  Checkpoint(std::string path, Identity identity, const std::vector<std::string>& input_names,
             std::size_t choices, bool resume);
  ~Checkpoint();
  Checkpoint(const Checkpoint&) = delete;
  Checkpoint& operator=(const Checkpoint&) = delete;

  /// The rows read back on resume, as runs of consecutive samples in index order that do not
  /// overlap; handed over once.
  std::vector<KeptRows> take_pieces();
  /// Appends rows [first, end) of the columns as one record, on disk before it returns; row
  /// `first` is the study's row `first + offset_rows`.
  void append(const StudyColumns& columns, std::size_t first, std::size_t end,
              std::size_t offset_rows = 0);
  /// Removes the checkpoint (the study's file is in place).
  void remove();
  [[nodiscard]] const std::string& path() const { return path_; }

 private:
  std::string path_;
  std::FILE* file_ = nullptr;
  std::vector<KeptRows> pieces_;
  std::size_t bodies_ = 1;
};

}  // namespace strewn
