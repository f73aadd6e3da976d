#pragma once
// A Monte Carlo study: every sample flies every body of the scenario; results go into
// preallocated columns, one row per (sample, body) at row sample * bodies + body. Samples are
// run in blocks over TBB's threads; each row depends only on its sample index, so the columns
// are bit-identical for any thread count and block size.
#include <atomic>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <string_view>
#include <tuple>
#include <utility>
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
  // Where the flight left its models' ranges (flight/model_range.hpp): the ModelRangeFlag bits,
  // the Reynolds and Mach numbers beyond the ranges (NaN within them), the highest altitude (m),
  // and the estimated offsets of the impact that the flat ground and the non-rotating frame leave
  // out (m). Single precision: they are reported to three figures.
  std::vector<std::uint8_t> regime_flags;
  std::vector<float> reynolds_beyond, mach_beyond, altitude_max;
  std::vector<float> curvature_offset, rotation_offset;
  // Landed flights: the ground's height at the impact point (m above mean sea level), its
  // steepest slope there and the impact velocity's angle with the surface (degrees); NaN
  // otherwise. Single precision: a height to 0.1 mm, angles to 1e-5 degrees.
  std::vector<float> ground, slope, surface_angle;
  /// The named columns: first the sampled inputs (their values), then the last `choices` of them,
  /// the sample's own random choices (SampleModel::choice_names: ensemble member, wind
  /// perturbation, burst velocity), recorded so that they can be ranked like the inputs.
  std::vector<std::string> input_names;
  std::vector<std::vector<double>> inputs;  ///< one column per name, per row
  std::size_t choices = 0;

  void resize(std::size_t rows, std::size_t input_count);
  [[nodiscard]] std::size_t rows() const { return east.size(); }
  /// Names the columns of the sampled inputs and, last, of `choice_count` random choices, with a
  /// column for each (empty, or kept as it was).
  void set_inputs(std::vector<std::string> names, std::size_t choice_count = 0) {
    input_names = std::move(names);
    inputs.resize(input_names.size());
    choices = choice_count;
  }
  /// The number of sampled inputs among the named columns.
  [[nodiscard]] std::size_t sampled_inputs() const { return input_names.size() - choices; }

  /// Calls f(name, column) on each per-row column in one fixed order: the fixed columns under
  /// their names in results files, then the inputs under theirs (input_names and inputs match).
  /// The one list of the columns, for code that treats each alike: files, slices, messages and
  /// checkpoints.
  template <class F>
  void for_each_column(F&& f) {
    visit(*this, f);
  }
  template <class F>
  void for_each_column(F&& f) const {
    visit(*this, f);
  }
  /// f(ours, theirs) on each pair of matching columns of this table and `other` (same inputs).
  template <class F>
  void for_each_column_with(const StudyColumns& other, F&& f) {
    visit_pairs(*this, other, f);
  }
  template <class F>
  void for_each_column_with(const StudyColumns& other, F&& f) const {
    visit_pairs(*this, other, f);
  }

 private:
  static constexpr auto fixed_columns() {
    return std::make_tuple(
        std::pair{"body", &StudyColumns::body}, std::pair{"east", &StudyColumns::east},
        std::pair{"north", &StudyColumns::north}, std::pair{"time", &StudyColumns::time},
        std::pair{"speed", &StudyColumns::speed}, std::pair{"energy", &StudyColumns::energy},
        std::pair{"status", &StudyColumns::status}, std::pair{"canopy", &StudyColumns::canopy},
        std::pair{"regime_flags", &StudyColumns::regime_flags},
        std::pair{"reynolds_beyond", &StudyColumns::reynolds_beyond},
        std::pair{"mach_beyond", &StudyColumns::mach_beyond},
        std::pair{"altitude_max", &StudyColumns::altitude_max},
        std::pair{"curvature_offset", &StudyColumns::curvature_offset},
        std::pair{"rotation_offset", &StudyColumns::rotation_offset},
        std::pair{"ground", &StudyColumns::ground}, std::pair{"slope", &StudyColumns::slope},
        std::pair{"surface_angle", &StudyColumns::surface_angle});
  }
  template <class Table, class F>
  static void visit(Table& table, F& f) {
    std::apply([&](const auto&... c) { (f(std::string_view(c.first), table.*c.second), ...); },
               fixed_columns());
    for (std::size_t d = 0; d < table.inputs.size(); ++d)
      f(std::string_view(table.input_names[d]), table.inputs[d]);
  }
  template <class Table, class F>
  static void visit_pairs(Table& ours, const StudyColumns& theirs, F& f) {
    std::apply([&](const auto&... c) { (f(ours.*c.second, theirs.*c.second), ...); },
               fixed_columns());
    for (std::size_t d = 0; d < ours.inputs.size(); ++d) f(ours.inputs[d], theirs.inputs[d]);
  }
};

