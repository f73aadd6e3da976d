#pragma once
// Physical constants, SI units. Sources are named beside each value.
#include <numbers>

namespace strewn::constants {

/// Standard gravity at sea level, m/s^2 (U.S. Standard Atmosphere 1976, NOAA-S/T 76-1562).
inline constexpr double g0 = 9.80665;
/// Effective Earth radius of the US76 geopotential relation, m (NOAA-S/T 76-1562).
inline constexpr double earth_radius = 6356766.0;
/// Universal gas constant as adopted by US76, J/(kmol K) expressed per mol: 8.31432 J/(mol K).
inline constexpr double gas_constant = 8.31432;
/// Mean molar mass of sea-level air, kg/mol (NOAA-S/T 76-1562).
inline constexpr double air_molar_mass = 28.9644e-3;
/// Specific gas constant of air, J/(kg K).
inline constexpr double air_specific_gas_constant = gas_constant / air_molar_mass;
/// Ratio of specific heats of air (NOAA-S/T 76-1562).
inline constexpr double air_gamma = 1.40;
/// Sutherland's law constants for air (NOAA-S/T 76-1562): mu = beta T^1.5 / (T + S).
inline constexpr double sutherland_beta = 1.458e-6;
inline constexpr double sutherland_s = 110.4;

inline constexpr double pi = std::numbers::pi;
inline constexpr double degree = pi / 180.0;

}  // namespace strewn::constants
