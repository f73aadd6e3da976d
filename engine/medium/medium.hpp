#pragma once
// The medium a body falls through, tabulated once per scenario and immutable afterwards, so that
// every flight shares it across threads and each query is two table look-ups.
//
// Gases (US76, a sounding profile) are stored as temperature and pressure on a uniform altitude
// grid; the per-flight conditions add a temperature offset dT and a density factor (multiplies
// rho). A hot or cold day is a whole atmosphere in hydrostatic balance: T' = T + dT everywhere,
// the pressure at the reference altitude (sea level for US76, the lowest level of a sounding)
// unchanged, and above and below it
//   ln p'(z) = ln p(z) + (g0 / R) * integral from z_ref to z of [1/T - 1/(T + dT)] dH,
// dH = (r0 / (r0 + z))^2 dz the geopotential (NOAA-S/T 76-1562 eqs. 18 and 33a: d ln p / dH =
// -g0 / (R T), so p' satisfies it with T' wherever p does with T). The day's pressure is tabulated
// for a lattice of offsets over the range the scenario may draw (one offset alone when it is
// fixed; else spaced so that a cubic Lagrange polynomial in dT through four of them is within
// 1e-6, see tabulate_offsets) with the weights worked out once per flight (ConditionedMedium), so
// that a query weighs four pressures and needs no exponential. rho = p' / (R T').
// Viscosity is Sutherland's law and the speed of sound sqrt(gamma R T'), both at T'. A uniform
// medium (liquids, test tanks) has constant density, viscosity and, optionally, speed of sound.
//
// Interpolation: linear in geometric altitude on a uniform grid (25 m), for temperature, pressure
// and density. Where the temperature profile has a kink inside a cell (a base of a US76 layer, a
// level of a sounding), the cell is split there into two linear pieces, so the kinks of the model
// are reproduced exactly and a query is still one index computation without division. What
// remains is the linear interpolation of the exponential pressure and density, a relative error
// below 3e-6 (bounded by tests/unit/medium_test.cpp).
#include <algorithm>
#include <array>
#include <bit>
#include <cstdint>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "core/constants.hpp"
#include "core/enum_names.hpp"

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
  double pressure;     ///< Pa; NaN on every level: not given (worked out hydrostatically)
};

class ConditionedMedium;

class Medium {
 public:
  enum class Kind { us1976, profile, uniform };

  /// U.S. Standard Atmosphere 1976 tabulated from `bottom` to `top` (m, within -5 km .. 86 km).
  static Medium us1976(double bottom = -5000.0, double top = 86000.0, double step = 25.0);

  /// A sounding: levels sorted by strictly increasing altitude (at least two), temperature and
  /// pressure positive. Pressure is interpolated in log, temperature linearly (then tabulated).
  /// A sounding without pressure (NaN on every level) takes the standard atmosphere's pressure at
  /// its lowest level (which must then lie within -5 km .. 86 km) and the hydrostatic law through
  /// its own temperatures above it.
  /// Throws std::invalid_argument when the levels do not meet these conditions.
  static Medium profile(const std::vector<SoundingLevel>& levels, double step = 25.0);

  /// A uniform medium; sound_speed infinite means "no compressibility" (Mach number 0).
  static Medium uniform(double density, double viscosity,
                        double sound_speed = std::numeric_limits<double>::infinity());

  /// Tabulates the hot/cold-day pressure for temperature offsets from `lowest` to `highest` K
  /// (gases; clipped to -100 .. 100 K). An offset a flight asks for outside them takes the
  /// pressure of the nearer end (a normal offset's tails, beyond the loader's tolerance). A
  /// non-zero offset on a medium without the lattice is a programming error (std::logic_error).
  void tabulate_offsets(double lowest, double highest);
  /// The tabulated offsets (empty: only the standard day).
  [[nodiscard]] const std::vector<double>& offsets() const { return offset_nodes_; }

