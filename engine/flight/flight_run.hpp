#pragma once
// One flight over a ground of type Ground (ground.hpp): the integrator (dormand_prince.hpp), the
// forces (forces.hpp) and the events (events.hpp) composed; see flight.hpp for the method.
// flight.cpp compiles it for every registered ground; a test may fly it over a ground of its own.
#include <algorithm>
#include <cmath>
#include <limits>
#include <span>

#include "flight/dormand_prince.hpp"
#include "flight/events.hpp"
#include "flight/flight.hpp"
#include "medium/us1976.hpp"

namespace strewn::detail {

template <class Ground>
class FlightRun {
 public:
  FlightRun(const Body& body, const Environment& environment, const Ground& ground,
            const FlightOptions& options, FlightObserver* observer)
      : body_(body),
        ground_(ground),
        lowest_ground_(ground.lowest()),
        options_(options),
        observer_(observer),
        forces_(body, environment),
        events_(ground, forces_, environment.wind->kinks(),
                body.drag.mach_table ? std::span<const double>(body.drag.mach_table->mach())
                                     : std::span<const double>()),
        limits_(model_limits(body, environment)) {}

  FlightResult run(const ReleaseState& release);

 private:
  enum class Next { ground, stage_change, quasi_steady, stop };
  using Events = FlightEvents<Ground>;

  template <class Stepper, class State>
  Next integrate(Stepper& stepper, State& y, double& t, double t_stop, bool watch_deploy_height);
  void finish_landing(double t, const Vec3& position, const Vec3& velocity);
  // Come down where the ground has no height (beyond a terrain read, or on posts without data;
  // no surface can be met above its highest post): where it would land is not known.
  template <class State>
  [[nodiscard]] bool off_terrain(const State& y) const {
    if constexpr (Ground::level)
      return false;
    else
      return y[2] <= ground_.highest() && std::isnan(events_.ground_under(y[0], y[1]));
  }
  void record(double t, const Vec3& position, const Vec3& velocity, bool quasi) {
    if (observer_) observer_->record({t, position, velocity, forces_.stage(), quasi}, forces_);
  }
  [[nodiscard]] bool quasi_steady_eligible(double z) const;
  // The rest of the fall in the quasi-steady form, on positions only; returns its evaluations.
  long fly_quasi_steady(FlightState& y, double& t, double position_tolerance);
  // A flight that ends where it starts: non-finite, released on the ground, or lighter than the
  // medium. Sets the result and returns true then.
  bool ends_at_release(const FlightState& y, const ReleaseState& release);
  // The canopy plan: a deployment time when known in advance, or a deployment height to watch.
  struct CanopyPlan {
    bool opens = false, watch_height = false;
    double deploy_time = std::numeric_limits<double>::infinity();
  };
  [[nodiscard]] CanopyPlan plan_canopy(const FlightState& y) const;
  // Where the current stage's integration stops, from time t at altitude z: the deployment (of
  // the body stage), the end of filling, the time cap, or, for a body that may settle
  // quasi-steadily, the end of its release transient (then `quasi_next` is set).
  double stage_end(DragStage stage, double z, double t, double deploy_time, double fill_end,
                   bool may_settle, bool& quasi_next) const;
  [[nodiscard]] double remaining_time_estimate(double z) const;

