#pragma once
// The equations of motion of a point mass (3 degrees of freedom), apart from the integrator:
//   dr/dt = v,   m dv/dt = m g_eff + F_drag,   F_drag = -k(|u|) u,   u = v - w(z),
// with g_eff = g(z) (1 - rho_medium / rho_body) when the body volume is known (buoyancy), g(z) by
// the inverse-square law, w(z) the horizontal wind. During a parachute stage the drag coefficient
// k blends the body's law with the canopy's 1/2 rho (Cd S) |u| (see body.hpp).
//
// Also the quasi-steady (terminal-velocity) form for small bodies whose velocity relaxes much
// faster than anything else changes: dr/dt = w(z) + v_t(z) (downward), with v_t solving
// k(v_t) v_t = m g_eff.
#include <Eigen/Core>
#include <cmath>

#include "flight/body.hpp"
#include "medium/gravity.hpp"

namespace strewn {

using FlightState = Eigen::Matrix<double, 6, 1>;  ///< east, north, up (m); their rates (m/s)
using PositionState = Eigen::Matrix<double, 3, 1>;

/// The stage of the drag: body alone, canopy filling, canopy open.
enum class DragStage { body, filling, canopy };

class Forces {
 public:
  Forces(const Body& body, const Environment& environment)
      : medium_(*environment.medium, environment.conditions),
        wind_(*environment.wind),
        drag_(body.drag),
        mass_(body.mass),
        inverse_mass_(1.0 / body.mass),
        inverse_body_density_(body.volume > 0.0 ? body.volume / body.mass : 0.0),
        needs_full_air_(drag_.needs_viscosity() || drag_.needs_sound_speed()),
        constant_gravity_(environment.constant_gravity),
        // Constant Cd without a Mach table: k / m = (Cd A / 2m) rho |u|, the common case.
        constant_cd_(drag_.constant_cd()),
        half_cd_area_per_mass_(drag_.half_cd_area() / body.mass) {}

  /// Sets the drag stage; `fill_start` and `fill_time` matter for `filling`, `canopy_drag_area`
  /// (Cd S, m^2) for `filling` and `canopy`.
  void set_stage(DragStage stage, double canopy_drag_area = 0.0, double fill_start = 0.0,
                 double fill_time = 0.0) {
    stage_ = stage;
    half_canopy_drag_area_ = 0.5 * canopy_drag_area;
    fill_start_ = fill_start;
    inverse_fill_time_ = fill_time > 0.0 ? 1.0 / fill_time : 0.0;
  }
  [[nodiscard]] DragStage stage() const { return stage_; }

  /// Full equations of motion: y = (r, v), dydt = (v, a).
  [[gnu::always_inline]] inline void operator()(double t, const FlightState& y,
                                                FlightState& dydt) const {
    const double z = y[2];
    double wind_east, wind_north;
    wind_.at(z, wind_east, wind_north);
    const double ux = y[3] - wind_east, uy = y[4] - wind_north, uz = y[5];
    const double speed = std::sqrt(ux * ux + uy * uy + uz * uz);
    // The loop-carried chain of the integration runs from one stage's acceleration through the
    // next stage's velocity, air speed and square root back to the drag; the altitude, hence the
    // density, is known earlier. So the density is multiplied in first, off that chain.
    double density, k;
    if (constant_cd_ && stage_ == DragStage::body) {  // the common case: only the density
      density = medium_.density(z);
      k = (half_cd_area_per_mass_ * density) * speed;
    } else {
      const Air air = needs_full_air_ ? medium_.air(z) : Air{medium_.density(z), 0.0, 0.0};
      density = air.density;
      k = drag_coefficient(t, speed, air) * inverse_mass_;
    }
    const double g = gravity_at(z) * (1.0 - density * inverse_body_density_);
    dydt[0] = y[3];
    dydt[1] = y[4];
    dydt[2] = y[5];
    dydt[3] = -k * ux;
    dydt[4] = -k * uy;
    dydt[5] = -k * uz - g;
  }

  /// Drag k (kg/s) at time t for air-relative speed `speed` in `air` (F = -k u).
  [[nodiscard]] double drag_coefficient(double t, double speed, const Air& air) const {
    switch (stage_) {
      case DragStage::body:
        return drag_.coefficient(speed, air);
      case DragStage::canopy:
        return half_canopy_drag_area_ * air.density * speed;
      case DragStage::filling: {
        const double s = std::clamp((t - fill_start_) * inverse_fill_time_, 0.0, 1.0);
        return (1.0 - s) * drag_.coefficient(speed, air) +
               s * half_canopy_drag_area_ * air.density * speed;
      }
    }
    return 0.0;
  }

  /// Effective gravity (m/s^2, downward positive) at altitude z: buoyancy included.
  [[nodiscard]] double effective_gravity(double z) const {
    return gravity_at(z) * (1.0 - medium_.density(z) * inverse_body_density_);
  }

  /// Terminal (settling) speed in still air at altitude z with the body's own drag, m/s;
  /// NaN when the body does not sink (buoyancy at least its weight).
  [[nodiscard]] double terminal_speed(double z) const;

  /// Velocity relaxation time v_t / g_eff at altitude z (s); NaN when the body does not sink.
  [[nodiscard]] double relaxation_time(double z) const {
    return terminal_speed(z) / effective_gravity(z);
  }

  /// Quasi-steady form: dr/dt = (w_east, w_north, -v_t).
  void operator()(double /*t*/, const PositionState& r, PositionState& drdt) const {
    const Eigen::Vector2d w = wind_.at(r[2]);
    drdt[0] = w.x();
    drdt[1] = w.y();
    drdt[2] = -terminal_speed(r[2]);
  }

  /// Gravity (m/s^2) at altitude z: the inverse-square law, or g0 when held constant.
  [[nodiscard]] double gravity_at(double z) const {
    return constant_gravity_ ? constants::g0 : gravity(z);
  }

  [[nodiscard]] const DragLaw& drag() const { return drag_; }
  [[nodiscard]] const Medium& medium() const { return medium_.medium(); }
  [[nodiscard]] const MediumConditions& conditions() const { return medium_.conditions(); }
  /// The medium under this flight's conditions (hot or cold day, density factor).
  [[nodiscard]] const ConditionedMedium& air() const { return medium_; }
  [[nodiscard]] const WindProfile& wind() const { return wind_; }
  [[nodiscard]] double mass() const { return mass_; }

 private:
  ConditionedMedium medium_;
  const WindProfile& wind_;
  DragLaw drag_;
  double mass_, inverse_mass_, inverse_body_density_;
  bool needs_full_air_;
  bool constant_gravity_;
  bool constant_cd_;
  double half_cd_area_per_mass_;
  DragStage stage_ = DragStage::body;
  double half_canopy_drag_area_ = 0.0, fill_start_ = 0.0, inverse_fill_time_ = 0.0;
};

}  // namespace strewn
