// Where a flight leaves its models' ranges (flight/model_range.hpp), watched on every flight:
// the Reynolds and Mach numbers met beyond the drag law's range against the printed U.S.
// Standard Atmosphere, the screen that skips plainly in-range points against a brute-force
// evaluation of every step, the altitude flags, and the estimates of what the flat, non-rotating
// frame leaves out against an independent integration that puts them back (Boost.Odeint).
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "flight/flight.hpp"
#include "flight/trajectory.hpp"
#include "random_flight.hpp"
#include "reference_flight.hpp"
#include "support.hpp"

namespace strewn {
namespace {

// U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), Table I, at 5000 m, as printed
// (tests/reference/us1976_table.csv): density, dynamic viscosity, speed of sound.
struct PrintedAir {
  double density, viscosity, sound_speed;
};
PrintedAir printed_air_at_5000() {
  for (const auto& row : test::read_reference("us1976_table.csv"))
    if (row.at("altitude_m") == "5000")
      return {std::stod(row.at("density_kg_m3")), std::stod(row.at("viscosity_Pa_s")),
              std::stod(row.at("sound_speed_m_s"))};
  throw std::runtime_error("no row at 5000 m");
}

struct Calm {
  Medium medium = Medium::us1976();
  WindProfile wind;
  Environment environment{&medium, {}, &wind, 0.0};
};

TEST(ModelRange, StokesDropletReleasedFastIsFlaggedWithItsReynoldsNumber) {
  // A 100 um droplet leaving a carrier at 60 m/s at 5000 m: Re = rho u D / mu, about 271, far
  // above the linear law's Re ~ 1 (common practice); the release is the flight's fastest point.
  const Calm calm;
  const Body droplet = test::round_body(StokesDrag(100e-6), 1000.0);
  const auto result = fly(droplet, calm.environment, test::release_at(0, 0, 5000, 60, 0, 0));
  ASSERT_EQ(result.status, FlightStatus::landed);
  EXPECT_TRUE(result.regime.flags & kReynoldsAboveLaw);
  const PrintedAir air = printed_air_at_5000();
  const double reynolds = air.density * 60.0 * 100e-6 / air.viscosity;
  // The table is printed to 5 figures; the medium interpolates to 3e-6.
  EXPECT_NEAR(result.regime.reynolds_beyond, reynolds, 2e-4 * reynolds);
  const auto warnings =
      flight_warnings(result, model_limits(droplet, calm.environment), FlightOptions{}.tolerance);
  ASSERT_FALSE(warnings.empty());
  EXPECT_NE(warnings[0].find("consider the sphere model"), std::string::npos) << warnings[0];
}

// Found in a read of the code: with a wind stronger than the law's highest air speed the screen
// was meant to judge every point, but a body at rest passed it. A droplet dropped from rest into
// a 5 m/s wind meets its largest air speed, the wind's, at the release: Re = rho 5 D / mu.
TEST(ModelRange, ABodyAtRestInAWindIsJudged) {
  const Medium medium = Medium::us1976();
  const WindProfile wind({{0.0, 5.0, 270.0}}, 0.0);
  const Environment environment{&medium, {}, &wind, 0.0};
  const Body droplet = test::round_body(StokesDrag(100e-6), 1000.0);
  const auto result = fly(droplet, environment, test::release_at(0, 0, 5000, 0, 0, 0));
  ASSERT_TRUE(result.regime.flags & kReynoldsAboveLaw);
  const PrintedAir air = printed_air_at_5000();
  const double reynolds = air.density * 5.0 * 100e-6 / air.viscosity;
  EXPECT_NEAR(result.regime.reynolds_beyond, reynolds, 2e-4 * reynolds);
}

TEST(ModelRange, MachBeyondTheTableAndWithoutOne) {
  const Calm calm;
  const PrintedAir air = printed_air_at_5000();
  // A steel sphere at 450 m/s with a table that ends at Mach 0.8.
  const MachTable table({0.0, 0.8}, {1.0, 1.2});
  Body sphere = test::round_body(SphereDrag(0.1), 7800.0);
  sphere.drag.mach_table = &table;
  const auto fast = fly(sphere, calm.environment, test::release_at(0, 0, 5000, 450, 0, 0));
  EXPECT_TRUE(fast.regime.flags & kMachBeyondTable);
  EXPECT_FALSE(fast.regime.flags & kMachWithoutTable);
  EXPECT_NEAR(fast.regime.mach_beyond, 450.0 / air.sound_speed, 2e-4 * 450.0 / air.sound_speed);
  // A box at 200 m/s with no table: compressibility ignored above Mach 0.3 (common practice).
  const Body box = test::area_body(20.0, 1.0, 0.1);
  const auto quick = fly(box, calm.environment, test::release_at(0, 0, 5000, 200, 0, 0));
  EXPECT_TRUE(quick.regime.flags & kMachWithoutTable);
  EXPECT_NEAR(quick.regime.mach_beyond, 200.0 / air.sound_speed, 2e-4 * 200.0 / air.sound_speed);
  // The same box dropped at 60 m/s stays well below.
  const auto slow = fly(box, calm.environment, test::release_at(0, 0, 5000, 60, 0, 0));
  EXPECT_FALSE(slow.regime.flags & (kMachWithoutTable | kMachBeyondTable));
  EXPECT_TRUE(std::isnan(slow.regime.mach_beyond));
}

TEST(ModelRange, ConstantCdBelowTheNewtonRegimeOnlyWhereTheDragMatters) {
  const Calm calm;
  // A heavy bundle dropped from a hovering carrier in still air: at the first instants its air
  // speed, hence Re, is near zero, but its drag is then far below 1 % of its weight: not flagged.
  const Body bundle = test::area_body(95.0, 1.05, 0.55);
  const auto drop = fly(bundle, calm.environment, test::release_at(0, 0, 300, 0, 0, 0));
  ASSERT_EQ(drop.status, FlightStatus::landed);
  EXPECT_FALSE(drop.regime.flags & kReynoldsBelowLaw);
  // A 1 cm leaf: Newton's terminal speed sqrt(2 m g / (rho Cd A)) is about 1.2 m/s, Re about
  // 880 at sea level, below the constant-Cd law's Re ~ 1e3 (common practice): flagged.
  const Body leaf = test::area_body(1e-5, 1.2, 1e-4);
  const auto fall = fly(leaf, calm.environment, test::release_at(0, 0, 100, 0, 0, 0));
  ASSERT_EQ(fall.status, FlightStatus::landed);
  EXPECT_TRUE(fall.regime.flags & kReynoldsBelowLaw);
  EXPECT_LT(fall.regime.reynolds_beyond, 1e3);
}

TEST(ModelRange, AboveTheSoundingAndTheWindProfile) {
  // A sounding to 1500 m and a wind profile to 1450 m; a dense body thrown up at 60 m/s from
  // 1400 m rises above both. In a vacuum it would reach 1400 + 60^2 / (2 g): drag only lowers it.
  const Medium sounding = Medium::profile(
      {{0.0, 288.15, 101325.0}, {1000.0, 281.65, 89876.0}, {1500.0, 278.4, 84559.7}});
  const WindProfile wind({{0.0, 2.0, 270.0}, {1450.0, 6.0, 280.0}}, 0.0);
  const Environment environment{&sounding, {}, &wind, 0.0};
  const Body ball = test::round_body(SphereDrag(0.05), 7800.0);
  const auto up = fly(ball, environment, test::release_at(0, 0, 1400, 0, 0, 60));
  ASSERT_EQ(up.status, FlightStatus::landed);
  EXPECT_TRUE(up.regime.flags & kAboveMedium);
  EXPECT_TRUE(up.regime.flags & kAboveWind);
  EXPECT_GT(up.regime.altitude_max, 1500.0);
  EXPECT_LT(up.regime.altitude_max, 1400.0 + 60.0 * 60.0 / (2.0 * 9.78));
  // Dropped from the same point, it stays below both tops.
  const auto down = fly(ball, environment, test::release_at(0, 0, 1400, 0, 0, 0));
  EXPECT_FALSE(down.regime.flags & (kAboveMedium | kAboveWind));
}

// The flags and extremes that every recorded step end gives when each is evaluated exactly, by
// the rule of model_range.hpp: the body's own law, where its drag is at least 1 % of the weight,
// not under an open canopy.
RegimeExtent brute_force(const TrajectoryRecorder& recorder, const Body& body,
                         const Environment& environment) {
  RegimeExtent e;
  const ModelLimits limits = model_limits(body, environment);
  const Forces forces(body, environment);
  const DragLaw law(body.drag);
  const double judged =
      kDragShareWatched * body.mass * forces.effective_gravity(lowest_ground(environment.ground));
  DragStage before = DragStage::body;
  for (const auto& p : recorder.points()) {
    const double z = p.point.position.z();
    e.altitude_max = std::max(e.altitude_max, z);
    // The deployment instant is recorded once, after the stage has changed; the body's own law
    // held up to it, so it is judged.
    const bool deploying = before == DragStage::body && p.point.stage != DragStage::body;
    before = p.point.stage;
    if ((p.point.stage == DragStage::canopy && !deploying) || !(p.air_speed > 0.0)) continue;
    const Air air = environment.medium->air(z, environment.conditions);
    if (!(law.coefficient(p.air_speed, air) * p.air_speed >= judged)) continue;
    if (p.reynolds > limits.reynolds_max) {
      e.flags |= kReynoldsAboveLaw;
      if (!(p.reynolds <= e.reynolds_beyond)) e.reynolds_beyond = p.reynolds;
    }
    if (p.reynolds < limits.reynolds_min) {
      e.flags |= kReynoldsBelowLaw;
      if (!(p.reynolds >= e.reynolds_beyond)) e.reynolds_beyond = p.reynolds;
    }
    if (p.mach > limits.mach_max) {
      e.flags |= limits.mach_table ? kMachBeyondTable : kMachWithoutTable;
      if (!(p.mach <= e.mach_beyond)) e.mach_beyond = p.mach;
    }
  }
  return e;
}

TEST(ModelRange, TheScreenMissesNothingThatEveryStepWouldShow) {
  // Over the random family of flights (every model, winds, canopies, Mach tables, media), the
  // watch of every flight, with its quick screen, gives the same flags and extremes as the exact
  // evaluation of every step end. Flights in the quasi-steady form are judged at its ends only,
  // so they are compared on the flags of the drag law's range where the form was not used.
  std::mt19937_64 rng(20261203);
  int flagged = 0, compared = 0;
  for (int i = 0; i < 200; ++i) {
    test::RandomFlight f = test::draw_flight(rng);
    SCOPED_TRACE("flight " + std::to_string(i) + ": " + f.description);
    TrajectoryRecorder recorder;
    const auto result = fly(f.body, f.environment, f.release, {}, &recorder);
    if (result.quasi_steady) continue;
    ++compared;
    const RegimeExtent exact = brute_force(recorder, f.body, f.environment);
    constexpr std::uint8_t kLaw =
        kReynoldsAboveLaw | kReynoldsBelowLaw | kMachBeyondTable | kMachWithoutTable;
    EXPECT_EQ(result.regime.flags & kLaw, exact.flags);
    if (exact.flags & (kReynoldsAboveLaw | kReynoldsBelowLaw)) {
      // The recorder evaluates the same points; its Reynolds numbers are computed by its own
      // code, so equal to rounding.
      EXPECT_NEAR(result.regime.reynolds_beyond, exact.reynolds_beyond,
                  1e-9 * exact.reynolds_beyond);
    }
    if (exact.flags & (kMachBeyondTable | kMachWithoutTable)) {
      EXPECT_NEAR(result.regime.mach_beyond, exact.mach_beyond, 1e-9 * exact.mach_beyond);
    }
    EXPECT_EQ(result.regime.altitude_max, exact.altitude_max);
    flagged += exact.flags != 0;
  }
  // The family reaches both sides: some flights leave a range, most do not.
  EXPECT_GT(flagged, 10);
  EXPECT_GT(compared - flagged, 10);
}

TEST(ModelRange, LongFlightsAreFlagged) {
  // A small body under a large canopy from 28 km falls for hours.
  const Calm calm;
  Body gondola = test::area_body(5.0, 1.0, 0.2);
  gondola.has_canopy = true;
  gondola.canopy.trigger = Canopy::Trigger::time;
  gondola.canopy.deploy_after = 0.0;
  gondola.canopy.drag_area = 60.0;
  const auto result = fly(gondola, calm.environment, test::release_at(0, 0, 28000, 0, 0, 0));
  ASSERT_EQ(result.status, FlightStatus::landed);
  EXPECT_GT(result.time, kLongFlightTime);
  EXPECT_TRUE(result.regime.flags & kLongFlight);
  const Body bundle = test::area_body(95.0, 1.05, 0.55);
  EXPECT_FALSE(fly(bundle, calm.environment, test::release_at(0, 0, 3000, 60, 0, 0)).regime.flags &
               kLongFlight);
}

// The estimates of what the flat, non-rotating frame leaves out, against the same flights flown
// by the independent reference with that left-out physics put back: the estimate must not fall
// short of the true shift of the impact, and must be of its order where one effect dominates.
struct FrameCase {
  const char* name;
  Body body;
  ReleaseState release;
  WindProfile wind;
};

TEST(ModelRange, FrameOffsetsBoundTheShiftsOfARoundRotatingEarth) {
  const Medium medium = Medium::us1976();
  Body canopy = test::area_body(95.0, 1.05, 0.55);
  canopy.has_canopy = true;
  canopy.canopy.deploy_after = 2.0;
  canopy.canopy.drag_area = 60.0;
  const Body debris = test::round_body(SphereDrag(0.15), 2700.0);
  const std::vector<FrameCase> cases{
      // A bundle under canopy drifting 6 km in a strong wind: the ground curving away dominates.
      {"drifting canopy", canopy, test::release_at(0, 0, 3000, 0, 0, 0),
       WindProfile({{0.0, 15.0, 270.0}, {3000.0, 25.0, 270.0}}, 0.0)},
      // A free-falling bundle: Earth's rotation dominates, bounded by the drag.
      {"free fall", test::area_body(95.0, 1.05, 0.55), test::release_at(0, 0, 3000, 60, 0, 0),
       WindProfile({{0.0, 5.0, 270.0}, {3000.0, 12.0, 270.0}}, 0.0)},
      // A fragment thrown fast and far: ballistic for most of its flight.
      {"ballistic fragment", debris, test::release_at(0, 0, 9000, 700, 300, 100), WindProfile()},
  };
  for (const auto& c : cases) {
    SCOPED_TRACE(c.name);
    const Environment environment{&medium, {}, &c.wind, 0.0};
    const auto flat = test::reference_fly(c.body, environment, c.release, 1e-10);
    FlightOptions options;
    options.tolerance = 0.001;
    const auto ours = fly(c.body, environment, c.release, options);
    ASSERT_EQ(ours.status, FlightStatus::landed);
    // Earth's rotation at latitude 60 degrees (both components of the spin matter there).
    test::ReferenceFrame rotating;
    rotating.rotating = true;
    rotating.latitude = 60.0;
    const auto turned = test::reference_fly(c.body, environment, c.release, 1e-10, 1e6, rotating);
    const double rotation = (turned.position - flat.position).head<2>().norm();
    EXPECT_LE(rotation, ours.rotation_offset);
    test::ReferenceFrame round;
    round.spherical = true;
    const auto curved = test::reference_fly(c.body, environment, c.release, 1e-10, 1e6, round);
    const double curvature = (curved.position - flat.position).head<2>().norm();
    EXPECT_LE(curvature, ours.curvature_offset);
    std::printf("  %-20s rotation %.3g m (estimate %.3g), curvature %.3g m (estimate %.3g)\n",
                c.name, rotation, ours.rotation_offset, curvature, ours.curvature_offset);
    // Where an effect dominates, the estimate is of its order (within a factor of 10).
    if (std::string(c.name) == "drifting canopy") {
      EXPECT_GE(curvature, 0.1 * ours.curvature_offset);
    } else {
      EXPECT_GE(rotation, 0.1 * ours.rotation_offset);
    }
  }
}

}  // namespace
}  // namespace strewn
