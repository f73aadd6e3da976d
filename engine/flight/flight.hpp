#pragma once
// One flight from release to ground contact: the integrator (dormand_prince.hpp), the forces
// (forces.hpp) and event location composed.
//
// Events (ground contact, deployment by height) are located on the dense output by bracketing
// root finding (Alefeld-Potra-Shi TOMS 748 from Boost.Math), never by clipping a step; time events
// (deployment by time, end of canopy filling) end a step exactly on them. At each event the
// integrator restarts, so the forces are smooth inside every step.
//
// Accuracy: `tolerance` (m) is the target error of the impact point. Each step's local error is
// held below kPositionShare x tolerance x h / T in every position component (and that over
// kVelocityTime in every velocity component), with T an estimate of the time left to fall
// (error per unit step): errors that add up over thousands of steps of a slow canopy descent
// still sum to a share of the tolerance. Calibrated on 120 random flights against an
// independent Boost.Odeint integration (tests/unit/flight_reference_test.cpp): the worst impact
// error is a fifth of the tolerance (0.19), at 0.5, 0.05 and 0.005 m.
//
// Small bodies: when the velocity relaxation time tau = v_t / g_eff is so short that
// tau * dV <= tolerance / 4 (dV, the wind's largest change plus the change of v_t down to the
// ground, bounds the change of the quasi-steady velocity over the fall, so tau dV bounds the lag
// error), the full equations are integrated for 10 tau (the release transient decays to e^-10)
// and the rest of the fall uses the quasi-steady form. Not used during parachute stages.
//
// Every flight ends: a step cap, a flight-time cap, and a status per flight.
#include <array>
#include <cstdint>
#include <limits>
#include <utility>

#include "core/enum_names.hpp"
#include "flight/body.hpp"
#include "flight/forces.hpp"
#include "flight/model_range.hpp"

namespace strewn {

enum class FlightStatus : std::uint8_t {
  landed = 0,          ///< reached the ground
  step_limit = 1,      ///< more steps than FlightOptions::max_steps
  time_limit = 2,      ///< still airborne after FlightOptions::max_time (e.g. a slow droplet)
  step_too_small = 3,  ///< the integrator could not meet the tolerance
  non_finite = 4,      ///< NaN or infinity in the state or forces
  floats = 5,          ///< lighter than the medium at the ground: it can never land
  off_terrain = 6,     ///< came down where the terrain has no height (beyond the raster read, or
                       ///< on posts without data): where it lands is not known
};
template <>
struct EnumNames<FlightStatus> {
  static constexpr std::array names{std::pair{FlightStatus::landed, "landed"},
                                    std::pair{FlightStatus::step_limit, "step_limit"},
                                    std::pair{FlightStatus::time_limit, "time_limit"},
                                    std::pair{FlightStatus::step_too_small, "step_too_small"},
                                    std::pair{FlightStatus::non_finite, "non_finite"},
                                    std::pair{FlightStatus::floats, "floats"},
                                    std::pair{FlightStatus::off_terrain, "off_terrain"}};
};
inline const char* to_string(FlightStatus status) {
  return name_of(status);
}

struct FlightOptions {
  double tolerance = 0.05;  ///< m, target accuracy of the impact point
  long max_steps = 200000;
  double max_time = 1.0e7;  ///< s
  bool allow_quasi_steady = true;
  /// > 0: the observer also receives dense-output points this far apart in time (s).
  double record_interval = 0.0;

  /// Share of the tolerance allowed per unit step in each position component.
  static constexpr double kPositionShare = 0.5;
  /// Velocity errors are weighted as position errors after this long (s).
  static constexpr double kVelocityTime = 1.0;
  /// Quasi-steady switch: tau * dV <= tolerance * kQuasiSteadyShare.
  static constexpr double kQuasiSteadyShare = 0.25;
  static constexpr double kTransientRelaxationTimes = 10.0;
};

struct FlightResult {
  FlightStatus status = FlightStatus::landed;
  double time = 0.0;             ///< s from release to impact (or to the end)
  Vec3 position = Vec3::Zero();  ///< impact point (m; z is the ground elevation)
  Vec3 velocity = Vec3::Zero();  ///< ground-relative velocity at impact, m/s
  double speed = 0.0;            ///< |velocity|, m/s
  double energy = 0.0;           ///< 1/2 m speed^2, J
  double angle = 0.0;            ///< degrees below the horizontal at impact
  double slope = 0.0;            ///< degrees: the ground's steepest slope at the impact point
  /// Degrees between the impact velocity and the ground's surface there (90: square onto it).
  double surface_angle = 0.0;
  double deploy_time = std::numeric_limits<double>::quiet_NaN();  ///< s, NaN: no deployment
  long steps = 0;
  long evaluations = 0;
  bool quasi_steady = false;  ///< the quasi-steady form was used for part of the fall
  /// The Reynolds and Mach numbers met where the drag law was judged, the highest altitude, and
  /// where the flight left its models' ranges (model_range.hpp).
  RegimeExtent regime;
  /// Landed flights: estimates of what the flat ground (curvature) and the non-rotating frame
  /// (Earth's rotation) leave out of the impact point, m (model_range.hpp); 0 otherwise.
  double curvature_offset = 0.0;
  double rotation_offset = 0.0;
};

/// One point of a recorded trajectory.
struct TrajectoryPoint {
  double time;
  Vec3 position;
  Vec3 velocity;
  DragStage stage;
  bool quasi_steady;
};

/// Receives the trajectory (optional; `trace` records, studies do not).
class FlightObserver {
 public:
  virtual ~FlightObserver() = default;
  virtual void record(const TrajectoryPoint& point, const Forces& forces) = 0;
};

/// Flies one body from release to the ground. Never throws for numerical trouble: the result's
/// status says how it ended. Allocates nothing (unless an observer does).
FlightResult fly(const Body& body, const Environment& environment, const ReleaseState& release,
                 const FlightOptions& options = {}, FlightObserver* observer = nullptr);

}  // namespace strewn
