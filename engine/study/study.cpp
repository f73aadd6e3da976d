#include "study/study.hpp"

#include <tbb/blocked_range.h>
#include <tbb/parallel_for.h>
#include <algorithm>

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
    for (std::uint64_t i = first; i < last; ++i) {
      model.prepare(i, w);
      for (std::size_t b = 0; b < bodies; ++b) {
        const FlightInputs in = model.flight(i, b, w);
        const Environment env{&model.world().medium, in.conditions, &w.wind(), s.site.ground};
        const FlightResult r = fly(in.body, env, in.release, flight);
        const std::size_t row = i * bodies + b;
        c.body[row] = static_cast<std::uint16_t>(b);
        c.east[row] = r.position.x();
        c.north[row] = r.position.y();
        c.time[row] = r.time;
        c.speed[row] = r.speed;
        c.energy[row] = r.energy;
        c.status[row] = static_cast<std::uint8_t>(r.status);
        c.canopy[row] = static_cast<std::uint8_t>(in.body.has_canopy ? in.body.canopy.state
                                                                     : CanopyState::none);
        for (std::size_t d = 0; d < dims; ++d) c.inputs[d][row] = w.values()[d];
      }
    }
  };

  // Blocks are handed to TBB in rounds so that the calling thread can report progress between
  // rounds; the rows each block writes do not depend on the rounds.
  const std::uint64_t block = std::max<std::size_t>(1, options.block);
  const std::uint64_t round = block * 64;
  for (std::uint64_t start = 0; start < options.samples; start += round) {
    const std::uint64_t end = std::min(options.samples, start + round);
    const std::uint64_t blocks = (end - start + block - 1) / block;
    tbb::parallel_for(tbb::blocked_range<std::uint64_t>(0, blocks, 1),
                      [&](const tbb::blocked_range<std::uint64_t>& range) {
                        for (std::uint64_t k = range.begin(); k != range.end(); ++k)
                          run_block(start + k * block, std::min(end, start + (k + 1) * block));
                      });
    if (options.progress) options.progress(end);
  }
  for (std::uint8_t st : c.status) (st == 0 ? result.completed : result.failed)++;
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
