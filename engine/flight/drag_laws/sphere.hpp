#pragma once
// A smooth sphere: the standard drag curve of Morrison (2013), "Data correlation for drag
// coefficient for sphere", valid 0 < Re <= 1e6, from the Stokes regime through the drag crisis.
#include <array>
#include <cmath>
#include <span>

#include "core/constants.hpp"
#include "flight/drag_laws/law.hpp"
#include "medium/medium.hpp"

namespace strewn {

namespace drag {
inline constexpr double kMorrisonMaxReynolds = 1.0e6;

/// Cd Re for Morrison (2013), written to stay finite as Re -> 0 (tends to 24).
inline double morrison_cd_re(double re) {
  // Morrison (2013): Cd = 24/Re + 2.6 (Re/5) / (1 + (Re/5)^1.52)
  //   + 0.411 (Re/2.63e5)^-7.94 / (1 + (Re/2.63e5)^-8.00) + 0.25 (Re/1e6) / (1 + Re/1e6).
  // The third term is rewritten as 0.411 x^0.06 / (1 + x^8), x = Re/2.63e5, which is the same
  // function without overflow at small Re.
  const double x5 = re / 5.0;
  const double x = re / 2.63e5;
  const double x2 = x * x, x4 = x2 * x2, x8 = x4 * x4;
  const double y = re / 1.0e6;
  const double rest = 2.6 * x5 / (1.0 + std::pow(x5, 1.52)) +
                      0.411 * std::pow(x, 0.06) / (1.0 + x8) + 0.25 * y / (1.0 + y);
  return 24.0 + re * rest;
}
/// Morrison (2013), Cd of a smooth sphere.
inline double morrison_cd(double re) {
  return morrison_cd_re(re) / re;
}
/// Schiller and Naumann (1933), Cd = 24/Re (1 + 0.15 Re^0.687), Re < 800: the cross-check.
inline double schiller_naumann_cd(double re) {
  return 24.0 / re * (1.0 + 0.15 * std::pow(re, 0.687));
}
}  // namespace drag

struct SphereDrag {
  static constexpr const char* name = "sphere";
  static constexpr std::array inputs{DragInput{"diameter", kPositive, true, 0.0, "diameter, m"}};
  static constexpr bool takes_mach_table = true;
  static constexpr bool linear = false;
  static constexpr bool needs_viscosity = true;
  static constexpr DragValidity validity{0.0, drag::kMorrisonMaxReynolds,
                                         " where the Morrison (2013) sphere correlation ends", ""};

  double diameter = 0.0;
  double viscous_factor = 0.0;  ///< A / (2 D), so that k = factor mu (Cd Re)

  SphereDrag() = default;
  explicit SphereDrag(double d)
      : diameter(d), viscous_factor(constants::pi * d * d / 4.0 / (2.0 * d)) {}
  explicit SphereDrag(std::span<const double, 1> v) : SphereDrag(v[0]) {}
  [[nodiscard]] std::array<double, 1> values() const { return {diameter}; }

  /// k = 1/2 rho A |u| Cd = (A mu / 2D) (Cd Re), finite at |u| = 0.
  [[nodiscard]] double coefficient(double speed, const Air& air) const {
    const double re = air.density * speed * diameter / air.viscosity;
    return viscous_factor * air.viscosity * drag::morrison_cd_re(re);
  }
  [[nodiscard]] double cd_at(double re) const { return drag::morrison_cd(re); }
  [[nodiscard]] double quadratic_cd(double re) const {
    return (drag::morrison_cd_re(re) - 24.0) / re;
  }
  [[nodiscard]] double length() const { return diameter; }
  [[nodiscard]] double reference_area() const { return constants::pi * diameter * diameter / 4.0; }
  [[nodiscard]] double volume() const {
    return constants::pi * diameter * diameter * diameter / 6.0;
  }
};

}  // namespace strewn
