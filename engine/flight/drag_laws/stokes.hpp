#pragma once
// Linear drag only, F = -3 pi mu D u (Stokes 1851), valid Re < ~1 (common practice): fine
// droplets and dust, and settling in test tanks.
#include <array>
#include <span>

#include "core/constants.hpp"
#include "flight/drag_laws/law.hpp"
#include "medium/medium.hpp"

namespace strewn {

namespace drag {
inline constexpr double kStokesMaxReynolds = 1.0;  // common practice
}  // namespace drag

struct StokesDrag {
  static constexpr const char* name = "stokes";
  static constexpr std::array inputs{DragInput{"diameter", kPositive, true, 0.0, "diameter, m"}};
  static constexpr bool takes_mach_table = false;
  static constexpr bool linear = true;
  static constexpr bool needs_viscosity = true;
  static constexpr DragValidity validity{
      0.0, drag::kStokesMaxReynolds,
      " where Stokes (linear) drag underestimates the drag; consider the sphere model", ""};

  double diameter = 0.0;
  double stokes_factor = 0.0;  ///< 3 pi D

  StokesDrag() = default;
  explicit StokesDrag(double d) : diameter(d), stokes_factor(3.0 * constants::pi * d) {}
  explicit StokesDrag(std::span<const double, 1> v) : StokesDrag(v[0]) {}
  [[nodiscard]] std::array<double, 1> values() const { return {diameter}; }

  [[nodiscard]] double coefficient(double /*speed*/, const Air& air) const {
    return stokes_factor * air.viscosity;
  }
  [[nodiscard]] double cd_at(double re) const { return 24.0 / re; }
  [[nodiscard]] double quadratic_cd(double /*reynolds*/) const { return 0.0; }
  [[nodiscard]] double length() const { return diameter; }
  [[nodiscard]] double reference_area() const { return constants::pi * diameter * diameter / 4.0; }
  [[nodiscard]] double volume() const {
    return constants::pi * diameter * diameter * diameter / 6.0;
  }
};

}  // namespace strewn
