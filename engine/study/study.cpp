#include "study/study.hpp"

#include <tbb/parallel_for.h>
#include <tbb/task_arena.h>

#include <algorithm>
#include <atomic>
#include <cstring>
#include <mutex>

namespace strewn {

void StudyColumns::resize(std::size_t rows, std::size_t input_count) {
  body.resize(rows);
  east.resize(rows);
  north.resize(rows);
  time.resize(rows);
  speed.resize(rows);
  energy.resize(rows);
  status.resize(rows);
  canopy.resize(rows);
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
  StudyResult result;
  result.samples = options.samples;
  result.bodies = bodies;
  result.columns.resize(options.samples * bodies, dims);
  for (const auto& input : model.sampler().inputs())
    result.columns.input_names.push_back(input.name);
  const FlightOptions flight = flight_options(s);
  StudyColumns& c = result.columns;

  auto run_block = [&](std::uint64_t first, std::uint64_t last) {
    SampleModel::Workspace w(model);  // once per block: nothing is allocated per sample
    for (std::uint64_t local = first; local < last; ++local) {
      const std::uint64_t i = options.first_sample + local;
      model.prepare(i, w);
      for (std::size_t b = 0; b < bodies; ++b) {
        const FlightInputs in = model.flight(i, b, w);
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
        for (std::size_t d = 0; d < dims; ++d) c.inputs[d][row] = w.values()[d];
      }
    }
  };

  // Blocks are grouped in rounds of 64. The thread that completes a round writes every finished
  // round in order (the "combining" pattern: whoever holds the writer lock drains the queue, and
  // rechecks after letting go), so writing runs beside flying on the threads allowed, with no
  // barrier between rounds. Each row depends only on its sample index, never on which thread or
  // round handled it.
  const std::uint64_t block = std::max<std::size_t>(1, options.block);
  const std::uint64_t blocks = (options.samples + block - 1) / block;
  constexpr std::uint64_t kBlocksPerRound = 64;
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
  const int workers = tbb::this_task_arena::max_concurrency();
  tbb::parallel_for(0, workers, [&](int) {
    for (std::uint64_t k = next_block++; k < blocks; k = next_block++) {
      if (options.stop && options.stop->load()) break;
      run_block(k * block, std::min(options.samples, (k + 1) * block));
      const std::uint64_t r = k / kBlocksPerRound;
      if (--remaining[r] == 0) drain();
    }
  });
  drain();  // nothing can be left, but make sure
  if (next_round.load() < rounds) {
    // Stopped: keep the rounds that were finished (and written) in order, a prefix of samples.
    const std::uint64_t kept =
        std::min(options.samples, next_round.load() * kBlocksPerRound * block);
    result.interrupted = true;
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
  row.inputs = model.flight(sample, body, w);
  row.values.assign(w.values().begin(), w.values().end());
  const Scenario& s = model.scenario();
  const Environment env{&model.world().medium, row.inputs.conditions, &w.wind(), s.site.ground};
  FlightOptions options = flight_options(s);
  options.record_interval = record_interval;
  row.result = fly(row.inputs.body, env, row.inputs.release, options, observer);
  return row;
}

}  // namespace strewn
