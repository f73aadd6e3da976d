#include "study/study.hpp"

#include <tbb/parallel_for.h>
#include <tbb/task_arena.h>

#include <algorithm>
#include <atomic>
#include <cstring>
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

StudyResult run_study(const SampleModel& model, const StudyOptions& options) {
  const Scenario& s = model.scenario();
  const std::size_t bodies = model.bodies();
  const std::size_t dims = model.sampler().dimensions();
  const std::size_t choices = model.choice_names().size();
  StudyResult result;
  result.samples = options.samples;
  result.bodies = bodies;
  result.columns.set_inputs(model.column_names(), choices);
  result.columns.resize(options.samples * bodies, dims + choices);
  const FlightOptions flight = flight_options(s);
  StudyColumns& c = result.columns;

  // Returns the samples it finished: all of them, or fewer when the study is stopped.
  auto run_block = [&](std::uint64_t first, std::uint64_t last) -> std::uint64_t {
    SampleModel::Workspace w(model);  // once per block: nothing is allocated per sample
    std::vector<double> chosen(choices);
    for (std::uint64_t local = first; local < last; ++local) {
      if (options.stop && options.stop->load(std::memory_order_relaxed)) return local - first;
      const std::uint64_t i = options.first_sample + local;
      model.prepare(i, w);
      for (std::size_t b = 0; b < bodies; ++b) {
        const FlightInputs in = model.flight(i, b, w, chosen);
        const Environment env{&model.world().medium, in.conditions, &w.wind(), s.site.ground};
        const FlightResult r = fly(in.body, env, in.release, flight);
        const std::size_t row = local * bodies + b;
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
        for (std::size_t d = 0; d < dims; ++d) c.inputs[d][row] = w.values()[d];
        for (std::size_t k = 0; k < choices; ++k) c.inputs[dims + k][row] = chosen[k];
      }
    }
    return last - first;
  };

  // Blocks are grouped in rounds (at most 64 blocks). The thread that completes a round writes
  // every finished round in order (the "combining" pattern: whoever holds the writer lock drains
  // the queue, and rechecks after letting go), so writing runs beside flying on the threads
  // allowed, with no barrier between rounds. Each row depends only on its sample index, never on
  // which thread or round handled it.
  // Blocks small enough that every thread gets several when samples are few (a study of slow
  // flights, or the gaps a resumed study fills); the rows do not depend on the block size.
  const int workers = tbb::this_task_arena::max_concurrency();
  const std::uint64_t block =
      std::clamp<std::uint64_t>(options.samples / (4 * static_cast<std::uint64_t>(workers)), 1,
                                std::max<std::size_t>(1, options.block));
  const std::uint64_t blocks = (options.samples + block - 1) / block;
  // At least about 16 rounds a study, so that the rows reach the sink (the checkpoint) as the
  // study goes, not only at its end: a study killed without warning keeps what was written.
  const std::uint64_t kBlocksPerRound = std::clamp<std::uint64_t>(blocks / 16, 1, 64);
  const std::uint64_t rounds = (blocks + kBlocksPerRound - 1) / kBlocksPerRound;
  std::vector<std::atomic<std::uint64_t>> remaining(rounds);  // blocks still flying; 0: finished
  for (std::uint64_t r = 0; r < rounds; ++r)
    remaining[r] = std::min(kBlocksPerRound, blocks - r * kBlocksPerRound);
  auto finished = [&](std::uint64_t r) { return r < rounds && remaining[r].load() == 0; };
  std::atomic<std::uint64_t> next_round{0};
  std::mutex writer;
  auto drain = [&] {
    while (true) {
      std::unique_lock<std::mutex> lock(writer, std::try_to_lock);
      if (!lock.owns_lock()) return;  // the holder rechecks after letting go
      for (std::uint64_t r = next_round.load(); finished(r); r = next_round.load()) {
        const std::uint64_t first = r * kBlocksPerRound * block;
        const std::uint64_t end = std::min(options.samples, (r + 1) * kBlocksPerRound * block);
        if (options.sink) options.sink->write(c, first * bodies, end * bodies);
        if (options.progress) options.progress(options.first_sample + end);
        next_round = r + 1;
      }
      lock.unlock();
      if (!finished(next_round.load())) return;
    }
  };
  // One worker per thread allowed, each taking the next block in index order, so rounds finish
  // nearly in order and are written while later ones fly.
  std::atomic<std::uint64_t> next_block{0};
  std::vector<std::uint64_t> block_done(blocks, 0);  // samples finished per block, from its start
  tbb::parallel_for(0, workers, [&](int) {
    for (std::uint64_t k = next_block++; k < blocks; k = next_block++) {
      if (options.stop && options.stop->load()) break;
      const std::uint64_t first = k * block, last = std::min(options.samples, (k + 1) * block);
      block_done[k] = run_block(first, last);
      if (block_done[k] < last - first) break;  // stopped within the block
      const std::uint64_t r = k / kBlocksPerRound;
      if (--remaining[r] == 0) drain();
    }
  });
  drain();  // nothing can be left, but make sure
  if (next_round.load() < rounds) {
    // Stopped: the rounds finished in order were written; every other finished sample (whole
    // blocks and the starts of the blocks that were flying) goes to the sink to be kept.
    const std::uint64_t kept =
        std::min(options.samples, next_round.load() * kBlocksPerRound * block);
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
  const Environment env{&model.world().medium, row.inputs.conditions, &w.wind(), s.site.ground};
  FlightOptions options = flight_options(s);
  options.record_interval = record_interval;
  row.result = fly(row.inputs.body, env, row.inputs.release, options, observer);
  row.limits = model_limits(row.inputs.body, env);
  return row;
}

}  // namespace strewn
