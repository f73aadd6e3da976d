#pragma once
// Where a flight's events fall, in one place: the kinks of the forces (the wind profile's layer
// altitudes, the Mach numbers where a Mach table's slope changes), the deployment height and the
// ground contact. All are located on the stepper's dense output after each accepted step, and
// foreseen on the last step's polynomial before the next (so that a step ends on them rather than
// being retaken):
// - a kink crossed inside a step by more than a sliver: the step is rewound and retaken to end on
//   it, so that the forces are smooth inside every step and the error estimate honest;
// - a deployment height or the ground: the surface `clearance` m above the ground, z = h(x, y) + c,
//   is located by Newton steps on the dense output (with the ground's slope in the derivative),
//   kept inside the bracket of the step; the integrator restarts there. A crossing is seen where a
//   step ends below the surface: a ridge of a ground that is not level, passed under the body
//   within one step with both ends above it, is not.
// A ground that is `level` (ground.hpp) is one altitude, located as the kinks are.
//
// Bracketing root finding: Newton with bisection safeguard for the altitude surfaces, Alefeld-
// Potra-Shi TOMS 748 (Boost.Math) for the Mach kinks.
#include <algorithm>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <limits>
#include <span>

#include "flight/forces.hpp"

namespace strewn {

template <class Ground>
class FlightEvents {
 public:
  enum class Kind { none, kink, deployment, ground };
  struct Event {
    Kind kind = Kind::none;
    double time = std::numeric_limits<double>::quiet_NaN();
  };
  static constexpr double kNone = std::numeric_limits<double>::quiet_NaN();

  FlightEvents(const Ground& ground, const Forces& forces, std::span<const double> kinks,
               std::span<const double> mach_kinks)
      : ground_(ground), forces_(forces), kinks_(kinks), mach_kinks_(mach_kinks) {}

  /// Height of the surface `clearance` m above the ground under a position, less the position's
  /// altitude: negative once the body is below that surface.
  template <class State>
  [[nodiscard]] double offset(const State& y, double clearance) const {
    return y[2] - (ground_.height(y[0], y[1]) + clearance);
  }
  [[nodiscard]] double ground_under(double east, double north) const {
    return ground_.height(east, north);
  }

  /// Forgets a pending retake (a new stage or form begins).
  void restart() { kink_stop_ = std::numeric_limits<double>::infinity(); }

  /// Where the next step should end at the latest: on the kink of a retaken step, or on the first
  /// kink or ground contact foreseen on the last step's polynomial (infinity for none).
  template <class Stepper>
  [[nodiscard]] double aim(const Stepper& stepper) const {
    return std::isfinite(kink_stop_) ? kink_stop_ : foresee(stepper);
  }

  /// The first event of the last accepted step: a kink crossed (the step is then rewound, to be
  /// retaken), the deployment height `deploy_clearance` above the ground (NaN: none watched), the
  /// ground, or a ground contact just past the step's end (the step having been aimed at it).
  template <class Stepper>
  Event after_step(Stepper& stepper, double t_stop, double deploy_clearance) {
    if (stepper.t() >= kink_stop_)
      kink_stop_ = std::numeric_limits<double>::infinity();
    else if (retake_to_kink(stepper))
      return {Kind::kink, kink_stop_};
    // The deployment height lies above the ground, so it is crossed first. (Above the ground's
    // highest point plus the clearance no surface is crossed: no height is looked up there.)
    const double z = stepper.y()[2];
    if (!std::isnan(deploy_clearance) && !clear_of(z, deploy_clearance) &&
        offset(stepper.y(), deploy_clearance) <= 0.0)
      return {Kind::deployment, locate(stepper, deploy_clearance)};
    if (!clear_of(z, 0.0) && offset(stepper.y(), 0.0) <= 0.0)
      return {Kind::ground, locate(stepper, 0.0)};
    // (Not while a deployment height is watched: the deployment comes first, however close.)
    if (std::isnan(deploy_clearance))
      if (const double landing = landing_just_ahead(stepper, t_stop); !std::isnan(landing))
        return {Kind::ground, landing};
    return {};
  }

