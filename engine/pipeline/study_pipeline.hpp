#pragma once
// The lifecycle of a study, written once: samples flown in parts (or taken back from what a
// stopped run kept), the footprint statistics after each part, growth toward study.target_width,
// a stop on a signal that keeps every finished sample, and the record of the finished study.
//
// What varies is given to it as strategies: how the rows of a part are flown and gathered and
// the statistics computed (SampleFlights: this process's threads, or the ranks of an MPI job,
// cluster/rank_flights.hpp), and where rows and the record go (StudyStore: the results file and
// its checkpoint, store/results_file.hpp). A sweep runs one pipeline per case.
//
// Library code: errors are thrown (core/errors.hpp), never printed; `app` prints them and chooses
// the exit status.
#include <atomic>
#include <cstddef>
#include <cstdint>
#include <vector>

#include "footprint/footprint.hpp"
#include "pipeline/study_record.hpp"
#include "scenario/world.hpp"
#include "study/study.hpp"

namespace strewn {

/// Rows an earlier, stopped run of a study kept: consecutive samples from `first_sample` on.
struct KeptRows {
  std::uint64_t first_sample = 0;
  StudyResult rows;
};

/// Where a study's rows and its record go. The pipeline says which rows are final and which are
/// only worth keeping against an interruption; the store says how (store/results_file.hpp).
class StudyStore {
 public:
  virtual ~StudyStore() = default;
  /// Rows [first, end) of `columns` are final, the next rows of the study in sample order.
  virtual void write(const StudyColumns& columns, std::size_t first, std::size_t end) = 0;
  /// Rows [first, end) of `columns`, the study's rows from `study_row` on, kept so that a stopped
  /// run can be taken up again (not called for rows that came from take_kept()).
  virtual void keep(const StudyColumns& /*columns*/, std::size_t /*first*/, std::size_t /*end*/,
                    std::size_t /*study_row*/) {}
  /// What an earlier, stopped run kept: runs of consecutive samples in index order that do not
  /// overlap. Handed over once, before the first flight.
  virtual std::vector<KeptRows> take_kept() { return {}; }
  /// The finished study's record: stored, the result put in place, what was kept let go.
  virtual void finish(const StudyRecord& record) = 0;
};

/// How the samples of a part are flown and gathered, and the statistics computed.
class SampleFlights {
 public:
  virtual ~SampleFlights() = default;
  /// Flies samples [part.first_sample, part.first_sample + part.samples). Every row that is final
  /// on the gathering process goes to part.sink (when set), in order. Returns the rows this
  /// process holds for the statistics: all of the part's where statistics are computed, possibly
  /// none elsewhere. A stopped part returns with `interrupted` set.
  virtual StudyResult fly(const SampleModel& model, const StudyOptions& part) = 0;
  /// The footprint of the study's rows so far, on the gathering process (elsewhere, whatever this
  /// process contributes to it, and an empty footprint).
  virtual Footprint statistics(const StudyColumns& rows, const FootprintSettings& settings);
  /// The gathering process's `value`, on every process.
  [[nodiscard]] virtual std::uint64_t agree(std::uint64_t value) const { return value; }
  /// True on the process that gathers the rows, stores them and decides.
  [[nodiscard]] virtual bool gathers() const { return true; }
  /// The processes that fly (MPI ranks), for the record.
  [[nodiscard]] virtual int processes() const { return 1; }
};

/// The samples flown on this process's threads (study/study.hpp; limit the threads with
/// tbb::global_control).
class LocalFlights final : public SampleFlights {
 public:
  StudyResult fly(const SampleModel& model, const StudyOptions& part) override;
};

/// How a run may be stopped and taken up again.
struct RunControl {
  const std::atomic<bool>* stop = nullptr;  ///< set (by SIGINT or SIGTERM) to stop early
  bool checkpoint = false;  ///< keep `<path>.checkpoint` as the study runs (store/checkpoint.hpp)
  bool resume = false;      ///< start from the rows of an existing checkpoint
};

/// A study run to its end: every row, and its record with the footprint.
struct StudyRun {
  StudyResult result;
  StudyRecord record;
  std::uint64_t resumed = 0;  ///< samples taken from the checkpoint of an earlier, stopped run
};

/// Runs the study: options.samples first; with study.target_width, further parts (indices
/// continuing, so reproducibly) until the widest containment bound is that tight or
/// study.max_samples is reached. Rows go to `store` as rounds finish (null on a process that does
/// not gather), then the record. `threads` is recorded. With control.stop set (by a signal): a
/// stopped run returns with result.interrupted set, its finished rows kept by the store and the
/// store not finished; samples the store kept from an earlier run are taken, not flown again.
/// On a process that does not gather, returns an empty StudyRun.
StudyRun run_pipeline(const SampleModel& model, const World& world, StudyOptions options,
                      StudyStore* store, SampleFlights& flights, int threads,
                      const RunControl& control = {});

/// Appends the rows of a later part (or another rank's block) to a study's rows, in order.
void append_rows(StudyResult& total, StudyResult&& part);

/// The next sample count of a study grown toward `target` (relative width): widths of
/// order-statistic bounds shrink about as 1/sqrt(n), so n (w / target)^2 with a 20 % margin, at
/// least 1.5 and at most 4 times n; an undetermined bound asks for the samples it needs. Rounded
/// up to a multiple of 1024, at most max_samples.
std::uint64_t next_sample_count(std::uint64_t n, double width, double target,
                                const Footprint& footprint, std::uint64_t max_samples);

}  // namespace strewn
