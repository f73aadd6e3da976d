#pragma once
// U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), the exact model (not tabulated).
// Geometric altitude from -5 km to 86 km. Geopotential H = r0 z / (r0 + z), r0 = 6 356 766 m.
// Base layers (H km, lapse K/km): 0/-6.5, 11/0, 20/+1.0, 32/+2.8, 47/0, 51/-2.8, 71/-2.0, top
// 84.852. Convention for 80-86 km: the temperature returned is the molecular-scale temperature
// (as the printed tables list it), and density uses it with the sea-level molar mass; the true
// kinetic temperature differs by at most 0.04 percent there (M/M0 >= 0.99961 at 86 km).
namespace strewn::us1976 {

inline constexpr double lowest_altitude = -5000.0;   ///< m, bottom of the standard's tables
inline constexpr double highest_altitude = 86000.0;  ///< m, top of the lower-atmosphere model

struct State {
  double temperature;  ///< K
  double pressure;     ///< Pa
  double density;      ///< kg/m^3
  double viscosity;    ///< Pa s (Sutherland's law)
  double sound_speed;  ///< m/s
};

/// Geopotential altitude (m') of a geometric altitude z (m).
double geopotential(double z);

/// The standard state at geometric altitude z (m above mean sea level).
/// Throws std::domain_error outside [lowest_altitude, highest_altitude].
State at(double z);

/// Sutherland's law for air (NOAA-S/T 76-1562 eq. 51), Pa s.
double sutherland_viscosity(double temperature);

/// Speed of sound in air, sqrt(gamma R T), m/s.
double sound_speed(double temperature);

}  // namespace strewn::us1976
