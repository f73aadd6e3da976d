#pragma once
// Non-spherical particles by their sphericity: the correlation of Haider and Levenspiel (1989),
// Powder Technol. 58:63-70, eq. (10), valid Re < 2.6e5 and sphericity 0.026 .. 1 (its data).
#include <array>
#include <cmath>
#include <span>

#include "core/constants.hpp"
#include "flight/drag_laws/law.hpp"
#include "medium/medium.hpp"

namespace strewn {

namespace drag {
inline constexpr double kHaiderLevenspielMaxReynolds = 2.6e5;
inline constexpr double kHaiderLevenspielMinSphericity = 0.026;

/// Coefficients A, B, C, D of Haider and Levenspiel (1989), eq. (10).
struct HaiderLevenspiel {
  double a = 0.0, b = 0.0, c = 0.0, d = 0.0;
  HaiderLevenspiel() = default;
  explicit HaiderLevenspiel(double phi)
      : a(std::exp(2.3288 - 6.4581 * phi + 2.4486 * phi * phi)),
        b(0.0964 + 0.5565 * phi),
        c(std::exp(4.905 - 13.8944 * phi + 18.4222 * phi * phi - 10.2599 * phi * phi * phi)),
        d(std::exp(1.4681 + 12.2584 * phi - 20.7322 * phi * phi + 15.8855 * phi * phi * phi)) {}
  /// Cd Re = 24 (1 + A Re^B) + C Re^2 / (Re + D); finite as Re -> 0 (tends to 24).
  [[nodiscard]] double cd_re(double re) const {
    return 24.0 * (1.0 + a * std::pow(re, b)) + c * re * re / (re + d);
  }
  [[nodiscard]] double cd(double re) const { return cd_re(re) / re; }
};
}  // namespace drag

struct ShapeDrag {
  static constexpr const char* name = "shape";
  static constexpr std::array inputs{
      DragInput{"diameter", kPositive, true, 0.0, "diameter of the volume-equivalent sphere, m"},
      DragInput{"sphericity",
                Bounds{drag::kHaiderLevenspielMinSphericity, 1.0, false, false,
                       "a sphericity in [0.026, 1] (the Haider-Levenspiel data range)"},
                true, 1.0, "sphericity: surface of the volume-equivalent sphere over the body's"}};
  static constexpr bool takes_mach_table = true;
  static constexpr bool linear = false;
  static constexpr bool needs_viscosity = true;
  static constexpr DragValidity validity{0.0, drag::kHaiderLevenspielMaxReynolds,
                                         " where the Haider-Levenspiel (1989) correlation ends",
                                         ""};

  double diameter = 0.0, sphericity = 1.0;
  double viscous_factor = 0.0;  ///< A / (2 D), so that k = factor mu (Cd Re)
  drag::HaiderLevenspiel correlation;

  ShapeDrag() = default;
  ShapeDrag(double d, double phi)
      : diameter(d),
        sphericity(phi),
        viscous_factor(constants::pi * d * d / 4.0 / (2.0 * d)),
        correlation(phi) {}
  explicit ShapeDrag(std::span<const double, 2> v) : ShapeDrag(v[0], v[1]) {}
  [[nodiscard]] std::array<double, 2> values() const { return {diameter, sphericity}; }

  [[nodiscard]] double coefficient(double speed, const Air& air) const {
    const double re = air.density * speed * diameter / air.viscosity;
    return viscous_factor * air.viscosity * correlation.cd_re(re);
  }
  [[nodiscard]] double cd_at(double re) const { return correlation.cd(re); }
  [[nodiscard]] double quadratic_cd(double re) const { return (correlation.cd_re(re) - 24.0) / re; }
  [[nodiscard]] double length() const { return diameter; }
  [[nodiscard]] double reference_area() const { return constants::pi * diameter * diameter / 4.0; }
  [[nodiscard]] double volume() const {
    return constants::pi * diameter * diameter * diameter / 6.0;
  }
};

}  // namespace strewn
