#include "report/atmosphere_table.hpp"

#include <cmath>
#include <cstdio>

#include "core/errors.hpp"
#include "medium/gravity.hpp"
#include "medium/us1976.hpp"

namespace strewn {

void write_atmosphere(std::ostream& out, const AtmosphereRequest& q) {
  if (!(std::isfinite(q.offset) && std::abs(q.offset) <= 100.0))
    throw UsageError("--offset must be within -100 .. 100 K");
  if (!(q.top >= 0.0 && q.top <= us1976::highest_altitude))
    throw UsageError("--top must be within 0 .. 86000 m (the standard's lower atmosphere)");
  if (!(q.step > 0.0) || q.top / q.step > 100000.0)
    throw UsageError("--step must be positive and give at most 100000 rows");
  if (q.csv)
    out << "altitude_m,temperature_K,pressure_Pa,density_kg_m3,sound_speed_m_s,viscosity_Pa_s,"
           "gravity_m_s2\n";
  else
    out << "U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), temperature offset " << q.offset
        << " K\n altitude m   temp K    pressure Pa  density kg/m3  sound m/s  viscosity Pa s  "
           "gravity m/s2\n";
  const auto rows = static_cast<long>(std::floor(q.top / q.step + 1e-9));
  for (long i = 0; i <= rows; ++i) {
    const double z = static_cast<double>(i) * q.step;
    const auto s = us1976::at(z);
    const double t = s.temperature + q.offset;
    const double rho = s.pressure / (constants::air_specific_gas_constant * t);
    char line[200];
    std::snprintf(line, sizeof line,
                  q.csv ? "%.3f,%.3f,%.6g,%.6g,%.5g,%.6g,%.6f\n"
                        : "%11.1f %8.3f %14.6g %14.6g %10.2f %15.5g %13.5f\n",
                  z, t, s.pressure, rho, us1976::sound_speed(t), us1976::sutherland_viscosity(t),
                  gravity(z));
    out << line;
  }
}

}  // namespace strewn
