#pragma once
// The medium a body falls through, tabulated once per scenario and immutable afterwards, so that
// every flight shares it across threads and each query is two table look-ups.
//
// Gases (US76, a sounding profile) are stored as temperature and pressure on a uniform altitude
// grid; the per-flight conditions add a temperature offset dT (hot/cold day: T' = T + dT on the
// standard pressure profile, rho = p / (R T')) and a density factor (multiplies rho). Viscosity is
// Sutherland's law and the speed of sound sqrt(gamma R T'), both at T'. A uniform medium (liquids,
// test tanks) has constant density, viscosity and, optionally, speed of sound.
//
// Interpolation: linear for T and p. The US76 grid is uniform in geopotential altitude with 25 m'
// steps, so every base of the standard's layers (at round geopotential altitudes) is a node and
// the piecewise-linear temperature is exact; what remains is the linear interpolation of
// pressure, a relative density error below 3e-6 (bounded by tests/unit/medium_test.cpp).
// Soundings are gridded in geometric altitude at most 25 m apart and a tenth of the closest
// level spacing.
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "core/constants.hpp"

namespace strewn {

/// Air (or liquid) properties at one point.
struct Air {
  double density;      ///< kg/m^3
  double viscosity;    ///< dynamic viscosity, Pa s
  double sound_speed;  ///< m/s (infinite when the medium has none: Mach number 0)
};

/// Per-flight medium conditions (sampled per flight in a study).
struct MediumConditions {
  double temperature_offset = 0.0;  ///< K, added to the tabulated temperature (gases only)
  double density_factor = 1.0;      ///< multiplies the density
};

/// One row of a sounding: altitude above mean sea level, temperature and pressure.
struct SoundingLevel {
  double altitude;     ///< m
  double temperature;  ///< K
  double pressure;     ///< Pa
};

class Medium {
 public:
  enum class Kind { us1976, profile, uniform };

  /// U.S. Standard Atmosphere 1976 tabulated from `bottom` to `top` (m, within -5 km .. 86 km).
  static Medium us1976(double bottom = -5000.0, double top = 86000.0, double step = 25.0);

  /// A sounding: levels sorted by strictly increasing altitude (at least two), temperature and
  /// pressure positive. Pressure is interpolated in log, temperature linearly (then tabulated).
  /// Throws std::invalid_argument when the levels do not meet these conditions.
  static Medium profile(const std::vector<SoundingLevel>& levels, double step = 25.0);

  /// A uniform medium; sound_speed infinite means "no compressibility" (Mach number 0).
  static Medium uniform(double density, double viscosity,
                        double sound_speed = std::numeric_limits<double>::infinity());

  [[nodiscard]] Kind kind() const { return kind_; }
  /// Altitude range (m) where the medium is defined; outside it the end values are held.
  [[nodiscard]] double bottom() const { return bottom_; }
  [[nodiscard]] double top() const { return top_; }
  [[nodiscard]] bool covers(double altitude) const {
    return altitude >= bottom_ && altitude <= top_;
  }

  /// Density only (the cheap query of the area drag model), kg/m^3.
  [[nodiscard]] double density(double altitude, const MediumConditions& c) const {
    return density_at(coordinate(altitude), c);
  }
  /// The same from the grid coordinate (see coordinate()), so a caller that has the ratio
  /// r0 / (r0 + z) for gravity anyway need not divide again.
  [[nodiscard]] double density_at(double grid_coordinate, const MediumConditions& c) const {
    if (kind_ == Kind::uniform) return c.density_factor * uniform_density_;
    const auto [i, f] = cell(grid_coordinate);
    const Node& a = nodes_[i];
    const Node& b = nodes_[i + 1];
    if (c.temperature_offset == 0.0)  // a standard day: the tabulated density itself
      return c.density_factor * (a.density + f * (b.density - a.density));
    const double t = a.temperature + f * (b.temperature - a.temperature) + c.temperature_offset;
    const double p = a.pressure + f * (b.pressure - a.pressure);
    return c.density_factor * p / (kGasConstant * t);
  }
  /// The grid coordinate of an altitude: geopotential altitude r0 z / (r0 + z) for US76,
  /// the altitude itself otherwise.
  [[nodiscard]] double coordinate(double altitude) const {
    return geopotential_grid_
               ? constants::earth_radius * altitude / (constants::earth_radius + altitude)
               : altitude;
  }
  /// The same when r0 / (r0 + z) is known.
  [[nodiscard]] double coordinate(double altitude, double earth_ratio) const {
    return geopotential_grid_ ? altitude * earth_ratio : altitude;
  }

  /// Density, viscosity and speed of sound.
  [[nodiscard]] Air air(double altitude, const MediumConditions& c) const;

  /// Temperature (K) and pressure (Pa) with the offset applied (gases; NaN for uniform).
  [[nodiscard]] double temperature(double altitude, const MediumConditions& c) const;
  [[nodiscard]] double pressure(double altitude) const;

 private:
  static constexpr double kGasConstant = constants::air_specific_gas_constant;  // R*/M0, US76
  struct Node {
    double temperature;
    double pressure;
    double density;  // at the tabulated temperature (no offset)
  };
  Medium() = default;
  // Index of the grid cell holding the coordinate and the fraction across it (clamped to the
  // table's ends).
  [[nodiscard]] std::pair<std::size_t, double> cell(double coordinate) const {
    double x = (coordinate - grid_origin_) * inverse_step_;
    if (x < 0.0) x = 0.0;
    if (x > last_index_) x = last_index_;
    auto i = static_cast<std::size_t>(x);
    if (i > last_cell_) i = last_cell_;
    return {i, x - static_cast<double>(i)};
  }
  [[nodiscard]] Node interpolate(double altitude) const {
    const auto [i, f] = cell(coordinate(altitude));
    const Node& a = nodes_[i];
    const Node& b = nodes_[i + 1];
    return {a.temperature + f * (b.temperature - a.temperature),
            a.pressure + f * (b.pressure - a.pressure), a.density + f * (b.density - a.density)};
  }

  Kind kind_ = Kind::us1976;
  double bottom_ = 0.0, top_ = 0.0;  // geometric altitude range, m
  bool geopotential_grid_ = false;    // grid coordinate: geopotential (US76) or geometric altitude
  double grid_origin_ = 0.0, inverse_step_ = 1.0, last_index_ = 0.0;
  std::size_t last_cell_ = 0;  // index of the last cell (nodes - 2)
  std::vector<Node> nodes_;
  double uniform_density_ = 0.0, uniform_viscosity_ = 0.0;
  double uniform_sound_speed_ = std::numeric_limits<double>::infinity();
};

}  // namespace strewn
