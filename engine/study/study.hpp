#pragma once
// A Monte Carlo study: every sample flies every body of the scenario; results go into
// preallocated columns, one row per (sample, body) at row sample * bodies + body. Samples are
// run in blocks over TBB's threads; each row depends only on its sample index, so the columns
// are bit-identical for any thread count and block size.
#include <atomic>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "flight/flight.hpp"
#include "study/sample_model.hpp"

namespace strewn {

struct StudyColumns {
  std::vector<std::uint16_t> body;   ///< index into the scenario's bodies
  std::vector<double> east, north;   ///< impact point, m (last position when the flight failed)
  std::vector<double> time;          ///< s from release
  std::vector<double> speed;         ///< ground-relative impact speed, m/s
  std::vector<double> energy;        ///< J
  std::vector<std::uint8_t> status;  ///< FlightStatus
  std::vector<std::uint8_t> canopy;  ///< CanopyState
  std::vector<std::string> input_names;
  std::vector<std::vector<double>> inputs;  ///< one column per sampled input, per row

  void resize(std::size_t rows, std::size_t input_count);
  [[nodiscard]] std::size_t rows() const { return east.size(); }
};

/// Receives the rows of finished rounds of samples, in order, while later rounds are computed:
/// the thread that completes a round writes it (one call at a time, on whichever of the study's
/// threads that is), so output overlaps computation within the thread limit.
class RowSink {
 public:
  virtual ~RowSink() = default;
  /// Rows [first, end) of `columns` are final.
  virtual void write(const StudyColumns& columns, std::size_t first, std::size_t end) = 0;
};

struct StudyOptions {
  std::uint64_t first_sample = 0;  ///< index of the first sample (a study grown in parts)
  std::uint64_t samples = 0;       ///< samples to fly: first_sample .. first_sample + samples - 1
  std::size_t block = 256;         ///< samples per task
  /// Called after each round, in order and one call at a time (from one of the study's threads),
  /// with the samples done so far.
  std::function<void(std::uint64_t done)> progress;
  RowSink* sink = nullptr;  ///< optional
  /// When set (a signal handler may set it), workers take no new block; the rounds finished in
  /// order are still written and the result holds them: a prefix of the samples.
  const std::atomic<bool>* stop = nullptr;
};

struct StudyResult {
  StudyColumns columns;
  std::uint64_t samples = 0;
  std::uint64_t completed = 0;  ///< rows that landed
  std::uint64_t failed = 0;     ///< rows that did not
  std::size_t bodies = 0;
  bool interrupted = false;  ///< stopped early: `samples` counts the prefix that was finished
};

/// Runs the study on the threads TBB may use (limit them with tbb::global_control).
StudyResult run_study(const SampleModel& model, const StudyOptions& options);

/// One row again, on its own: the same flight inputs and result as in the study.
struct ReplayedRow {
  FlightInputs inputs;
  FlightResult result;
  std::vector<double> values;  ///< the sampled inputs
};
ReplayedRow replay_row(const SampleModel& model, std::uint64_t sample, std::size_t body,
                       FlightObserver* observer = nullptr, double record_interval = 0.0);

}  // namespace strewn