  // The model-range watch (model_range.hpp) at a point of the flight: the highest altitude, and
  // the Reynolds and Mach numbers of the body's own drag law where its drag is at least
  // kDragShareWatched of the weight, while that law acts (not under an open canopy). The air
  // speed lies within the body's speed plus or minus the strongest wind, so a point whose speed
  // keeps it inside the screen (set_screen) is in range without any look-up.
  void watch(const FlightState& y) {
    const double z = y[2];
    RegimeExtent& r = result_.regime;
    if (z > r.altitude_max) {
      r.altitude_max = z;
      if (z > screen_top_) set_screen(z);
    }
    if (forces_.stage() == DragStage::canopy) return;
    const double v2 = y[3] * y[3] + y[4] * y[4] + y[5] * y[5];
    if (!judge_every_point_ && v2 >= screen_low_ * screen_low_ && v2 <= screen_high_ * screen_high_)
      return;
    double wind_east, wind_north;
    forces_.wind().at(z, wind_east, wind_north);
    judge(z, Vec3(y[3] - wind_east, y[4] - wind_north, y[5]).norm());
  }
  // The quasi-steady form: the body settles at its terminal speed relative to the air.
  void watch(const PositionState& y) {
    RegimeExtent& r = result_.regime;
    if (y[2] > r.altitude_max) r.altitude_max = y[2];
    judge(y[2], forces_.terminal_speed(y[2]));
  }
  // The exact check of the drag law at air speed `speed` at altitude z.
  void judge(double z, double speed) {
    if (!(speed > 0.0)) return;
    const Air air = forces_.air().air(z);
    const DragLaw& law = forces_.drag();
    if (!(law.coefficient(speed, air) * speed >= judged_drag_)) return;
    RegimeExtent& r = result_.regime;
    const double re = air.density * speed * law.length() / air.viscosity;
    if (re > limits_.reynolds_max) {
      r.flags |= kReynoldsAboveLaw;
      if (!(re <= r.reynolds_beyond)) r.reynolds_beyond = re;  // NaN-safe maximum
    } else if (re < limits_.reynolds_min) {
      r.flags |= kReynoldsBelowLaw;
      if (!(re >= r.reynolds_beyond)) r.reynolds_beyond = re;  // NaN-safe minimum
    }
    const double mach = std::isfinite(air.sound_speed) ? speed / air.sound_speed : 0.0;
    if (mach > limits_.mach_max) {
      r.flags |= limits_.mach_table ? kMachBeyondTable : kMachWithoutTable;
      if (!(mach <= r.mach_beyond)) r.mach_beyond = mach;
    }
  }
  // The screen from altitude `top` down to the ground: the body's speeds between which its air
  // speed cannot leave the drag law's Reynolds range nor pass the Mach limit. The kinematic
  // viscosity mu / rho lies between the coldest viscosity over the ground's density and the
  // warmest over the density at `top` (the density falls with height), the speed of sound above
  // the coldest one's, and the air speed within the body's speed plus or minus the strongest
  // wind. Set again, higher, if the flight climbs above `top`.
  void set_screen(double top);
  // The flags of the altitudes, and for a landed flight the estimates of what the flat,
  // non-rotating frame leaves out (model_range.hpp).
  void close_regime(const Vec3& release);