  [[nodiscard]] Kind kind() const { return kind_; }
  /// Altitude range (m) where the medium is defined; outside it the end values are held.
  [[nodiscard]] double bottom() const { return bottom_; }
  [[nodiscard]] double top() const { return top_; }
  [[nodiscard]] bool covers(double altitude) const {
    return altitude >= bottom_ && altitude <= top_;
  }

  /// Density only, kg/m^3, and density, viscosity and speed of sound, under conditions `c`.
  /// Each call weighs the offsets anew: a flight uses ConditionedMedium, which does it once.
  [[nodiscard]] double density(double altitude, const MediumConditions& c) const;
  [[nodiscard]] Air air(double altitude, const MediumConditions& c) const;

  /// The lowest and highest tabulated temperature, K, without offset (gases; NaN for uniform):
  /// bounds of the viscosity and speed of sound anywhere in the medium.
  [[nodiscard]] double lowest_temperature() const { return lowest_temperature_; }
  [[nodiscard]] double highest_temperature() const { return highest_temperature_; }

  /// Temperature (K) and pressure (Pa) with the offset applied (gases; NaN for uniform).
  [[nodiscard]] double temperature(double altitude, const MediumConditions& c) const;
  [[nodiscard]] double pressure(double altitude, const MediumConditions& c) const;

 private:
  friend class ConditionedMedium;
  static constexpr double kGasConstant = constants::air_specific_gas_constant;  // R*/M0, US76
  // One grid cell: up to two linear pieces (split where the temperature has a kink). Piece 0 runs
  // from the cell's bottom to `split` (a fraction of the cell; 2 when the cell is not split),
  // piece 1 from `split` to the top; each holds its value at its own start and the change per unit
  // fraction of the cell.
  struct Cell {
    double split;
    double temperature[2], temperature_slope[2];
    double pressure[2], pressure_slope[2];
    double density[2], density_slope[2];
  };
  // The pressure of one offset day on the same cells and pieces.
  struct PressureCell {
    double pressure[2], pressure_slope[2];
  };
  struct Location {
    const Cell& cell;
    double f;  // fraction across the cell, [0, 1]
  };
  [[nodiscard]] Location locate(double altitude) const {
    double x = (altitude - bottom_) * inverse_step_;
    x = std::clamp(x, 0.0, last_index_);
    // The cell index without a float-integer-float round trip: adding 1.5 * 2^52 rounds x - 0.5
    // to an integer held in the low bits (exact for the table's sizes). That integer is floor(x),
    // or x - 1 when x is whole; either way f = x - i lies in [0, 1]. At the top (x = the cell
    // count) it may be the flat cell past the last one, with f = 0.
    constexpr double kRound = 6755399441055744.0;  // 1.5 * 2^52
    const double shifted = (x - 0.5) + kRound;
    const auto i =
        static_cast<std::size_t>(static_cast<std::uint32_t>(std::bit_cast<std::uint64_t>(shifted)));
    return {cells_[i], x - (shifted - kRound)};
  }
  // A value on a cell: both pieces are evaluated and one is chosen (no load waits on the choice).
  static double on_cell(const double (&value)[2], const double (&slope)[2], double f,
                        double split) {
    const double low = value[0] + f * slope[0];
    const double high = value[1] + (f - split) * slope[1];
    return f >= split ? high : low;
  }
  // Builds the cells from an exact model (T, p at an altitude) and its kinks (altitudes).
  template <class Model>
  void tabulate(const Model& model, double step, const std::vector<double>& kinks);

  // The ends of every piece of the table with their temperature (increasing altitude).
  struct TablePoint {
    double z, t;
  };
  [[nodiscard]] std::vector<TablePoint> tabulation_points() const;
  // ln(p'/p) at every tabulation point `points` for offset dT (the integral of the header), then
  // the cells of that day.
  [[nodiscard]] std::vector<PressureCell> offset_day(double offset,
                                                     const std::vector<TablePoint>& points) const;

  Medium() = default;

