#include "medium/medium.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "core/constants.hpp"
#include "medium/us1976.hpp"

namespace strewn {

template <class Model>
void Medium::tabulate(const Model& model, double step, const std::vector<double>& kinks) {
  const auto count = static_cast<std::size_t>(std::ceil((top_ - bottom_) / step - 1e-9));
  const double h = (top_ - bottom_) / static_cast<double>(count);
  inverse_step_ = 1.0 / h;
  last_index_ = static_cast<double>(count);
  // One cell more than the range holds: a flat cell at the top, where the lookup lands when the
  // altitude is at or above the top (index count, fraction 0), so it needs no test for that end.
  cells_.resize(count + 1);
  struct Point {
    double t, p, rho;
  };
  lowest_temperature_ = std::numeric_limits<double>::infinity();
  highest_temperature_ = -std::numeric_limits<double>::infinity();
  auto at = [&](double z) {
    const auto [t, p] = model(std::clamp(z, bottom_, top_));
    // Temperature is linear between the points tabulated, so its extremes are among them.
    lowest_temperature_ = std::min(lowest_temperature_, t);
    highest_temperature_ = std::max(highest_temperature_, t);
    return Point{t, p, p / (kGasConstant * t)};
  };
  auto piece = [](Cell& c, int k, const Point& a, const Point& b, double width) {
    c.temperature[k] = a.t;
    c.temperature_slope[k] = (b.t - a.t) / width;
    c.pressure[k] = a.p;
    c.pressure_slope[k] = (b.p - a.p) / width;
    c.density[k] = a.rho;
    c.density_slope[k] = (b.rho - a.rho) / width;
  };
  for (std::size_t i = 0; i < count; ++i) {
    const double z0 = bottom_ + static_cast<double>(i) * h;
    const double z1 = i + 1 == count ? top_ : bottom_ + static_cast<double>(i + 1) * h;
    const Point a = at(z0), b = at(z1);
    Cell& c = cells_[i];
    c.split = 2.0;
    piece(c, 0, a, b, 1.0);
    piece(c, 1, a, b, 1.0);
    for (double kink : kinks) {
      const double s = (kink - z0) / h;
      if (!(s > 1e-9 && s < 1.0 - 1e-9)) continue;
      const Point k = at(kink);
      c.split = s;
      piece(c, 0, a, k, s);
      piece(c, 1, k, b, 1.0 - s);
      break;  // the grid is fine enough that no cell holds two kinks
    }
  }
  const Point top = at(top_);
  Cell& flat = cells_[count];
  flat.split = 2.0;
  piece(flat, 0, top, top, 1.0);
  piece(flat, 1, top, top, 1.0);
}

Medium Medium::us1976(double bottom, double top, double step) {
  if (!(bottom >= us1976::lowest_altitude && top <= us1976::highest_altitude && bottom < top &&
        step > 0.0))
    throw std::invalid_argument("US76 table range must lie within -5 km .. 86 km");
  Medium m;
  m.kind_ = Kind::us1976;
  m.bottom_ = bottom;
  m.top_ = top;
  // The bases of the standard's layers are round geopotential altitudes; geometric z = r0 H / (r0 -
  // H).
  std::vector<double> kinks;
  for (double base : {11000.0, 20000.0, 32000.0, 47000.0, 51000.0, 71000.0})
    kinks.push_back(constants::earth_radius * base / (constants::earth_radius - base));
  m.tabulate(
      [](double z) {
        const auto s = us1976::at(z);
        return std::pair{s.temperature, s.pressure};
      },
      step, kinks);
  return m;
}

Medium Medium::profile(const std::vector<SoundingLevel>& levels, double step) {
  if (levels.size() < 2) throw std::invalid_argument("a sounding needs at least two levels");
  for (std::size_t i = 0; i < levels.size(); ++i) {
    const auto& l = levels[i];
    if (!(std::isfinite(l.altitude) && l.temperature > 0.0 && l.pressure > 0.0 &&
          std::isfinite(l.temperature) && std::isfinite(l.pressure)))
      throw std::invalid_argument("sounding level " + std::to_string(i + 1) +
                                  ": temperature and pressure must be positive and finite");
    if (i > 0 && !(l.altitude > levels[i - 1].altitude))
      throw std::invalid_argument(
          "sounding levels must have strictly increasing altitudes (level " +
          std::to_string(i + 1) + ")");
  }
  Medium m;
  m.kind_ = Kind::profile;
  m.bottom_ = levels.front().altitude;
  m.top_ = levels.back().altitude;
  // Every level is a kink of the temperature; cells at most half the closest level spacing hold
  // at most one.
  double h = step;
  std::vector<double> kinks;
  for (std::size_t i = 1; i < levels.size(); ++i) {
    h = std::min(h, (levels[i].altitude - levels[i - 1].altitude) / 2.0);
    kinks.push_back(levels[i - 1].altitude);
  }
  // Between levels: temperature linear, pressure linear in log (the hydrostatic law for a layer
  // of constant temperature, the usual reading of a sounding).
  m.tabulate(
      [&levels](double z) {
        std::size_t j = 0;
        while (j + 2 < levels.size() && z > levels[j + 1].altitude) ++j;
        const auto& a = levels[j];
        const auto& b = levels[j + 1];
        const double f = std::clamp((z - a.altitude) / (b.altitude - a.altitude), 0.0, 1.0);
        return std::pair{
            a.temperature + f * (b.temperature - a.temperature),
            std::exp(std::log(a.pressure) + f * (std::log(b.pressure) - std::log(a.pressure)))};
      },
      h, kinks);
  return m;
}

Medium Medium::uniform(double density, double viscosity, double sound_speed) {
  if (!(density > 0.0 && std::isfinite(density) && viscosity > 0.0 && std::isfinite(viscosity) &&
        sound_speed > 0.0))
    throw std::invalid_argument("a uniform medium needs positive density, viscosity, sound speed");
  Medium m;
  m.kind_ = Kind::uniform;
  m.bottom_ = -std::numeric_limits<double>::infinity();
  m.top_ = std::numeric_limits<double>::infinity();
  m.uniform_density_ = density;
  m.uniform_viscosity_ = viscosity;
  m.uniform_sound_speed_ = sound_speed;
  return m;
}

Air Medium::air(double altitude, const MediumConditions& c) const {
  if (kind_ == Kind::uniform)
    return {c.density_factor * uniform_density_, uniform_viscosity_, uniform_sound_speed_};
  // One cell look-up for all three; the density by the same path as density(), so every drag
  // model sees the same air.
  const Location at = locate(altitude);
  const double t = on_cell(at.cell.temperature, at.cell.temperature_slope, at.f, at.cell.split) +
                   c.temperature_offset;
  return {density_at(at, c), us1976::sutherland_viscosity(t), us1976::sound_speed(t)};
}

double Medium::temperature(double altitude, const MediumConditions& c) const {
  if (kind_ == Kind::uniform) return std::numeric_limits<double>::quiet_NaN();
  const auto [cell, f] = locate(altitude);
  return on_cell(cell.temperature, cell.temperature_slope, f, cell.split) + c.temperature_offset;
}

double Medium::pressure(double altitude) const {
  if (kind_ == Kind::uniform) return std::numeric_limits<double>::quiet_NaN();
  const auto [cell, f] = locate(altitude);
  return on_cell(cell.pressure, cell.pressure_slope, f, cell.split);
}

}  // namespace strewn
