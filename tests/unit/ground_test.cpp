// Flights over a ground that is not level: ground contact and deployment heights are located on
// the height above the ground under the trajectory (engine/flight/events.hpp), not on a constant
// level. Checked against the independent Boost.Odeint reference (reference_flight.hpp), whose
// event location is TOMS 748 on Odeint's dense output with the same height function.
#include <gtest/gtest.h>

#include <array>
#include <cmath>

#include "flight/flight.hpp"
#include "flight/flight_run.hpp"
#include "reference_flight.hpp"
#include "support.hpp"

namespace strewn {
namespace {

// A round hill on a level plain: height base + rise exp(-d^2 / (2 width^2)), d the distance from
// its top at (east, north). A ground of the tests' own, flown through the same template as the
// registered grounds (flight_run.hpp).
struct Hill {
  static constexpr const char* name = "hill";
  static constexpr bool level = false;
  double base = 0.0, rise = 0.0, east = 0.0, north = 0.0, width = 1.0;

  [[nodiscard]] double bump(double e, double n) const {
    const double de = e - east, dn = n - north;
    return rise * std::exp(-(de * de + dn * dn) / (2.0 * width * width));
  }
  [[nodiscard]] double height(double e, double n) const { return base + bump(e, n); }
  [[nodiscard]] std::array<double, 2> slope(double e, double n) const {
    const double b = bump(e, n) / (width * width);
    return {-(e - east) * b, -(n - north) * b};
  }
  [[nodiscard]] double lowest() const { return base; }
  [[nodiscard]] double highest() const { return base + rise; }
};

struct HillDrop {
  Medium medium = Medium::us1976();
  WindProfile wind{{{300.0, 4.0, 250.0}, {1500.0, 9.0, 265.0}}, 300.0};
  Environment environment{&medium, {}, &wind, 300.0};
  ReleaseState release = test::release_at(0.0, 0.0, 300.0 + 1500.0, 62.0, 0.0, 0.0);
  Body bundle = test::area_body(95.0, 1.05, 0.55);

  // The independent reference's flight over the hill.
  [[nodiscard]] test::ReferenceImpact reference_over(const Hill& hill) const {
    test::ReferenceFrame frame;
    frame.ground = [&](double e, double n) { return hill.height(e, n); };
    return test::reference_fly(bundle, environment, release, 1e-10, 1e6, frame);
  }
};

// A bundle dropped toward a hill lands on its slope where the reference does, at the hill's
// height there, and far from where it lands on the plain without the hill.
TEST(Ground, ContactOnAHillsideIsLocatedOnTheHeightUnderTheTrajectory) {
  HillDrop d;
  const FlightResult plain = fly(d.bundle, d.environment, d.release);
  ASSERT_EQ(plain.status, FlightStatus::landed);
  // The hill's top 150 m beyond the plain's landing point, 400 m high: the bundle meets its
  // slope on the way down.
  const Eigen::Vector2d along = plain.position.head<2>().normalized();
  const Eigen::Vector2d top = plain.position.head<2>() + 150.0 * along;
  const Hill hill{300.0, 400.0, top.x(), top.y(), 250.0};
  const FlightResult result = detail::fly_over(hill, d.bundle, d.environment, d.release);
  ASSERT_EQ(result.status, FlightStatus::landed);
  const test::ReferenceImpact reference = d.reference_over(hill);
  ASSERT_TRUE(reference.landed);
  // The flight's accuracy target, 0.05 m (FlightOptions::tolerance), against the reference.
  EXPECT_LT((result.position - reference.position).norm(), 0.05);
  EXPECT_NEAR(result.time, reference.time, 0.01);
  EXPECT_NEAR(result.position.z(), hill.height(result.position.x(), result.position.y()), 1e-9);
  EXPECT_GT(result.position.z(), 300.0 + 100.0);  // on the slope, well above the plain
  // Met earlier on its way down, the hillside stops the drift short of the plain's point.
  EXPECT_GT((result.position.head<2>() - plain.position.head<2>()).norm(), 20.0);
}

// A canopy opened by height opens at that height above the hill under the body, not above the
// plain: the deployment time and the landing agree with the reference.
TEST(Ground, DeploymentHeightIsAboveTheGroundUnderTheBody) {
  HillDrop d;
  d.bundle.has_canopy = true;
  d.bundle.canopy.trigger = Canopy::Trigger::height;
  d.bundle.canopy.deploy_height = 300.0;
  d.bundle.canopy.fill_time = 2.0;
  d.bundle.canopy.drag_area = 40.0;
  // The hill stands under the release point's path: the body is over its slope at deployment.
  const Hill hill{300.0, 500.0, 250.0, 0.0, 400.0};
  const FlightResult result = detail::fly_over(hill, d.bundle, d.environment, d.release);
  ASSERT_EQ(result.status, FlightStatus::landed);
  const test::ReferenceImpact reference = d.reference_over(hill);
  ASSERT_TRUE(reference.landed);
  EXPECT_NEAR(result.deploy_time, reference.deploy_time, 1e-3);
  EXPECT_LT((result.position - reference.position).norm(), 0.05);
  // Over the plain the canopy would open later (300 m above 300 m rather than above the hill).
  const FlightResult plain = fly(d.bundle, d.environment, d.release);
  EXPECT_GT(plain.deploy_time, result.deploy_time + 1.0);
}

// A ground without relief that is not declared level takes the general path of the event
// location; it lands where the level ground does, to within a small share of the tolerance.
TEST(Ground, AFlatGroundOnTheGeneralPathLandsWhereTheLevelGroundDoes) {
  HillDrop d;
  const Hill flat{300.0, 0.0, 0.0, 0.0, 1.0};
  const FlightResult general = detail::fly_over(flat, d.bundle, d.environment, d.release);
  const FlightResult level = fly(d.bundle, d.environment, d.release);
  ASSERT_EQ(general.status, FlightStatus::landed);
  EXPECT_LT((general.position - level.position).norm(), 1e-3);
  EXPECT_EQ(level.position.z(), 300.0);
  EXPECT_EQ(general.position.z(), 300.0);
}

}  // namespace
}  // namespace strewn
