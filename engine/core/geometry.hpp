#pragma once
// Vector types and the local frame: x east, y north, z up (metres; z is altitude above mean sea
// level). Angles in the scenario are degrees clockwise from true north.
#include <Eigen/Core>
#include <cmath>

#include "core/constants.hpp"

namespace strewn {

using Vec3 = Eigen::Vector3d;

/// Horizontal unit vector pointing toward the bearing `degrees` (clockwise from north).
inline Eigen::Vector2d bearing_unit(double degrees) {
  const double a = degrees * constants::degree;
  return {std::sin(a), std::cos(a)};
}

/// Velocity of a wind blowing *from* `from_degrees` with `speed` (meteorological convention):
/// it blows toward from + 180 degrees.
inline Eigen::Vector2d wind_from(double speed, double from_degrees) {
  return -speed * bearing_unit(from_degrees);
}

}  // namespace strewn
