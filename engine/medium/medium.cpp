#include "medium/medium.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "core/constants.hpp"
#include "medium/us1976.hpp"

namespace strewn {

Medium Medium::us1976(double bottom, double top, double step) {
  if (!(bottom >= us1976::lowest_altitude && top <= us1976::highest_altitude && bottom < top &&
        step > 0.0))
    throw std::invalid_argument("US76 table range must lie within -5 km .. 86 km");
  Medium m;
  m.kind_ = Kind::us1976;
  m.bottom_ = bottom;
  m.top_ = top;
  m.geopotential_grid_ = true;
  // Nodes at whole multiples of the step in geopotential altitude: the layer bases (0, 11, 20,
  // 32, 47, 51, 71 km') are multiples of 25 m' and so fall on nodes.
  const double h_bottom = std::floor(us1976::geopotential(bottom) / step) * step;
  const double h_top = std::ceil(us1976::geopotential(top) / step) * step;
  const auto count = static_cast<std::size_t>(std::llround((h_top - h_bottom) / step)) + 1;
  m.grid_origin_ = h_bottom;
  m.inverse_step_ = 1.0 / step;
  m.nodes_.reserve(count);
  for (std::size_t i = 0; i < count; ++i) {
    const double h = h_bottom + static_cast<double>(i) * step;
    const double z = constants::earth_radius * h / (constants::earth_radius - h);  // geometric
    const auto s = us1976::at(std::clamp(z, us1976::lowest_altitude, us1976::highest_altitude));
    m.nodes_.push_back({s.temperature, s.pressure, s.pressure / (kGasConstant * s.temperature)});
  }
  m.last_index_ = static_cast<double>(count - 1);
  m.last_cell_ = count - 2;
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
      throw std::invalid_argument("sounding levels must have strictly increasing altitudes (level " +
                                  std::to_string(i + 1) + ")");
  }
  Medium m;
  m.kind_ = Kind::profile;
  m.bottom_ = levels.front().altitude;
  m.top_ = levels.back().altitude;
  m.grid_origin_ = m.bottom_;
  // The grid is fine enough to resolve every level: at most `step`, and at most a tenth of the
  // closest spacing of the levels.
  double h = step;
  for (std::size_t i = 1; i < levels.size(); ++i)
    h = std::min(h, (levels[i].altitude - levels[i - 1].altitude) / 10.0);
  const auto count = static_cast<std::size_t>(std::ceil((m.top_ - m.bottom_) / h)) + 1;
  h = (m.top_ - m.bottom_) / static_cast<double>(count - 1);
  m.inverse_step_ = 1.0 / h;
  m.nodes_.reserve(count);
  std::size_t j = 0;
  for (std::size_t i = 0; i < count; ++i) {
    const double z = std::min(m.bottom_ + static_cast<double>(i) * h, m.top_);
    while (j + 2 < levels.size() && z > levels[j + 1].altitude) ++j;
    const auto& a = levels[j];
    const auto& b = levels[j + 1];
    const double f = std::clamp((z - a.altitude) / (b.altitude - a.altitude), 0.0, 1.0);
    const double t = a.temperature + f * (b.temperature - a.temperature);
    const double p = std::exp(std::log(a.pressure) + f * (std::log(b.pressure) - std::log(a.pressure)));
    m.nodes_.push_back({t, p, p / (kGasConstant * t)});
  }
  m.last_index_ = static_cast<double>(count - 1);
  m.last_cell_ = count - 2;
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
  const Node n = interpolate(altitude);
  const double t = n.temperature + c.temperature_offset;
  // Density by the same path as density(), so every drag model sees the same air.
  return {density(altitude, c), us1976::sutherland_viscosity(t), us1976::sound_speed(t)};
}

double Medium::temperature(double altitude, const MediumConditions& c) const {
  if (kind_ == Kind::uniform) return std::numeric_limits<double>::quiet_NaN();
  return interpolate(altitude).temperature + c.temperature_offset;
}

double Medium::pressure(double altitude) const {
  if (kind_ == Kind::uniform) return std::numeric_limits<double>::quiet_NaN();
  return interpolate(altitude).pressure;
}

}  // namespace strewn
