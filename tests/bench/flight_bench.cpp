// One bundle flight (area model, 2.7 km fall through a 4-layer wind, US76) with strewn's
// integrator, and the same forces integrated with Boost.Odeint's dense-output Dormand-Prince at the
// same accuracy, side by side. Each reports its impact error against a tolerance-1e-11 reference.
#include <benchmark/benchmark.h>

#include <array>
#include <cmath>
#include <memory>

#include "../unit/reference_flight.hpp"
#include "flight/flight.hpp"

namespace strewn {
namespace {

struct BundleDrop {
  Medium medium = Medium::us1976();
  WindProfile wind{
      {{540.0, 3.0, 240.0}, {1500.0, 8.0, 255.0}, {2500.0, 11.0, 265.0}, {3500.0, 14.0, 275.0}},
      540.0};
  Body body;
  Environment environment;
  ReleaseState release;
  Vec3 reference;
  BundleDrop() {
    body.mass = 95.0;
    body.drag.law = AreaDrag(1.05, 0.55);
    environment = Environment{&medium, {}, &wind, 540.0};
    release.position = Vec3(0.0, 0.0, 540.0 + 2700.0);
    release.velocity = Vec3(62.0, 0.0, 0.0);
    reference = test::reference_fly(body, environment, release, 1e-11).position;
  }
};

const BundleDrop& bundle() {
  static const BundleDrop drop;
  return drop;
}

double miss(const Vec3& impact) {
  return (impact - bundle().reference).head<2>().norm();
}

// The bundle flown in `environment` at the default tolerance (0.05 m) for as long as the
// benchmark asks, with its steps and evaluations as counters; the last flight's result.
FlightResult fly_bundle(benchmark::State& state, const Environment& environment) {
  const auto& b = bundle();
  FlightOptions options;
  FlightResult result;
  for (auto _ : state) {
    result = fly(b.body, environment, b.release, options);
    benchmark::DoNotOptimize(result);
  }
  if (result.status != FlightStatus::landed) state.SkipWithError("the bundle did not land");
  state.counters["steps"] = static_cast<double>(result.steps);
  state.counters["evaluations"] = static_cast<double>(result.evaluations);
  return result;
}

void BM_BundleFlight_strewn(benchmark::State& state) {
  const FlightResult result = fly_bundle(state, bundle().environment);
  state.counters["impact_error_m"] = miss(result.position);
}
BENCHMARK(BM_BundleFlight_strewn)->Unit(benchmark::kMicrosecond);

// The same bundle over terrain: a surface of posts 30 m apart (the usual spacing of open elevation
// tiles) rolling 60 m about the flat bench's ground, read from memory as a raster is read
// (flight/grounds/terrain_surface.hpp). Against BM_BundleFlight_strewn: the cost of the terrain's
// height look-ups and of locating the contact on a surface that is not level.
Grounds rolling_terrain() {
  constexpr double kHalf = 6000.0, kPost = 30.0;
  PostHeights posts;
  posts.columns = posts.rows = static_cast<std::size_t>(2.0 * kHalf / kPost) + 1;
  posts.heights.resize(posts.columns * posts.rows);
  for (std::size_t j = 0; j < posts.rows; ++j)
    for (std::size_t i = 0; i < posts.columns; ++i) {
      const double east = -kHalf + kPost * static_cast<double>(i);
      const double north = -kHalf + kPost * static_cast<double>(j);
      posts.heights[j * posts.columns + i] =
          static_cast<float>(540.0 + 60.0 * std::sin(east / 800.0) * std::cos(north / 600.0));
    }
  FrameToPosts frame;
  frame.half_width = kHalf;
  frame.spacing = 100.0;
  frame.nodes = static_cast<std::size_t>(2.0 * kHalf / frame.spacing) + 1;
  for (std::size_t j = 0; j < frame.nodes; ++j)
    for (std::size_t i = 0; i < frame.nodes; ++i) {
      frame.column.push_back(frame.spacing * static_cast<double>(i) / kPost);
      frame.row.push_back(frame.spacing * static_cast<double>(j) / kPost);
    }
  const std::array<double, 2> values{std::nan(""), kHalf};
  return TerrainGround(values,
                       std::make_shared<const TerrainSurface>(std::move(posts), std::move(frame)));
}

void BM_BundleFlight_terrain(benchmark::State& state) {
  Environment environment = bundle().environment;
  environment.ground = rolling_terrain();
  state.counters["ground_m"] = fly_bundle(state, environment).position.z();
}
BENCHMARK(BM_BundleFlight_terrain)->Unit(benchmark::kMicrosecond);

// The same bundle on a hot day drawn from a range (+7.3 K out of a normal offset of sd 4 K: a
// lattice of days, four weighed per query), against BM_BundleFlight_strewn: the cost of the
// hydrostatic hot or cold day (medium/medium.hpp).
void BM_BundleFlight_hot_day(benchmark::State& state) {
  static const Medium drawn_days = [] {
    Medium m = Medium::us1976();
    m.tabulate_offsets(-28.0, 28.0);  // +-7 sd, as a study tabulates a normal offset's range
    return m;
  }();
  Environment environment = bundle().environment;
  environment.medium = &drawn_days;
  environment.conditions = {7.3, 1.0};
  fly_bundle(state, environment);
  state.counters["days"] = static_cast<double>(drawn_days.offsets().size());
}
BENCHMARK(BM_BundleFlight_hot_day)->Unit(benchmark::kMicrosecond);

// Odeint at the loosest tolerance (a factor-2 ladder) whose impact error is no worse than
// strewn's at the default tolerance: the same accuracy, for a fair comparison of cost.
void BM_BundleFlight_odeint_dopri5(benchmark::State& state) {
  const auto& b = bundle();
  const double target = miss(fly(b.body, b.environment, b.release).position);
  double tolerance = 1e-1;
  while (tolerance > 1e-12 &&
         miss(test::reference_fly(b.body, b.environment, b.release, tolerance).position) > target)
    tolerance /= 2.0;
  test::ReferenceImpact result;
  for (auto _ : state) {
    result = test::reference_fly(b.body, b.environment, b.release, tolerance);
    benchmark::DoNotOptimize(result);
  }
  state.counters["impact_error_m"] = miss(result.position);
  state.counters["steps"] = static_cast<double>(result.steps);
  state.counters["odeint_tolerance"] = tolerance;
}
BENCHMARK(BM_BundleFlight_odeint_dopri5)->Unit(benchmark::kMicrosecond);

// The cost of one evaluation of the forces, for reading the flight cost.
void BM_ForcesEvaluation(benchmark::State& state) {
  const auto& b = bundle();
  const Forces forces(b.body, b.environment);
  FlightState y;
  y << 100.0, 20.0, 2000.0, 30.0, 5.0, -40.0;
  FlightState d;
  double t = 0.0;
  for (auto _ : state) {
    forces(t, y, d);
    benchmark::DoNotOptimize(d);
    y[2] -= 0.37;
    if (y[2] < 600.0) y[2] = 3000.0;
  }
}
BENCHMARK(BM_ForcesEvaluation)->Unit(benchmark::kNanosecond);

}  // namespace
}  // namespace strewn

BENCHMARK_MAIN();
