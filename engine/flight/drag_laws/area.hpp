#pragma once
// Constant drag coefficient on a reference area: F = 1/2 rho Cd A |u| u (Newton regime,
// Re > ~1e3, common practice). Bodies of any shape with a measured or handbook Cd A.
#include <array>
#include <cmath>
#include <span>

#include "core/constants.hpp"
#include "flight/drag_laws/law.hpp"
#include "medium/medium.hpp"

namespace strewn {

namespace drag {
inline constexpr double kAreaMinReynolds = 1.0e3;  // Newton regime, common practice
}  // namespace drag

struct AreaDrag {
  static constexpr const char* name = "area";
  static constexpr std::array inputs{
      DragInput{"cd", kPositive, true, 1.0, "drag coefficient"},
      DragInput{"area", kPositive, true, 1.0, "reference area of the drag coefficient, m^2"},
      DragInput{"volume", kPositive, false, 0.0,
                "volume for buoyancy, m^3 (absent: unknown, no buoyancy)"}};
  static constexpr bool takes_mach_table = true;
  static constexpr bool linear = false;
  static constexpr bool needs_viscosity = false;
  static constexpr DragValidity validity{drag::kAreaMinReynolds,
                                         std::numeric_limits<double>::infinity(), "",
                                         ": a constant drag coefficient assumes the Newton regime"};

  double cd = 1.0, area = 1.0, body_volume = 0.0;
  double half_cd_area = 0.5 * cd * area;  ///< Cd A / 2, m^2

  AreaDrag() = default;
  AreaDrag(double drag_coefficient, double reference_area, double volume = 0.0)
      : cd(drag_coefficient),
        area(reference_area),
        body_volume(volume),
        half_cd_area(0.5 * cd * area) {}
  explicit AreaDrag(std::span<const double, 3> v) : AreaDrag(v[0], v[1], v[2]) {}
  [[nodiscard]] std::array<double, 3> values() const { return {cd, area, body_volume}; }

  [[nodiscard]] double coefficient(double speed, const Air& air) const {
    return half_cd_area * air.density * speed;
  }
  [[nodiscard]] double cd_at(double /*reynolds*/) const { return cd; }
  [[nodiscard]] double quadratic_cd(double /*reynolds*/) const { return cd; }
  /// The diameter of the circle of the reference area: the length of its Reynolds number.
  [[nodiscard]] double length() const { return std::sqrt(4.0 * area / constants::pi); }
  [[nodiscard]] double reference_area() const { return area; }
  [[nodiscard]] double volume() const { return body_volume; }
};

}  // namespace strewn
