#include "study/study.hpp"

#include <tbb/parallel_for.h>
#include <tbb/task_arena.h>

#include <algorithm>
#include <atomic>
#include <cstring>
#include <limits>
#include <mutex>

namespace strewn {

void StudyColumns::resize(std::size_t rows, std::size_t input_count) {
  std::apply([&](const auto&... c) { ((this->*c.second).resize(rows), ...); }, fixed_columns());
  inputs.assign(input_count, std::vector<double>(rows));
}

void append_row_bytes(const StudyColumns& columns, std::size_t first, std::size_t end,
                      std::vector<std::byte>& out) {
  columns.for_each_column([&](std::string_view, const auto& column) {
    const std::size_t bytes = (end - first) * sizeof(column[0]), at = out.size();
    out.resize(at + bytes);
    if (bytes) std::memcpy(out.data() + at, column.data() + first, bytes);
  });
}

bool take_row_bytes(std::span<const std::byte> in, std::size_t& at, std::size_t rows,
                    StudyColumns& columns) {
  std::size_t row_bytes = 0;
  columns.for_each_column(
      [&](std::string_view, const auto& column) { row_bytes += sizeof(column[0]); });
  if (at > in.size() || rows > (in.size() - at) / std::max<std::size_t>(row_bytes, 1)) return false;
  columns.for_each_column([&](std::string_view, auto& column) {
    const std::size_t old = column.size(), bytes = rows * sizeof(column[0]);
    column.resize(old + rows);
    if (bytes) std::memcpy(column.data() + old, in.data() + at, bytes);
    at += bytes;
  });
  return true;
}

namespace {
FlightOptions flight_options(const Scenario& s) {
  FlightOptions o;
  o.tolerance = s.study.tolerance;
  return o;
}
}  // namespace

namespace {

// Row `row` of the columns: body b's flight of a sample, its result and the sample's inputs.
inline void store_row(StudyColumns& c, std::size_t row, std::size_t b, const FlightInputs& in,
                      const FlightResult& r, std::span<const double> values,
                      std::span<const double> chosen) {
  c.body[row] = static_cast<std::uint16_t>(b);
  c.east[row] = r.position.x();
  c.north[row] = r.position.y();
  c.time[row] = r.time;
  c.speed[row] = r.speed;
  c.energy[row] = r.energy;
  c.status[row] = static_cast<std::uint8_t>(r.status);
  c.canopy[row] = static_cast<std::uint8_t>(in.body.canopy_state());
  c.regime_flags[row] = r.regime.flags;
  c.reynolds_beyond[row] = static_cast<float>(r.regime.reynolds_beyond);
  c.mach_beyond[row] = static_cast<float>(r.regime.mach_beyond);
  c.altitude_max[row] = static_cast<float>(r.regime.altitude_max);
  c.curvature_offset[row] = static_cast<float>(r.curvature_offset);
  c.rotation_offset[row] = static_cast<float>(r.rotation_offset);
  const bool landed = r.status == FlightStatus::landed;
  constexpr float kNone = std::numeric_limits<float>::quiet_NaN();
  c.ground[row] = landed ? static_cast<float>(r.position.z()) : kNone;
  c.slope[row] = landed ? static_cast<float>(r.slope) : kNone;
  c.surface_angle[row] = landed ? static_cast<float>(r.surface_angle) : kNone;
  const std::size_t dims = values.size();
  for (std::size_t d = 0; d < dims; ++d) c.inputs[d][row] = values[d];
  for (std::size_t k = 0; k < chosen.size(); ++k) c.inputs[dims + k][row] = chosen[k];
}

// Flies samples [first, last) of the part (counted from options.first_sample) into their rows.
// Returns the samples it finished: all of them, or fewer when the study is stopped.
std::uint64_t fly_block(const SampleModel& model, const StudyOptions& options,
                        const FlightOptions& flight, StudyColumns& c, std::uint64_t first,
                        std::uint64_t last) {
  const std::size_t bodies = model.bodies();
  SampleModel::Workspace w(model);  // once per block: nothing is allocated per sample
  std::vector<double> chosen(model.choice_names().size());
  for (std::uint64_t local = first; local < last; ++local) {
    if (options.stop && options.stop->load(std::memory_order_relaxed)) return local - first;
    const std::uint64_t i = options.first_sample + local;
    model.prepare(i, w);
    for (std::size_t b = 0; b < bodies; ++b) {
      const FlightInputs in = model.flight(i, b, w, chosen);
      const Environment env{&model.world().medium, in.conditions, &w.wind(), model.world().ground};
      const FlightResult r = fly(in.body, env, in.release, flight);
      store_row(c, local * bodies + b, b, in, r, w.values(), chosen);
    }
  }
  return last - first;
}

// Blocks are grouped in rounds (at most 64 blocks). The thread that completes a round writes
// every finished round in order (the "combining" pattern: whoever holds the writer lock drains
// the queue, and rechecks after letting go), so writing runs beside flying on the threads
// allowed, with no barrier between rounds. Each row depends only on its sample index, never on
// which thread or round handled it.
class Rounds {
 public:
  Rounds(const StudyOptions& options, const StudyColumns& columns, std::size_t bodies,
         std::uint64_t block, std::uint64_t blocks)
      : options_(options), columns_(columns), bodies_(bodies), block_(block) {
    // At least about 16 rounds a study, so that the rows reach the sink (the checkpoint) as the
    // study goes, not only at its end: a study killed without warning keeps what was written.
    per_round_ = std::clamp<std::uint64_t>(blocks / 16, 1, 64);
    rounds_ = (blocks + per_round_ - 1) / per_round_;
    remaining_ = std::vector<std::atomic<std::uint64_t>>(rounds_);  // blocks still flying
    for (std::uint64_t r = 0; r < rounds_; ++r)
      remaining_[r] = std::min(per_round_, blocks - r * per_round_);
  }
  // Block k has finished whole: its round's rows are written when the round is complete.
  void block_finished(std::uint64_t k) {
    if (--remaining_[k / per_round_] == 0) drain();
  }
  // Writes every finished round in order, unless another thread is doing so.
  void drain() {
    while (true) {
      std::unique_lock<std::mutex> lock(writer_, std::try_to_lock);
      if (!lock.owns_lock()) return;  // the holder rechecks after letting go
      for (std::uint64_t r = next_round_.load(); finished(r); r = next_round_.load()) {
        const std::uint64_t first = r * per_round_ * block_;
        const std::uint64_t end = std::min(options_.samples, (r + 1) * per_round_ * block_);
        if (options_.sink) options_.sink->write(columns_, first * bodies_, end * bodies_);
        if (options_.progress) options_.progress(options_.first_sample + end);
        next_round_ = r + 1;
      }
      lock.unlock();
      if (!finished(next_round_.load())) return;
    }
  }
  [[nodiscard]] bool all_written() const { return next_round_.load() >= rounds_; }
  // The samples of the rounds written in order.
  [[nodiscard]] std::uint64_t written_samples() const {
    return std::min(options_.samples, next_round_.load() * per_round_ * block_);
  }

