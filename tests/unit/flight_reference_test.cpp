// The flight model against an independent integration of the same physics (Boost.Odeint at
// tolerance 1e-10, see reference_flight.hpp), over a broad random family of flights within the
// scenario contract, and the integrator's convergence order by step halving.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <random>
#include <vector>

#include "flight/dormand_prince.hpp"
#include "flight/flight.hpp"
#include "random_flight.hpp"
#include "reference_flight.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::draw_flight;
using test::RandomFlight;

// Acceptance: at the default tolerance (0.05 m) every flight lands within 0.05 m of the
// independent reference; at 0.5 m and 0.005 m the impact error stays within that tolerance too.
TEST(FlightReference, RandomFlightsLandWithinToleranceOfOdeint) {
  std::mt19937_64 rng(20261201);
  double worst_ratio = 0.0;
  int landed = 0;
  for (int i = 0; i < 120; ++i) {
    RandomFlight f = draw_flight(rng);
    SCOPED_TRACE("flight " + std::to_string(i) + ": " + f.description);
    const auto reference = test::reference_fly(f.body, f.environment, f.release);
    ASSERT_TRUE(reference.landed);
    long steps = 0;
    for (double tolerance : {0.5, 0.05, 0.005}) {
      FlightOptions options;
      options.tolerance = tolerance;
      const auto result = fly(f.body, f.environment, f.release, options);
      ASSERT_EQ(result.status, FlightStatus::landed);
      const double miss = (result.position - reference.position).head<2>().norm();
      EXPECT_LE(miss, tolerance) << "tolerance " << tolerance;
      EXPECT_NEAR(result.time, reference.time, std::max(1e-3, tolerance));
      worst_ratio = std::max(worst_ratio, miss / tolerance);
      if (std::getenv("STREWN_VERBOSE") && miss / tolerance > 0.05)
        std::printf("    flight %d at tolerance %g: miss %.3g of the tolerance (%s)\n", i,
                    tolerance, miss / tolerance, f.description.c_str());
      if (tolerance == 0.05) steps = result.steps;
    }
    if (std::getenv("STREWN_VERBOSE"))
      std::printf("%3d %-60s ref steps %6ld ours %5ld\n", i, f.description.c_str(), reference.steps,
                  steps);
    ++landed;
  }
  EXPECT_EQ(landed, 120);
  RecordProperty("worst_miss_over_tolerance", std::to_string(worst_ratio));
  if (std::getenv("STREWN_VERBOSE")) std::printf("worst miss / tolerance: %.3f\n", worst_ratio);
}

// Small bodies: the quasi-steady form against the full equations where both apply (a 40 um
// droplet from 15 m in a light sheared breeze: the full equations are still affordable there).
TEST(FlightReference, QuasiSteadyFormMatchesFullEquations) {
  const Medium air = Medium::us1976();
  const WindProfile wind({{0.0, 0.3, 200.0}, {8.0, 1.0, 250.0}}, 0.0);
  const Environment environment{&air, {}, &wind, 0.0};
  const Body drop = test::round_body(SphereDrag(40e-6), 998.2);
  const ReleaseState release = test::release_at(0, 0, 15.0, 1.0, 0, 0);
  FlightOptions quasi;
  FlightOptions full;
  full.allow_quasi_steady = false;
  const auto a = fly(drop, environment, release, quasi);
  const auto b = fly(drop, environment, release, full);
  ASSERT_EQ(a.status, FlightStatus::landed);
  ASSERT_EQ(b.status, FlightStatus::landed);
  EXPECT_TRUE(a.quasi_steady);
  EXPECT_FALSE(b.quasi_steady);
  EXPECT_LE((a.position - b.position).head<2>().norm(), quasi.tolerance);
  EXPECT_NEAR(a.time / b.time, 1.0, 1e-4);
  EXPECT_LT(a.steps * 20, b.steps);  // and it is what makes such flights affordable
}

