// The footprint statistics of a 10^6-sample study on one core, and a report built from its
// results file (read back, summary JSON, map, page and CSV). Speed targets: statistics under
// 1 s, report under 3 s (scripts/bench also times the `strewn report` command itself).
#include <benchmark/benchmark.h>
#include <tbb/global_control.h>

#include <filesystem>

#include "bench_study.hpp"
#include "report/footprint_report.hpp"
#include "report/report_files.hpp"
#include "store/results_file.hpp"
#include "study/study.hpp"

namespace strewn {
namespace {

constexpr std::uint64_t kSamples = 1000000;

struct Setup : bench::BenchStudy {
  StudyResult result;
  FootprintSettings settings = footprint_settings(scenario, world, kSamples);
  std::string path = STREWN_SOURCE_DIR "/build/bench/footprint-study.h5";
  Setup() : BenchStudy("footprint-study.toml", kSamples) {
    StudyOptions options;
    options.samples = kSamples;
    result = run_study(model, options);  // every thread: this is set-up, not measured
    const Footprint footprint = compute_footprint(impact_table(result.columns), settings);
    std::filesystem::create_directories(std::filesystem::path(path).parent_path());
    write_results(path, scenario, result, make_record(scenario, world, result, footprint, 3, 2));
  }
};
const Setup& setup() {
  static const Setup s;
  return s;
}

void BM_FootprintStatistics_1e6(benchmark::State& state) {
  const Setup& s = setup();
  tbb::global_control one(tbb::global_control::max_allowed_parallelism, 1);
  const ImpactTable table = impact_table(s.result.columns);
  for (auto _ : state) {
    const Footprint f = compute_footprint(table, s.settings);
    benchmark::DoNotOptimize(f.groups.size());
  }
  state.counters["inputs"] = static_cast<double>(table.inputs.size());
}
BENCHMARK(BM_FootprintStatistics_1e6)->Unit(benchmark::kMillisecond)->Iterations(1)->Repetitions(5);

void BM_ReportFromFile_1e6(benchmark::State& state) {
  const Setup& s = setup();
  for (auto _ : state) {
    const ResultsFile file = read_results(s.path, false);
    const std::string json = record_json(file.record, true).dump(2);
    const std::string svg = map_svg(file.record), html = html_report(file.record),
                      csv = figures_csv(file.record), geojson = geojson_text(file.record, nullptr);
    benchmark::DoNotOptimize(json.size() + svg.size() + html.size() + csv.size() + geojson.size());
  }
}
BENCHMARK(BM_ReportFromFile_1e6)->Unit(benchmark::kMillisecond)->Iterations(1)->Repetitions(5);

}  // namespace
}  // namespace strewn

BENCHMARK_MAIN();