 private:
  // Whether altitude z lies above the surface `clearance` above the ground everywhere (above its
  // highest point): a cheap screen before the ground's height is looked up. Never for a level
  // ground, whose height costs nothing.
  [[nodiscard]] bool clear_of(double z, double clearance) const {
    if constexpr (Ground::level)
      return false;
    else
      return z > ground_.highest() + clearance;
  }

  // The offset from the surface `clearance` above the ground of the dense output at t, and its
  // time derivative (the exact derivative of the polynomials, the ground's slope included).
  template <class Stepper>
  [[nodiscard]] double dense_offset(const Stepper& s, double clearance, double t) const {
    if constexpr (Ground::level) return s.dense(2, t) - (ground_.height(0.0, 0.0) + clearance);
    return s.dense(2, t) - (ground_.height(s.dense(0, t), s.dense(1, t)) + clearance);
  }
  template <class Stepper>
  [[nodiscard]] double dense_offset_rate(const Stepper& s, double t) const {
    if constexpr (Ground::level) return s.dense_rate(2, t);
    const auto slope = ground_.slope(s.dense(0, t), s.dense(1, t));
    return s.dense_rate(2, t) - (slope[0] * s.dense_rate(0, t) + slope[1] * s.dense_rate(1, t));
  }

  // The time in [a, b] at which the dense output reaches the surface `clearance` above the
  // ground, given its offsets fa, fb from it at the ends (of opposite signs). Newton steps with
  // the polynomial's exact derivative, kept inside the bracket (a bisection when a step leaves
  // it), to `precision` seconds. The bracket may lie beyond the last step: the polynomial then
  // extrapolates.
  template <class Stepper>
  double solve(const Stepper& s, double clearance, double a, double b, double fa, double fb,
               double precision) const {
    if (fb == 0.0) return b;
    if (fa == 0.0 || (fa > 0.0) == (fb > 0.0)) return a;
    double t = a + (b - a) * fa / (fa - fb);  // regula falsi start
    for (int i = 0; i < 60; ++i) {
      const double f = dense_offset(s, clearance, t);
      if (f == 0.0) return t;
      if ((f > 0.0) == (fa > 0.0)) {
        a = t;
        fa = f;
      } else {
        b = t;
      }
      double next = t - f / dense_offset_rate(s, t);
      if (!(next > a && next < b)) next = 0.5 * (a + b);
      if (std::abs(next - t) <= precision || b - a <= precision) return next;
      t = next;
    }
    return t;
  }
  // Time within the last step at which the body reaches the surface (to a few ulps of the time).
  template <class Stepper>
  double locate(const Stepper& s, double clearance) const {
    return solve(s, clearance, s.t_previous(), s.t(), offset(s.y_previous(), clearance),
                 offset(s.y(), clearance), kTimePrecision * std::max(1.0, s.t()));
  }
  // The same for an altitude level (a kink of the wind profile).
  template <class Stepper>
  double locate_altitude(const Stepper& s, double level) const {
    return solve_altitude(s, level, s.t_previous(), s.t(), s.y_previous()[2] - level,
                          s.y()[2] - level, kTimePrecision * std::max(1.0, s.t()));
  }
  template <class Stepper>
  double solve_altitude(const Stepper& s, double level, double a, double b, double fa, double fb,
                        double precision) const {
    // An altitude is the surface `level` above a level ground at 0.
    const FlightEvents<LevelGround> sea(sea_level_, forces_, {}, {});
    return sea.solve(s, level, a, b, fa, fb, precision);
  }

  template <class Stepper>
  double foresee(const Stepper& stepper) const;
  template <class Stepper>
  bool retake_to_kink(Stepper& stepper);
  template <class Stepper>
  double landing_just_ahead(const Stepper& stepper, double t_stop) const;

