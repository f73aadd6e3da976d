#pragma once
// An independent reference integration of the same physics: Boost.Odeint's Dormand-Prince 5(4)
// with dense output at a tight tolerance. Only the forces (forces.hpp) are shared with strewn;
// the stepping, step control, event location (TOMS 748 from Boost.Math on Odeint's dense output)
// and stage handling are Odeint's and this file's. Used by the tests and by the benchmark.
#include <Eigen/Geometry>
#include <array>
#include <boost/math/tools/toms748_solve.hpp>
#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <functional>
#include <limits>

#include "flight/flight.hpp"

namespace strewn::test {

using OdeState = std::array<double, 6>;

struct ReferenceImpact {
  double time = 0.0;
  Vec3 position = Vec3::Zero();
  Vec3 velocity = Vec3::Zero();
  bool landed = false;
  long steps = 0;
  double deploy_time = std::numeric_limits<double>::quiet_NaN();  ///< s, NaN: no deployment
};

/// What the flat, non-rotating frame of strewn leaves out, put back for the reference:
/// - `rotating`: the Coriolis acceleration -2 Omega x v of a frame turning with the Earth at
///   `latitude` (Omega = kEarthRotationRate along the axis, (0, cos lat, sin lat) in east, north,
///   up; the centrifugal part is absorbed in g, as usual);
/// - `spherical`: a round Earth of radius constants::earth_radius under the site's origin:
///   altitude is the distance from its centre less the radius, gravity points to the centre, and
///   the ground lies at site.ground above that sphere.
/// - `ground`: a ground of height(east, north), m above mean sea level, instead of the
///   environment's (level) one; not with `spherical`.
struct ReferenceFrame {
  bool rotating = false;
  double latitude = 0.0;  ///< degrees
  bool spherical = false;
  std::function<double(double, double)> ground;
};

inline ReferenceImpact reference_fly(const Body& body, const Environment& environment,
                                     const ReleaseState& release, double tolerance = 1e-10,
                                     double max_time = 1e6, const ReferenceFrame& frame = {}) {
  namespace odeint = boost::numeric::odeint;
  Forces forces(body, environment);
  const double r0 = constants::earth_radius;
  // Height above mean sea level of a state: z, or on the sphere the distance from its centre
  // (at (0, 0, -r0)) less r0.
  auto altitude = [&](const OdeState& x) {
    return frame.spherical ? std::sqrt(x[0] * x[0] + x[1] * x[1] + (x[2] + r0) * (x[2] + r0)) - r0
                           : x[2];
  };
  const double omega = kEarthRotationRate, lat = frame.latitude * constants::degree;
  const Vec3 spin(0.0, omega * std::cos(lat), omega * std::sin(lat));
  auto rhs = [&](const OdeState& x, OdeState& dxdt, double t) {
    FlightState y = Eigen::Map<const FlightState>(x.data());
    const double h = altitude(x);
    FlightState at = y;
    at[2] = h;  // the air, the wind and the size of gravity at the true height
    FlightState d;
    forces(t, at, d);
    d.head<3>() = y.tail<3>();
    if (frame.spherical) {
      // Gravity toward the centre instead of straight down.
      const double g = forces.effective_gravity(h);
      const Vec3 radial = Vec3(x[0], x[1], x[2] + r0).normalized();
      d[5] += g;
      d.tail<3>() -= g * radial;
    }
    if (frame.rotating) d.tail<3>() -= 2.0 * spin.cross(Vec3(y[3], y[4], y[5]));
    Eigen::Map<FlightState>(dxdt.data()) = d;
  };
  auto stepper =
      odeint::make_dense_output(tolerance, tolerance, odeint::runge_kutta_dopri5<OdeState>());
  OdeState x{release.position.x(), release.position.y(), release.position.z(),
             release.velocity.x(), release.velocity.y(), release.velocity.z()};
  const double level = lowest_ground(environment.ground);
  auto ground_at = [&](const OdeState& at) {
    return frame.ground ? frame.ground(at[0], at[1]) : level;
  };
  const Canopy& canopy = body.canopy;
  const bool opens = body.has_canopy && canopy.state != CanopyState::failed;
  double deploy_time = std::numeric_limits<double>::infinity();
  bool watch_height = false;
  if (opens) {
    if (canopy.trigger == Canopy::Trigger::time)
      deploy_time = canopy.deploy_after;
    else if (x[2] - ground_at(x) <= canopy.deploy_height)
      deploy_time = 0.0;
    else
      watch_height = true;
  }
  DragStage stage = DragStage::body;
  double fill_end = std::numeric_limits<double>::infinity();
  ReferenceImpact impact;
  auto deploy = [&](double when) {
    impact.deploy_time = when;
    if (canopy.fill_time > 0.0) {
      stage = DragStage::filling;
      fill_end = when + canopy.fill_time;
      forces.set_stage(stage, canopy.drag_area, when, canopy.fill_time);
    } else {
      stage = DragStage::canopy;
      forces.set_stage(stage, canopy.drag_area);
    }
  };
  forces.set_stage(DragStage::body);
  if (deploy_time == 0.0) deploy(0.0);
  stepper.initialize(x, 0.0, 1e-4);
  // The time in [a, b] where the height above the ground crosses `clearance`, on Odeint's
  // dense output.
  auto bisect = [&](double a, double b, double clearance) {
    OdeState s;
    auto offset = [&](double t) {
      stepper.calc_state(t, s);
      return altitude(s) - (ground_at(s) + clearance);
    };
    const double fa = offset(a), fb = offset(b);
    if (fb == 0.0) return b;
    if ((fa > 0.0) == (fb > 0.0)) return a;
    std::uintmax_t iterations = 100;
    const auto root = boost::math::tools::toms748_solve(
        offset, a, b, fa, fb, boost::math::tools::eps_tolerance<double>(50), iterations);
    return 0.5 * (root.first + root.second);
  };
  while (stepper.current_time() < max_time) {
    const auto [t0, t1] = stepper.do_step(rhs);
    ++impact.steps;
    // Events inside (t0, t1], earliest first: ground, deployment height, time events.
    const double next_time_event = stage == DragStage::body ? deploy_time
                                   : stage == DragStage::filling
                                       ? fill_end
                                       : std::numeric_limits<double>::infinity();
    double event_time = std::numeric_limits<double>::infinity();
    int event = 0;  // 1 ground, 2 deployment height, 3 time event
    OdeState end = stepper.current_state();
    if (altitude(end) <= ground_at(end)) {
      event_time = bisect(t0, t1, 0.0);
      event = 1;
    }
    if (watch_height && stage == DragStage::body &&
        altitude(end) <= ground_at(end) + canopy.deploy_height) {
      const double te = bisect(t0, t1, canopy.deploy_height);
      if (te < event_time) {
        event_time = te;
        event = 2;
      }
    }
    if (next_time_event <= t1 && next_time_event < event_time) {
      event_time = next_time_event;
      event = 3;
    }
    if (event == 0) continue;
    OdeState s;
    stepper.calc_state(event_time, s);
    if (event == 1) {
      impact.time = event_time;
      impact.position = Vec3(s[0], s[1], frame.spherical ? s[2] : ground_at(s));
      impact.velocity = Vec3(s[3], s[4], s[5]);
      impact.landed = true;
      return impact;
    }
    if (stage == DragStage::body)
      deploy(event_time);
    else {
      stage = DragStage::canopy;
      forces.set_stage(stage, canopy.drag_area);
    }
    stepper.initialize(s, event_time, 1e-4);
  }
  return impact;
}

}  // namespace strewn::test
