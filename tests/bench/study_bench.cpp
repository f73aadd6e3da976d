// A 200 000-sample study of a bundle with uncertain mass and drag written to HDF5, on one and two
// threads, beside a bare loop over the same flights (inputs drawn beforehand, fly() called
// directly, nothing sampled or stored): the cost of the study machinery itself.
#include <benchmark/benchmark.h>
#include <tbb/global_control.h>

#include <filesystem>

#include "bench_study.hpp"
#include "store/results_file.hpp"
#include "study/study.hpp"

namespace strewn {
namespace {

constexpr std::uint64_t kSamples = 200000;

struct Setup : bench::BenchStudy {
  std::vector<FlightInputs> flights;  // the same flights, drawn beforehand for the bare loop
  Setup() : BenchStudy("bundle-study.toml", kSamples) {
    SampleModel::Workspace w(model);
    flights.reserve(kSamples);
    for (std::uint64_t i = 0; i < kSamples; ++i) {
      model.prepare(i, w);
      flights.push_back(model.flight(i, 0, w));
    }
  }
};
const Setup& setup() {
  static const Setup s;
  return s;
}

void study(benchmark::State& state, int threads) {
  const Setup& s = setup();
  tbb::global_control limit(tbb::global_control::max_allowed_parallelism,
                            static_cast<std::size_t>(threads));
  const auto path = (std::filesystem::temp_directory_path() / "strewn-bench.h5").string();
  for (auto _ : state) {
    StudyOptions options;
    options.samples = kSamples;
    const StudyRun r = run_and_write(s.model, s.world, options, path, threads);  // as `run` does
    benchmark::DoNotOptimize(r.result.completed);
  }
  std::filesystem::remove(path);
  state.counters["samples_per_second"] =
      benchmark::Counter(static_cast<double>(kSamples) * static_cast<double>(state.iterations()),
                         benchmark::Counter::kIsRate);
}

void BM_Study_1_thread(benchmark::State& state) {
  study(state, 1);
}
void BM_Study_2_threads(benchmark::State& state) {
  study(state, 2);
}

void BM_BareFlightLoop(benchmark::State& state) {
  const Setup& s = setup();
  double sum = 0.0;
  for (auto _ : state) {
    for (const auto& in : s.flights) {
      const Environment env{&s.world.medium, in.conditions, &s.world.wind, s.world.ground};
      sum += fly(in.body, env, in.release).position.x();
    }
    benchmark::DoNotOptimize(sum);
  }
  state.counters["samples_per_second"] =
      benchmark::Counter(static_cast<double>(kSamples) * static_cast<double>(state.iterations()),
                         benchmark::Counter::kIsRate);
}

// Medians of five repetitions of two runs each: the shared host makes single runs vary.
BENCHMARK(BM_BareFlightLoop)
    ->Unit(benchmark::kMillisecond)
    ->Iterations(2)
    ->Repetitions(5)
    ->UseRealTime();
BENCHMARK(BM_Study_1_thread)
    ->Unit(benchmark::kMillisecond)
    ->Iterations(2)
    ->Repetitions(5)
    ->UseRealTime();
BENCHMARK(BM_Study_2_threads)
    ->Unit(benchmark::kMillisecond)
    ->Iterations(2)
    ->Repetitions(5)
    ->UseRealTime();

}  // namespace
}  // namespace strewn

BENCHMARK_MAIN();