  const Body& body_;
  const Ground& ground_;
  double lowest_ground_;  // m: where the air is densest and a body settles slowest
  const FlightOptions& options_;
  FlightObserver* observer_;
  Forces forces_;
  FlightEvents<Ground> events_;
  ModelLimits limits_;
  double judged_drag_ = 0.0;  // N: the drag law is judged where its drag reaches this
  // The screen of watch(): speeds (m/s) within which a point is in range, and the altitude up to
  // which they hold.
  double screen_low_ = 0.0, screen_high_ = 0.0, screen_top_ = 0.0;
  bool judge_every_point_ = false;  // the screen cannot clear any point
  FlightResult result_;
  double next_record_ = 0.0;
};

template <class Ground>
bool FlightRun<Ground>::quasi_steady_eligible(double z) const {
  if (!options_.allow_quasi_steady) return false;
  const double vt = forces_.terminal_speed(z);
  const double tau = vt / forces_.effective_gravity(z);
  if (!(std::isfinite(tau) && tau > 0.0)) return false;
  // The lag error of the quasi-steady form is tau times the change of the quasi-steady velocity
  // w(z) + v_t(z) over the rest of the fall: bounded by the wind's largest change and the change
  // of the settling speed between here and the ground.
  const double velocity_change =
      forces_.wind().max_change() + std::abs(vt - forces_.terminal_speed(lowest_ground_));
  return tau * velocity_change <= FlightOptions::kQuasiSteadyShare * options_.tolerance;
}

// Time left to fall from altitude z at the terminal speed near the ground of the current drag
// stage (the slowest it will fall there, so an overestimate for falls from high up): the
// reference time of the error-per-unit-step control. At least 1 s, at most the time cap.
template <class Ground>
double FlightRun<Ground>::remaining_time_estimate(double z) const {
  const double height = std::max(z - lowest_ground_, 0.0);
  double speed;
  if (forces_.stage() == DragStage::body) {
    speed = forces_.terminal_speed(lowest_ground_);
  } else {
    const double rho = forces_.air().density(lowest_ground_);
    speed = std::sqrt(2.0 * forces_.mass() * forces_.effective_gravity(lowest_ground_) /
                      (rho * body_.canopy.drag_area));
  }
  if (!(speed > 0.0)) return options_.max_time;  // a floating body: the longest flight
  return std::clamp(height / speed, 1.0, options_.max_time);
}

template <class Ground>
void FlightRun<Ground>::finish_landing(double t, const Vec3& position, const Vec3& velocity) {
  result_.status = FlightStatus::landed;
  result_.time = t;
  result_.position = position;
  result_.position.z() = ground_.height(position.x(), position.y());
  result_.velocity = velocity;
  result_.speed = velocity.norm();
  result_.energy = 0.5 * body_.mass * result_.speed * result_.speed;
  result_.angle = std::atan2(-velocity.z(), velocity.head<2>().norm()) / constants::degree;
  if constexpr (Ground::level) {
    result_.slope = 0.0;
    result_.surface_angle = result_.angle;
  } else {
    // The surface z = h(x, y) has the upward normal (-h_x, -h_y, 1); the velocity's angle with
    // the surface is the complement of its angle with the normal.
    const auto gradient = ground_.slope(position.x(), position.y());
    const Vec3 normal = Vec3(-gradient[0], -gradient[1], 1.0).normalized();
    result_.slope = std::acos(normal.z()) / constants::degree;
    result_.surface_angle =
        result_.speed > 0.0
            ? std::asin(std::clamp(-velocity.dot(normal) / result_.speed, -1.0, 1.0)) /
                  constants::degree
            : 90.0;
  }
}

// Advances `stepper` until the ground, a deployment height, t_stop or a failure. On return, (t, y)
// hold the state at the event. Landing fills result_.
template <class Ground>
template <class Stepper, class State>
typename FlightRun<Ground>::Next FlightRun<Ground>::integrate(Stepper& stepper, State& y, double& t,
                                                              double t_stop,
                                                              bool watch_deploy_height) {
  constexpr bool kQuasi = State::RowsAtCompileTime == 3;
  auto velocity_of = [&](const State& s, double z) -> Vec3 {
    if constexpr (kQuasi) {
      State rate;
      forces_(0.0, s, rate);
      (void)z;
      return rate;
    } else {
      (void)z;
      return s.template tail<3>();
    }
  };
  stepper.start(forces_, t, y);
  stepper.set_reference_time(remaining_time_estimate(y[2]));
  events_.restart();
  const double deploy_clearance =
      watch_deploy_height ? body_.canopy.deploy_height : std::numeric_limits<double>::quiet_NaN();
  while (true) {
    const StepOutcome outcome = stepper.step(forces_, std::min(t_stop, events_.aim(stepper)));
    if (outcome != StepOutcome::accepted) {
      result_.status = outcome == StepOutcome::non_finite ? FlightStatus::non_finite
                                                          : FlightStatus::step_too_small;
      t = stepper.t();
      y = stepper.y();
      return Next::stop;
    }
    if (++result_.steps > options_.max_steps) {
      result_.status = FlightStatus::step_limit;
      t = stepper.t();
      y = stepper.y();
      return Next::stop;
    }
    const auto event = events_.after_step(stepper, t_stop, deploy_clearance);
    if (event.kind == Events::Kind::kink) continue;  // the step is retaken to end on it
    const double z = stepper.y()[2];
    if (observer_ && options_.record_interval > 0.0) {
      for (; next_record_ < stepper.t(); next_record_ += options_.record_interval) {
        if (next_record_ <= stepper.t_previous()) continue;
        const State s = stepper.dense(next_record_);
        if (events_.offset(s, 0.0) <= 0.0) break;
        record(next_record_, s.template head<3>(), velocity_of(s, s[2]), kQuasi);
      }
    }
    if (event.kind == Events::Kind::deployment) {
      t = event.time;
      y = stepper.dense(t);
      watch(y);
      return Next::stage_change;
    }
    if (event.kind == Events::Kind::ground) {
      t = event.time;
      y = stepper.dense(t);
      watch(y);
      finish_landing(t, y.template head<3>(), velocity_of(y, y[2]));
      return Next::ground;
    }
    if (off_terrain(stepper.y())) {
      result_.status = FlightStatus::off_terrain;
      t = stepper.t();
      y = stepper.y();
      return Next::stop;
    }
    if constexpr (!kQuasi) watch(stepper.y());  // a settling fall: judged at its ends only
    if (observer_ && options_.record_interval <= 0.0)
      record(stepper.t(), stepper.y().template head<3>(), velocity_of(stepper.y(), z), kQuasi);
    if (stepper.t() >= t_stop) {
      t = t_stop;
      y = stepper.y();
      return Next::stage_change;
    }
  }
}

template <class Ground>
bool FlightRun<Ground>::ends_at_release(const FlightState& y, const ReleaseState& release) {
  if (!y.allFinite()) {
    // A release height above a ground without a height there is not finite either.
    result_.status = FlightStatus::non_finite;
    if (!Ground::level && std::isnan(events_.ground_under(y[0], y[1]))) {
      result_.status = FlightStatus::off_terrain;
      result_.position = release.position;
      result_.velocity = release.velocity;
    }
    return true;
  }
  if (events_.offset(y, 0.0) <= 0.0) {  // released on (or below) the ground
    finish_landing(0.0, release.position, release.velocity);
    return true;
  }
  // Lighter than the medium where it is densest on the way down (at the ground, for the
  // atmospheres and liquids here): it would rise or hover, never land. Said at once, rather than
  // after the step cap. The state stays at the release.
  if (!(forces_.effective_gravity(lowest_ground_) > 0.0)) {
    result_.status = FlightStatus::floats;
    result_.position = release.position;
    result_.velocity = release.velocity;
    return true;
  }
  return false;
}

template <class Ground>
typename FlightRun<Ground>::CanopyPlan FlightRun<Ground>::plan_canopy(const FlightState& y) const {
  const Canopy& canopy = body_.canopy;
  CanopyPlan plan;
  plan.opens = body_.has_canopy && canopy.state != CanopyState::failed;
  if (plan.opens) {
    if (canopy.trigger == Canopy::Trigger::time)
      plan.deploy_time = std::max(0.0, canopy.deploy_after);
    else if (y[2] - events_.ground_under(y[0], y[1]) <= canopy.deploy_height)
      plan.deploy_time = 0.0;  // released below it
    else
      plan.watch_height = true;
  }
  return plan;
}

template <class Ground>
double FlightRun<Ground>::stage_end(DragStage stage, double z, double t, double deploy_time,
                                    double fill_end, bool may_settle, bool& quasi_next) const {
  double t_stop = options_.max_time;
  quasi_next = false;
  if (stage == DragStage::body) {
    t_stop = std::min(t_stop, deploy_time);
    if (may_settle && quasi_steady_eligible(z)) {
      // Integrate the release transient in full, then switch to the quasi-steady form.
      const double tau = forces_.relaxation_time(z);
      const double switch_time = t + FlightOptions::kTransientRelaxationTimes * tau;
      if (switch_time < t_stop) {
        t_stop = switch_time;
        quasi_next = true;
      }
    }
  } else if (stage == DragStage::filling) {
    t_stop = std::min(t_stop, fill_end);
  }
  return t_stop;
}

template <class Ground>
long FlightRun<Ground>::fly_quasi_steady(FlightState& y, double& t, double position_tolerance) {
  result_.quasi_steady = true;
  PositionState tolerance = PositionState::Constant(position_tolerance);
  DormandPrince5<3> stepper(tolerance);
  PositionState r = y.head<3>();
  const Next end = integrate(stepper, r, t, options_.max_time, false);
  if (end == Next::stage_change) result_.status = FlightStatus::time_limit;
  y.head<3>() = r;
  return stepper.evaluations();
}

template <class Ground>
FlightResult FlightRun<Ground>::run(const ReleaseState& release) {
  result_ = FlightResult{};
  FlightState y;
  y << release.position, release.velocity;
  double t = 0.0;
  if (ends_at_release(y, release)) return result_;
  const Canopy& canopy = body_.canopy;
  const CanopyPlan plan = plan_canopy(y);
  const bool opens = plan.opens, watch_height = plan.watch_height;
  const double deploy_time = plan.deploy_time;

  FlightState tolerance;
  const double position_tolerance = FlightOptions::kPositionShare * options_.tolerance;
  const double velocity_tolerance = position_tolerance / FlightOptions::kVelocityTime;
  tolerance << Eigen::Vector3d::Constant(position_tolerance),
      Eigen::Vector3d::Constant(velocity_tolerance);
  DormandPrince5<6> stepper(tolerance);
  long evaluations = 0;
  next_record_ = options_.record_interval;
  record(0.0, release.position, release.velocity, false);

  // Stage sequence: body -> (deployment) filling -> (fill end) canopy.
  DragStage stage = DragStage::body;
  double fill_end = std::numeric_limits<double>::infinity();
  auto enter_deployment = [&](double when) {
    result_.deploy_time = when;
    if (canopy.fill_time > 0.0) {
      stage = DragStage::filling;
      fill_end = when + canopy.fill_time;
      forces_.set_stage(stage, canopy.drag_area, when, canopy.fill_time);
    } else {
      stage = DragStage::canopy;
      forces_.set_stage(stage, canopy.drag_area);
    }
  };
  forces_.set_stage(DragStage::body);
  judged_drag_ = kDragShareWatched * body_.mass * forces_.effective_gravity(lowest_ground_);
  set_screen(y[2]);
  watch(y);
  if (deploy_time == 0.0) enter_deployment(0.0);

  while (true) {
    bool quasi_next = false;
    const double t_stop = stage_end(stage, y[2], t, deploy_time, fill_end, !opens, quasi_next);
    const Next next = integrate(stepper, y, t, t_stop, watch_height && stage == DragStage::body);
    evaluations += stepper.evaluations();
    if (next == Next::ground || next == Next::stop) break;
    if (t >= options_.max_time) {
      result_.status = FlightStatus::time_limit;
      break;
    }
    if (quasi_next) {
      evaluations += fly_quasi_steady(y, t, position_tolerance);
      break;
    }
    // A stage boundary: deployment (by time or height) or the end of filling.
    if (stage == DragStage::body) {
      enter_deployment(t);
    } else if (stage == DragStage::filling) {
      stage = DragStage::canopy;
      forces_.set_stage(stage, canopy.drag_area);
    }
    record(t, y.head<3>(), y.tail<3>(), false);
  }
  result_.evaluations = evaluations;
  if (result_.status != FlightStatus::landed) {
    result_.time = t;
    result_.position = y.head<3>();
    result_.velocity = y.tail<3>();
  } else if (observer_) {
    record(result_.time, result_.position, result_.velocity, result_.quasi_steady);
  }
  close_regime(release.position);
  return result_;
}

template <class Ground>
void FlightRun<Ground>::set_screen(double top) {
  screen_top_ = top + 1000.0;  // a margin, so that a climbing flight sets it seldom
  const Medium& medium = forces_.medium();
  const MediumConditions& c = forces_.conditions();
  const double wind = forces_.wind().max_speed();
  const DragLaw& law = forces_.drag();
  double mu_low, mu_high, sound_low, rho_low, rho_high;
  if (medium.kind() == Medium::Kind::uniform) {
    const Air air = forces_.air().air(lowest_ground_);
    mu_low = mu_high = air.viscosity;
    sound_low = air.sound_speed;
    rho_low = rho_high = air.density;
  } else {
    const double cold = medium.lowest_temperature() + c.temperature_offset;
    const double warm = medium.highest_temperature() + c.temperature_offset;
    mu_low = us1976::sutherland_viscosity(cold);
    mu_high = us1976::sutherland_viscosity(warm);
    sound_low = us1976::sound_speed(cold);
    // rho = p / (R T'): pressure falls with height (a sounding's must, US76's does), so between
    // the ground and the top it lies between theirs, and T' between the coldest and warmest.
    const double p_high = forces_.air().pressure(lowest_ground_);
    const double p_low = forces_.air().pressure(std::min(screen_top_, medium.top()));
    constexpr double kR = constants::air_specific_gas_constant;
    rho_high = c.density_factor * p_high / (kR * cold);
    rho_low = c.density_factor * p_low / (kR * warm);
  }
  // Air speeds of the Reynolds limits, and of the Mach limit.
  const double lowest_air_speed = limits_.reynolds_min * mu_high / (rho_low * law.length());
  double highest_air_speed = limits_.reynolds_max * mu_low / (rho_high * law.length());
  if (std::isfinite(sound_low))
    highest_air_speed = std::min(highest_air_speed, limits_.mach_max * sound_low);
  // Anything not finite (no limit at all) leaves the screen wide open on that side; a NaN closes
  // it, so every point is then judged exactly.
  screen_low_ = limits_.reynolds_min > 0.0 ? lowest_air_speed + wind : 0.0;
  screen_high_ = highest_air_speed - wind;
  // Closed when the wind alone may carry the air speed past a limit, or a bound is not a number.
  judge_every_point_ = !(screen_low_ >= 0.0) || !(screen_high_ >= 0.0);
}

template <class Ground>
void FlightRun<Ground>::close_regime(const Vec3& release) {
  RegimeExtent& r = result_.regime;
  if (r.altitude_max > limits_.medium_top) r.flags |= kAboveMedium;
  if (r.altitude_max > limits_.wind_top) r.flags |= kAboveWind;
  if (result_.time > kLongFlightTime) r.flags |= kLongFlight;
  if (result_.status != FlightStatus::landed) return;
  // Curvature: R^2 / (2 r0 tan(theta)), tan(theta) = vertical over horizontal impact speed (kept
  // above 1e-3 so that a grazing impact gives a large but finite figure).
  const double range = (result_.position.head<2>() - release.head<2>()).norm();
  const double horizontal = result_.velocity.head<2>().norm();
  const double vertical = std::max(-result_.velocity.z(), 1e-3 * horizontal);
  result_.curvature_offset =
      horizontal > 0.0 ? range * range / (2.0 * constants::earth_radius) * horizontal / vertical
                       : 0.0;
  // Gravity toward the Earth's centre leans back toward the origin by x / r0 at a range x <= R:
  // a drag-bound body drifts by at most g tau R T / r0, a ballistic one by g R T^2 / (2 r0).
  const double time = result_.time, tau_fall = result_.speed / constants::g0;
  result_.curvature_offset +=
      constants::g0 * range * time * std::min(tau_fall, 0.5 * time) / constants::earth_radius;
  // Earth's rotation: 2 Omega L min(tau, T / 2), tau = impact speed / g0.
  const double path = range + std::max(events_.offset(release, 0.0), 0.0) +
                      2.0 * std::max(r.altitude_max - release.z(), 0.0);
  const double tau = result_.speed / constants::g0;
  result_.rotation_offset = 2.0 * kEarthRotationRate * path * std::min(tau, 0.5 * result_.time);
  if (std::max(result_.curvature_offset, result_.rotation_offset) > options_.tolerance)
    r.flags |= kFrameOffset;
}

/// Flies one body over `ground` (the environment's ground is not read).
template <class Ground>
FlightResult fly_over(const Ground& ground, const Body& body, const Environment& environment,
                      const ReleaseState& release, const FlightOptions& options = {},
                      FlightObserver* observer = nullptr) {
  FlightRun<Ground> run(body, environment, ground, options, observer);
  return run.run(release);
}

}  // namespace strewn::detail
