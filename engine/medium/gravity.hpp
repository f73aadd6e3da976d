#pragma once
// Gravity by the inverse-square law with the US76 constants: g(z) = g0 (r0 / (r0 + z))^2,
// z the geometric altitude above mean sea level (NOAA-S/T 76-1562, eq. 17).
#include "core/constants.hpp"

namespace strewn {

inline double gravity(double altitude) {
  const double ratio = constants::earth_radius / (constants::earth_radius + altitude);
  return constants::g0 * ratio * ratio;
}

}  // namespace strewn