// Convergence order by step halving (fixed steps) on the linear-drag problem, whose exact
// solution is known: the global error must fall as h^5 (Dormand and Prince 1980), the dense
// output's as h^4 or better (Hairer, Norsett, Wanner II.6).
TEST(Integrator, ConvergenceOrderByStepHalving) {
  const double tau = 0.7, vt = 4.0, wind = 3.0;
  auto rhs = [&](double, const FlightState& y, FlightState& d) {
    d.head<3>() = y.tail<3>();
    d[3] = -(y[3] - wind) / tau;
    d[4] = -y[4] / tau;
    d[5] = -y[5] / tau - vt / tau;
  };
  auto exact_x = [&](double t) {
    return wind * t + (10.0 - wind) * tau * (1.0 - std::exp(-t / tau));
  };
  // Returns the error at t = 4 and sets the largest dense-output error over 400 probe times.
  auto run = [&](double h, double& dense_error) {
    DormandPrince5<6> stepper(FlightState::Constant(1.0));
    stepper.set_fixed_step(h);
    FlightState y0;
    y0 << 0, 0, 100, 10, 0, 0;
    stepper.start(rhs, 0.0, y0, h);
    dense_error = 0.0;
    int probe = 1;
    while (stepper.t() < 4.0 - 1e-12) {
      EXPECT_EQ(stepper.step(rhs, 4.0), StepOutcome::accepted);
      for (; probe * 0.01 <= stepper.t() && probe < 400; ++probe)
        dense_error =
            std::max(dense_error, std::abs(stepper.dense(0, probe * 0.01) - exact_x(probe * 0.01)));
    }
    return std::abs(stepper.y()[0] - exact_x(4.0));
  };
  double previous = 0.0, previous_dense = 0.0;
  for (double h : {0.2, 0.1, 0.05, 0.025}) {
    double dense = 0.0;
    const double error = run(h, dense);
    if (previous > 0.0) {
      const double order = std::log2(previous / error);
      EXPECT_GT(order, 4.6) << "h " << h;
      EXPECT_LT(order, 5.6) << "h " << h;
      EXPECT_GT(std::log2(previous_dense / dense), 3.8) << "dense, h " << h;
    }
    previous = error;
    previous_dense = dense;
  }
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// The step-size controller's forms of log2 and 2^x from the bits of the numbers hold the bounds
// their comments state, against std::log2 and std::exp2: log2 below the truth by at most
// max(log2(1 + m) - m) = 0.0861 (at m = 1/ln 2 - 1), 2^x above it by at most
// max((1 + f) / 2^f) - 1 = 6.15 % (at f = 1/ln 2 - 1), and both exact at integers
// (where mantissa and fraction are zero).
TEST(Integrator, StepSizeArithmeticIsAccurateEnough) {
  using Stepper = DormandPrince5<1>;
  double log_low = 0.0, log_high = 0.0, exp_low = 0.0, exp_high = 0.0;
  for (double x = 1e-10; x < 1e10; x *= 1.0137) {
    const double difference = Stepper::step_log2(x) - std::log2(x);
    log_low = std::min(log_low, difference);
    log_high = std::max(log_high, difference);
  }
  for (double y = -40.0; y < 40.0; y += 0.0113) {
    const double ratio = Stepper::step_exp2(y) / std::exp2(y) - 1.0;
    exp_low = std::min(exp_low, ratio);
    exp_high = std::max(exp_high, ratio);
  }
  EXPECT_GT(log_low, -0.0861);
  EXPECT_LT(log_low, -0.08);  // the bound is reached, not merely respected
  EXPECT_LT(log_high, 1e-12);
  EXPECT_GT(exp_low, -1e-12);
  EXPECT_LT(exp_high, 0.0616);
  EXPECT_GT(exp_high, 0.06);
  for (int k = -20; k <= 20; ++k) {
    EXPECT_EQ(Stepper::step_log2(std::ldexp(1.0, k)), k);
    EXPECT_EQ(Stepper::step_exp2(k), std::ldexp(1.0, k));
  }
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// A canopy set to open at a height above the ground opens before the body lands, however close to
// the ground that height is: the deployment height is crossed first. A step that ends a sliver
// above the ground may land on its own dense output carried a little past its end, but not while
// a deployment height is watched: that landing would skip the deployment lying in the sliver.
// Steps end a sliver above the ground when a wind layer's altitude lies there (a step is cut to
// end on each layer altitude) or by chance; both are flown here, over a spread of release heights
// and masses, with deployment heights of 1 mm to 10 cm.
// Each flight deploys, the last stretch from the deployment height to the ground takes that
// height over the impact's sink rate, and the deployment comes at the time the independent
// reference integration (Boost.Odeint, reference_flight.hpp) finds.
TEST(FlightReference, ACanopyOpeningJustAboveTheGroundOpensBeforeTheLanding) {
  const Medium air = Medium::us1976();
  int flights = 0;
  for (const double layer : {0.0, 0.01, 0.05, 0.2}) {  // 0: calm air, no layer at all
    const WindProfile wind = layer > 0.0
                                 ? WindProfile({{layer, 5.0, 270.0}, {3000.0, 15.0, 250.0}}, 0.0)
                                 : WindProfile();
    const Environment environment{&air, {}, &wind, 0.0};
    for (const double height : {0.001, 0.005, 0.02, 0.1}) {
      for (const double mass : {2.0, 20.0, 100.0}) {
        Body body = test::area_body(mass, 0.8, 0.05);
        body.has_canopy = true;
        body.canopy.trigger = Canopy::Trigger::height;
        body.canopy.deploy_height = height;
        body.canopy.fill_time = 1.0;
        body.canopy.drag_area = mass;  // about 4 m/s under the open canopy (not reached here)
        for (int i = 0; i < 40; ++i) {
          const ReleaseState release = test::release_at(0, 0, 100.0 + 97.3 * i, 20.0, 0, 0);
          SCOPED_TRACE("layer " + std::to_string(layer) + " m, deployment at " +
                       std::to_string(height) + " m, mass " + std::to_string(mass) +
                       " kg, released at " + std::to_string(release.position.z()) + " m");
          const FlightResult r = fly(body, environment, release);
          ASSERT_EQ(r.status, FlightStatus::landed);
          ++flights;
          ASSERT_TRUE(std::isfinite(r.deploy_time)) << "landed without deploying";
          EXPECT_LT(r.deploy_time, r.time);
          EXPECT_NEAR((r.time - r.deploy_time) * -r.velocity.z(), height, 2e-3 * height);
          const auto reference = test::reference_fly(body, environment, release);
          ASSERT_TRUE(reference.landed);
          EXPECT_NEAR(r.deploy_time, reference.deploy_time, 1e-3);
        }
      }
    }
  }
  EXPECT_EQ(flights, 4 * 4 * 3 * 40);
}

}  // namespace
}  // namespace strewn