  Kind kind_ = Kind::us1976;
  double bottom_ = 0.0, top_ = 0.0;               // geometric altitude range, m
  double inverse_step_ = 1.0, last_index_ = 0.0;  // last_index_: the number of cells in range
  std::vector<Cell> cells_;
  double lowest_temperature_ = std::numeric_limits<double>::quiet_NaN();
  double highest_temperature_ = std::numeric_limits<double>::quiet_NaN();
  double uniform_density_ = 0.0, uniform_viscosity_ = 0.0;
  double uniform_sound_speed_ = std::numeric_limits<double>::infinity();
  // Hot/cold days: the altitude where the pressure holds, and the offset lattice with the cells
  // of each of its days.
  double reference_altitude_ = 0.0;
  std::vector<double> offset_nodes_;
  // The days' cells interleaved (cell i of day k at i * offset_nodes_.size() + k), so that the
  // four days a query weighs lie side by side in memory.
  std::vector<PressureCell> offset_cells_;
};

/// The medium under one flight's conditions: the offset weights worked out once, so that each
/// query is the cell look-up and, on an offset day, up to four pressures weighed (ConditionedMedium
/// holds a reference: the Medium must outlive it).
class ConditionedMedium {
 public:
  ConditionedMedium(const Medium& medium, const MediumConditions& conditions);

  [[nodiscard]] const Medium& medium() const { return *medium_; }
  [[nodiscard]] const MediumConditions& conditions() const { return conditions_; }

  /// Density only (the cheap query of the area drag model), kg/m^3.
  [[nodiscard]] double density(double altitude) const {
    if (medium_->kind_ == Medium::Kind::uniform)
      return conditions_.density_factor * medium_->uniform_density_;
    return density_at(medium_->locate(altitude));
  }
  /// Density, viscosity and speed of sound.
  [[nodiscard]] Air air(double altitude) const;
  /// Temperature (K) and pressure (Pa) (gases; NaN for uniform).
  [[nodiscard]] double temperature(double altitude) const;
  [[nodiscard]] double pressure(double altitude) const;

 private:
  using Location = Medium::Location;
  [[nodiscard]] double pressure_at(const Location& at) const {
    const Medium::Cell& cell = at.cell;
    if (day_count_ == 0)
      return Medium::on_cell(cell.pressure, cell.pressure_slope, at.f, cell.split);
    const auto index = static_cast<std::size_t>(&cell - medium_->cells_.data());
    const Medium::PressureCell* days = first_day_ + index * day_stride_;
    double p = 0.0;
    for (int k = 0; k < day_count_; ++k)
      p +=
          weights_[k] * Medium::on_cell(days[k].pressure, days[k].pressure_slope, at.f, cell.split);
    return p;
  }
  // The density at a located point of a gas: the one path for density() and air().
  [[nodiscard]] double density_at(const Location& at) const {
    const Medium::Cell& cell = at.cell;
    if (day_count_ == 0)  // a standard day (no offset): the tabulated density itself
      return conditions_.density_factor *
             Medium::on_cell(cell.density, cell.density_slope, at.f, cell.split);
    const double t = Medium::on_cell(cell.temperature, cell.temperature_slope, at.f, cell.split);
    return conditions_.density_factor * pressure_at(at) /
           (Medium::kGasConstant * (t + conditions_.temperature_offset));
  }

  const Medium* medium_;
  MediumConditions conditions_;
  // 0: the standard day (offset 0); else 1 (an offset of the lattice) or 4 (cubic in the offset)
  int day_count_ = 0;
  const Medium::PressureCell* first_day_ = nullptr;  // cell 0 of the first day weighed
  std::size_t day_stride_ = 0;
  double weights_[4] = {0.0, 0.0, 0.0, 0.0};
};

template <>
struct EnumNames<Medium::Kind> {
  static constexpr std::array names{std::pair{Medium::Kind::us1976, "us1976"},
                                    std::pair{Medium::Kind::profile, "profile"},
                                    std::pair{Medium::Kind::uniform, "uniform"}};
};

}  // namespace strewn