 private:
  bool finished(std::uint64_t r) const { return r < rounds_ && remaining_[r].load() == 0; }
  const StudyOptions& options_;
  const StudyColumns& columns_;
  std::size_t bodies_;
  std::uint64_t block_, per_round_ = 1, rounds_ = 0;
  std::vector<std::atomic<std::uint64_t>> remaining_;
  std::atomic<std::uint64_t> next_round_{0};
  std::mutex writer_;
};

}  // namespace

StudyResult run_study(const SampleModel& model, const StudyOptions& options) {
  const std::size_t bodies = model.bodies();
  const std::size_t choices = model.choice_names().size();
  StudyResult result;
  result.samples = options.samples;
  result.bodies = bodies;
  result.columns.set_inputs(model.column_names(), choices);
  result.columns.resize(options.samples * bodies, model.sampler().dimensions() + choices);
  const FlightOptions flight = flight_options(model.scenario());
  StudyColumns& c = result.columns;

  // Blocks small enough that every thread gets several when samples are few (a study of slow
  // flights, or the gaps a resumed study fills); the rows do not depend on the block size.
  const int workers = tbb::this_task_arena::max_concurrency();
  const std::uint64_t block =
      std::clamp<std::uint64_t>(options.samples / (4 * static_cast<std::uint64_t>(workers)), 1,
                                std::max<std::size_t>(1, options.block));
  const std::uint64_t blocks = (options.samples + block - 1) / block;
  Rounds rounds(options, c, bodies, block, blocks);
  // One worker per thread allowed, each taking the next block in index order, so rounds finish
  // nearly in order and are written while later ones fly.
  std::atomic<std::uint64_t> next_block{0};
  std::vector<std::uint64_t> block_done(blocks, 0);  // samples finished per block, from its start
  tbb::parallel_for(0, workers, [&](int) {
    for (std::uint64_t k = next_block++; k < blocks; k = next_block++) {
      if (options.stop && options.stop->load()) break;
      const std::uint64_t first = k * block, last = std::min(options.samples, (k + 1) * block);
      block_done[k] = fly_block(model, options, flight, c, first, last);
      if (block_done[k] < last - first) break;  // stopped within the block
      rounds.block_finished(k);
    }
  });
  rounds.drain();  // nothing can be left, but make sure
  if (!rounds.all_written()) {
    // Stopped: the rounds finished in order were written; every other finished sample (whole
    // blocks and the starts of the blocks that were flying) goes to the sink to be kept.
    const std::uint64_t kept = rounds.written_samples();
    result.interrupted = true;
    result.finished = kept;
    for (std::uint64_t k = kept / block; k < blocks; ++k) {
      if (block_done[k] == 0) continue;
      result.finished += block_done[k];
      if (options.sink)
        options.sink->keep(c, k * block * bodies, (k * block + block_done[k]) * bodies);
    }
    result.samples = kept;
    c.for_each_column([&](std::string_view, auto& column) { column.resize(kept * bodies); });
  }
  result.count_outcomes();
  return result;
}

ReplayedRow replay_row(const SampleModel& model, std::uint64_t sample, std::size_t body,
                       FlightObserver* observer, double record_interval) {
  SampleModel::Workspace w(model);
  model.prepare(sample, w);
  ReplayedRow row;
  row.values.assign(w.values().begin(), w.values().end());
  std::vector<double> chosen(model.choice_names().size());
  row.inputs = model.flight(sample, body, w, chosen);
  row.values.insert(row.values.end(), chosen.begin(), chosen.end());
  const Scenario& s = model.scenario();
  const Environment env{&model.world().medium, row.inputs.conditions, &w.wind(),
                        model.world().ground};
  FlightOptions options = flight_options(s);
  options.record_interval = record_interval;
  row.result = fly(row.inputs.body, env, row.inputs.release, options, observer);
  row.limits = model_limits(row.inputs.body, env);
  return row;
}

}  // namespace strewn
