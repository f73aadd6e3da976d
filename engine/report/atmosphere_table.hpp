#pragma once
// The table printed by `strewn atmosphere`: the exact U.S. Standard Atmosphere 1976 with an
// optional temperature offset (standard pressure, density from the ideal gas law at T + dT).
#include <ostream>

namespace strewn {

struct AtmosphereRequest {
  double offset = 0.0;   ///< K, in [-100, 100]
  double top = 20000.0;  ///< m, up to 86 000
  double step = 1000.0;  ///< m, > 0
  bool csv = false;
};

/// Throws UsageError for a request outside the ranges above.
void write_atmosphere(std::ostream& out, const AtmosphereRequest& request);

}  // namespace strewn