  // Mach number of a full state.
  [[nodiscard]] double mach_of(const FlightState& y) const {
    const Air air = forces_.air().air(y[2]);
    const Eigen::Vector2d w = forces_.wind().at(y[2]);
    const Vec3 u(y[3] - w.x(), y[4] - w.y(), y[5]);
    return u.norm() / air.sound_speed;
  }

  template <class>
  friend class FlightEvents;

  static constexpr double kTimePrecision = 4.0 * std::numeric_limits<double>::epsilon();
  static constexpr double kMachKinkTolerance = 1e-9;
  // A step whose end (or start) lies within this share of its altitude change from a kink is
  // kept rather than retaken: a sliver of a share s of a step h past a slope jump J of the forces
  // costs about 0.13 J s h^2 (the weight of the last stages), negligible for s = 1e-3.
  static constexpr double kSliver = 1e-3;

  const Ground& ground_;
  const Forces& forces_;
  std::span<const double> kinks_;
  std::span<const double> mach_kinks_;
  double kink_stop_ = std::numeric_limits<double>::infinity();
  static constexpr LevelGround sea_level_{0.0};
};

// When the last step crossed a kink of the forces (a wind-profile layer altitude, or a Mach
// number where the Mach table's slope changes), rewinds it and sets kink_stop_ so that the step
// is retaken to end on the first such crossing; true when it did.
template <class Ground>
template <class Stepper>
bool FlightEvents<Ground>::retake_to_kink(Stepper& stepper) {
  const double z0 = stepper.y_previous()[2], z1 = stepper.y()[2];
  double first = std::numeric_limits<double>::infinity();
  const double low = std::min(z0, z1), high = std::max(z0, z1);
  for (double kink : kinks_) {
    const double sliver = kSliver * (high - low);
    // Kinks at or below the ground count too: the step that lands reaches below the ground,
    // and its dense output locates the impact.
    if (!(kink > low && kink < high) || std::abs(z0 - kink) <= sliver ||
        std::abs(z1 - kink) <= sliver)
      continue;
    first = std::min(first, locate_altitude(stepper, kink));
  }
  if constexpr (Stepper::State::RowsAtCompileTime == 6) {
    if (!mach_kinks_.empty() && forces_.stage() != DragStage::canopy) {
      const double m0 = mach_of(stepper.y_previous()), m1 = mach_of(stepper.y());
      for (double kink : mach_kinks_) {
        if (!(kink > std::min(m0, m1) && kink < std::max(m0, m1)) ||
            std::abs(m0 - kink) < kMachKinkTolerance)
          continue;
        auto offset = [&](double t) { return mach_of(stepper.dense(t)) - kink; };
        std::uintmax_t iterations = 60;
        const auto root = boost::math::tools::toms748_solve(
            offset, stepper.t_previous(), stepper.t(), m0 - kink, m1 - kink,
            boost::math::tools::eps_tolerance<double>(50), iterations);
        first = std::min(first, 0.5 * (root.first + root.second));
      }
    }
  }
  if (!(first > stepper.t_previous() && first < stepper.t())) return false;
  stepper.rewind();
  kink_stop_ = first;
  return true;
}

// Foresight for the wind kinks and the ground: the last step's dense-output polynomial,
// extrapolated over the next proposed step, predicts whether the step will cross a layer
// altitude (or the ground) and when. The step is then cut to end there; the prediction is close
// enough that the step which follows starts on the kink but for a sliver. retake_to_kink still
// catches any step that crosses a kink by more than a sliver. Returns the aimed time (infinity
// when no crossing is foreseen).
template <class Ground>
template <class Stepper>
double FlightEvents<Ground>::foresee(const Stepper& stepper) const {
  constexpr double kNever = std::numeric_limits<double>::infinity();
  if (stepper.steps() == 0 || !(stepper.t() > stepper.t_previous())) return kNever;
  const double z = stepper.y()[2];
  const double t_end = stepper.t() + stepper.proposed_step();
  const double z_end = stepper.dense(2, t_end);
  double target = std::numeric_limits<double>::quiet_NaN();
  const double sliver = kSliver * std::abs(z_end - z);
  auto consider = [&](double level) {
    if (std::abs(level - z) <= sliver) return;
    if ((level - z) * (level - z_end) < 0.0 &&
        (std::isnan(target) || std::abs(level - z) < std::abs(target - z)))
      target = level;
  };
  for (double kink : kinks_) consider(kink);
  // The ground too, aimed half a sliver below so that the aimed step itself lands: a landing
  // step that ends near the ground does not reach far below it, where the forces may have kinks
  // of their own. A level ground is one more level; another is aimed at on its own surface, and
  // the earlier of the two aims kept.
  double aimed_ground = kNever;
  if constexpr (Ground::level) {
    consider(ground_.height(0.0, 0.0) - 0.5 * sliver);
  } else if (!clear_of(z_end, 0.0)) {
    // (A step ending above the ground's highest point cannot be aimed at it: skipped.)
    // The sliver of the height above the ground (not of the altitude): a shallow glide into a
    // slope closes on it with little change of altitude.
    const double above = offset(stepper.y(), 0.0);
    const double ground_sliver = kSliver * std::abs(dense_offset(stepper, 0.0, t_end) - above);
    const double below = -0.5 * ground_sliver;  // the surface aimed at, as a clearance
    const double now = offset(stepper.y(), below);
    const double then = dense_offset(stepper, below, t_end);
    if (std::abs(now) > ground_sliver && now > 0.0 && then < 0.0)
      aimed_ground =
          solve(stepper, below, stepper.t(), t_end, now, then, 1e-6 * (t_end - stepper.t()));
  }
  if (std::isnan(target)) return aimed_ground;
  // The prediction need only be good to a small share of the step.
  return std::min(aimed_ground, solve_altitude(stepper, target, stepper.t(), t_end, z - target,
                                               z_end - target, 1e-6 * (t_end - stepper.t())));
}

// A step aimed at the ground (foresee) may stop short of it, the aim being a prediction. When it
// stops within a sliver of its altitude change above the ground and its dense output, carried on
// for a few slivers of its time, reaches the ground, the landing lies there: a polynomial of the
// step carried a sliver past its end errs as little as it does inside it, and a further step
// would cost a whole step (and often a rejected trial) for that sliver. Returns the time of the
// landing, or NaN when there is none so close (or a stage change comes first).
template <class Ground>
template <class Stepper>
double FlightEvents<Ground>::landing_just_ahead(const Stepper& stepper, double t_stop) const {
  if constexpr (!Ground::level) {
    // The height above the ground is at least z - highest, and its change over the step at most
    // the altitude's change plus the ground's relief: when the first exceeds a sliver of the
    // second the test below fails, and no height need be looked up.
    const double z = stepper.y()[2];
    const double most_change =
        std::abs(z - stepper.y_previous()[2]) + (ground_.highest() - ground_.lowest());
    if (z - ground_.highest() > kSliver * most_change) return kNone;
  }
  const double above = offset(stepper.y(), 0.0);
  // The last step's change of the height above the ground: of the altitude for a level ground.
  double change;
  if constexpr (Ground::level)
    change = stepper.y()[2] - stepper.y_previous()[2];
  else
    change = above - offset(stepper.y_previous(), 0.0);
  if (!(above > 0.0 && above <= kSliver * std::abs(change))) return kNone;
  const double t = stepper.t();
  const double t_far = std::min(t + 4.0 * kSliver * (t - stepper.t_previous()), t_stop);
  if (!(t_far > t)) return kNone;
  const double above_far = dense_offset(stepper, 0.0, t_far);
  if (!(above_far <= 0.0)) return kNone;
  return solve(stepper, 0.0, t, t_far, above, above_far, kTimePrecision * std::max(1.0, t_far));
}

}  // namespace strewn