/// Rows [first, end) of every column in turn, appended to `out` as this machine's bytes: for
/// messages between the ranks of one job and for checkpoints read back on the same machine.
void append_row_bytes(const StudyColumns& columns, std::size_t first, std::size_t end,
                      std::vector<std::byte>& out);
/// Reads `rows` rows of every column from `in` at `at` (advanced past them), as append_row_bytes
/// wrote them, onto the ends of `columns`. False, with nothing read, when `in` holds too few
/// bytes.
bool take_row_bytes(std::span<const std::byte> in, std::size_t& at, std::size_t rows,
                    StudyColumns& columns);

/// Receives the rows of finished rounds of samples, in order, while later rounds are computed:
/// the thread that completes a round writes it (one call at a time, on whichever of the study's
/// threads that is), so output overlaps computation within the thread limit.
class RowSink {
 public:
  virtual ~RowSink() = default;
  /// Rows [first, end) of `columns` are final.
  virtual void write(const StudyColumns& columns, std::size_t first, std::size_t end) = 0;
  /// A stopped study's finished rows beyond those written in order: whole samples, a piece of
  /// them at a time, in index order, after the last write(). For keeping, not for the results
  /// file (which holds samples in order only).
  virtual void keep(const StudyColumns& /*columns*/, std::size_t /*first*/, std::size_t /*end*/) {}
};

struct StudyOptions {
  std::uint64_t first_sample = 0;  ///< index of the first sample (a study grown in parts)
  std::uint64_t samples = 0;       ///< samples to fly: first_sample .. first_sample + samples - 1
  std::size_t block = 256;         ///< samples per task
  /// Called after each round, in order and one call at a time (from one of the study's threads),
  /// with the samples done so far.
  std::function<void(std::uint64_t done)> progress;
  RowSink* sink = nullptr;  ///< optional
  /// When set (a signal handler may set it), workers stop before their next sample: the rounds
  /// finished in order are still written and the result holds them (a prefix of the samples),
  /// and every other finished sample goes to the sink's keep(). A study of slow flights thus
  /// stops within one flight per thread and loses no finished sample.
  const std::atomic<bool>* stop = nullptr;
};

struct StudyResult {
  StudyColumns columns;
  std::uint64_t samples = 0;
  std::uint64_t completed = 0;  ///< rows that landed
  std::uint64_t failed = 0;     ///< rows that did not
  std::size_t bodies = 0;
  bool interrupted = false;    ///< stopped early: `samples` counts the prefix that was finished
  std::uint64_t finished = 0;  ///< stopped early: every finished sample, in order or not
  std::uint64_t planned = 0;   ///< stopped early: the samples it was flying toward (0: samples)

  /// Sets `completed` and `failed` from the rows' statuses.
  void count_outcomes() {
    completed = failed = 0;
    for (std::uint8_t st : columns.status) (st == 0 ? completed : failed)++;
  }
};

/// Runs the study on the threads TBB may use (limit them with tbb::global_control).
StudyResult run_study(const SampleModel& model, const StudyOptions& options);

/// One row again, on its own: the same flight inputs and result as in the study.
struct ReplayedRow {
  FlightInputs inputs;
  FlightResult result;
  std::vector<double> values;  ///< the sampled inputs, then the choices (SampleModel)
  ModelLimits limits;          ///< what the flight was held against (model_range.hpp)
};
ReplayedRow replay_row(const SampleModel& model, std::uint64_t sample, std::size_t body,
                       FlightObserver* observer = nullptr, double record_interval = 0.0);

}  // namespace strewn
