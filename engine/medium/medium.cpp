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

std::vector<Medium::TablePoint> Medium::tabulation_points() const {
  // The tabulated temperature is linear on a piece (US76's is linear in geopotential: the
  // difference is below 1e-7).
  const double h = 1.0 / inverse_step_;
  const auto count = static_cast<std::size_t>(last_index_);
  std::vector<TablePoint> points;
  points.reserve(2 * count + 1);
  for (std::size_t i = 0; i < count; ++i) {
    const Cell& c = cells_[i];
    const double z0 = bottom_ + static_cast<double>(i) * h;
    points.push_back({z0, c.temperature[0]});
    if (c.split < 1.0) points.push_back({z0 + c.split * h, c.temperature[1]});
  }
  points.push_back({top_, cells_[count].temperature[0]});
  return points;
}

std::vector<Medium::PressureCell> Medium::offset_day(double offset,
                                                     const std::vector<TablePoint>& points) const {
  const auto count = static_cast<std::size_t>(last_index_);
  // ln(p'/p) = (g0/R) * integral of [1/T - 1/(T + dT)] (r0/(r0+z))^2 dz from the bottom, one
  // Simpson panel per piece (its error, h^5/2880 times the fourth derivative of an integrand
  // varying over tens of kilometres, is below 1e-15).
  constexpr double kHydrostatic = constants::g0 / kGasConstant;
  const auto integrand = [offset](double z, double t) {
    const double r = constants::earth_radius / (constants::earth_radius + z);
    return (1.0 / t - 1.0 / (t + offset)) * r * r;
  };
  std::vector<double> log_ratio(points.size(), 0.0);
  for (std::size_t j = 1; j < points.size(); ++j) {
    const TablePoint& a = points[j - 1];
    const TablePoint& b = points[j];
    const double mid = integrand(0.5 * (a.z + b.z), 0.5 * (a.t + b.t));
    log_ratio[j] = log_ratio[j - 1] + kHydrostatic * (b.z - a.z) / 6.0 *
                                          (integrand(a.z, a.t) + 4.0 * mid + integrand(b.z, b.t));
  }
  // The pressure holds at the reference altitude: subtract the integral up to it (linear between
  // the points around it; the integral's curvature there makes that exact to 1e-9).
  std::size_t r = 1;
  while (r + 1 < points.size() && points[r].z < reference_altitude_) ++r;
  const double s = std::clamp(
      (reference_altitude_ - points[r - 1].z) / (points[r].z - points[r - 1].z), 0.0, 1.0);
  const double at_reference = log_ratio[r - 1] + s * (log_ratio[r] - log_ratio[r - 1]);
  // The day's pieces: the standard pressure at each piece's ends times exp(ln(p'/p)).
  std::vector<PressureCell> day(cells_.size());
  std::size_t j = 0;
  auto piece = [&](PressureCell& d, int k, double p0, double p1, double width) {
    const double a = p0 * std::exp(log_ratio[j] - at_reference);
    const double b = p1 * std::exp(log_ratio[j + 1] - at_reference);
    d.pressure[k] = a;
    d.pressure_slope[k] = (b - a) / width;
    ++j;
  };
  for (std::size_t i = 0; i < count; ++i) {
    const Cell& c = cells_[i];
    PressureCell& d = day[i];
    const double p_end = cells_[i + 1].pressure[0];
    if (c.split < 1.0) {
      piece(d, 0, c.pressure[0], c.pressure[1], c.split);
      piece(d, 1, c.pressure[1], p_end, 1.0 - c.split);
    } else {
      piece(d, 0, c.pressure[0], p_end, 1.0);
      d.pressure[1] = d.pressure[0];
      d.pressure_slope[1] = d.pressure_slope[0];
    }
  }
  const double p_top = cells_[count].pressure[0] * std::exp(log_ratio[j] - at_reference);
  day[count] = {{p_top, p_top}, {0.0, 0.0}};
  return day;
}

void Medium::tabulate_offsets(double lowest, double highest) {
  if (kind_ == Kind::uniform) return;
  lowest = std::clamp(lowest, -100.0, 100.0);
  highest = std::clamp(highest, -100.0, 100.0);
  if (!(lowest <= highest)) throw std::invalid_argument("offsets: lowest above highest");
  offset_nodes_.clear();
  offset_cells_.clear();
  const std::vector<TablePoint> points = tabulation_points();
  if (highest - lowest < 1e-9) {
    offset_nodes_.push_back(lowest);
  } else {
    // p' depends on dT through exp(ln(p'/p)), whose derivative in dT is at most
    //   D = (g0/R) * integral of dH / (T + dT_lowest)^2
    // over the table. A cubic through days h apart is then within (D h)^4 / 24 of it (the
    // Lagrange remainder with p'''' ~ D^4 p', its node polynomial at most h^4 in an end
    // interval): D h <= 0.07 keeps that below 1e-6. At most 5 K apart and 256 days (30 MB); that
    // cap binds only for ranges reaching about -60 K and below, where the bound then grows in
    // the coldest, highest air.
    double slope = 0.0;
    for (std::size_t j = 1; j < points.size(); ++j) {
      const double t = 0.5 * (points[j - 1].t + points[j].t) + lowest;
      slope += (points[j].z - points[j - 1].z) / (t * t);
    }
    slope *= constants::g0 / kGasConstant;
    const double spacing = std::min(5.0, 0.07 / slope);
    const auto count = std::clamp<std::size_t>(
        static_cast<std::size_t>(std::ceil((highest - lowest) / spacing - 1e-9)) + 1, 4, 256);
    for (std::size_t k = 0; k < count; ++k)
      offset_nodes_.push_back(lowest + (highest - lowest) * static_cast<double>(k) /
                                           static_cast<double>(count - 1));
  }
  const std::size_t days = offset_nodes_.size();
  offset_cells_.resize(cells_.size() * days);
  for (std::size_t k = 0; k < days; ++k) {
    const std::vector<PressureCell> day = offset_day(offset_nodes_[k], points);
    for (std::size_t i = 0; i < day.size(); ++i) offset_cells_[i * days + k] = day[i];
  }
}

Medium Medium::us1976(double bottom, double top, double step) {
  if (!(bottom >= us1976::lowest_altitude && top <= us1976::highest_altitude && bottom < top &&
        step > 0.0))
    throw std::invalid_argument("US76 table range must lie within -5 km .. 86 km");
  Medium m;
  m.kind_ = Kind::us1976;
  m.bottom_ = bottom;
  m.top_ = top;
  m.reference_altitude_ = 0.0;  // the standard's sea-level pressure holds on any day
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

namespace {
// ln p(z) - ln p(a) on a layer whose temperature runs linearly from t_a at z_a to t_b at z_b: the
// hydrostatic law d ln p / dz = -g0 / (R T) (r0 / (r0 + z))^2 (NOAA-S/T 76-1562 eq. 33a with
// eq. 18), by Simpson's rule on 16 panels (an integrand this smooth over a layer gives 1e-12).
double hydrostatic_log_change(double z_a, double t_a, double z_b, double t_b, double z) {
  constexpr int kPanels = 16;
  const auto temperature = [&](double x) {
    return z_b > z_a ? t_a + (t_b - t_a) * (x - z_a) / (z_b - z_a) : t_a;
  };
  const auto integrand = [&](double x) {
    const double r = constants::earth_radius / (constants::earth_radius + x);
    return r * r / temperature(x);
  };
  const double width = (z - z_a) / kPanels;
  double sum = integrand(z_a) + integrand(z);
  for (int k = 1; k < kPanels; ++k) sum += (k % 2 == 1 ? 4.0 : 2.0) * integrand(z_a + width * k);
  return -constants::g0 / constants::air_specific_gas_constant * sum * width / 3.0;
}

// A sounding's levels checked (Medium::profile's conditions), with the pressure of a sounding
// that gives none worked out on each level.
std::vector<SoundingLevel> checked_levels(std::vector<SoundingLevel> levels) {
  if (levels.size() < 2) throw std::invalid_argument("a sounding needs at least two levels");
  const bool hydrostatic = std::all_of(
      levels.begin(), levels.end(), [](const SoundingLevel& l) { return std::isnan(l.pressure); });
  for (std::size_t i = 0; i < levels.size(); ++i) {
    const auto& l = levels[i];
    if (!(std::isfinite(l.altitude) && l.temperature > 0.0 && std::isfinite(l.temperature) &&
          (hydrostatic || (l.pressure > 0.0 && std::isfinite(l.pressure)))))
      throw std::invalid_argument("sounding level " + std::to_string(i + 1) +
                                  ": temperature and pressure must be positive and finite");
    if (i > 0 && !(l.altitude > levels[i - 1].altitude))
      throw std::invalid_argument(
          "sounding levels must have strictly increasing altitudes (level " +
          std::to_string(i + 1) + ")");
  }
  if (hydrostatic) {
    const double base = levels.front().altitude;
    if (!(base >= us1976::lowest_altitude && base <= us1976::highest_altitude))
      throw std::invalid_argument(
          "a sounding without pressure must start within -5 km .. 86 km, where the standard "
          "atmosphere gives its lowest level's pressure");
    levels.front().pressure = us1976::at(base).pressure;
    for (std::size_t i = 1; i < levels.size(); ++i) {
      const auto& a = levels[i - 1];
      const auto& b = levels[i];
      levels[i].pressure =
          a.pressure * std::exp(hydrostatic_log_change(a.altitude, a.temperature, b.altitude,
                                                       b.temperature, b.altitude));
    }
  }
  return levels;
}
}  // namespace

Medium Medium::profile(const std::vector<SoundingLevel>& given, double step) {
  const bool hydrostatic = !given.empty() && std::isnan(given.front().pressure);
  const std::vector<SoundingLevel> levels = checked_levels(given);
  Medium m;
  m.kind_ = Kind::profile;
  m.bottom_ = levels.front().altitude;
  m.top_ = levels.back().altitude;
  m.reference_altitude_ = m.bottom_;  // a hot or cold day keeps the sounding's lowest pressure
  // Every level is a kink of the temperature; cells at most half the closest level spacing hold
  // at most one.
  double h = step;
  std::vector<double> kinks;
  for (std::size_t i = 1; i < levels.size(); ++i) {
    h = std::min(h, (levels[i].altitude - levels[i - 1].altitude) / 2.0);
    kinks.push_back(levels[i - 1].altitude);
  }
  // Between levels, temperature is linear. Pressure given: linear in log (the hydrostatic law for
  // a layer of constant temperature, the usual reading of a sounding). Pressure not given: the
  // hydrostatic law through the linear temperature.
  m.tabulate(
      [&levels, hydrostatic](double z) {
        std::size_t j = 0;
        while (j + 2 < levels.size() && z > levels[j + 1].altitude) ++j;
        const auto& a = levels[j];
        const auto& b = levels[j + 1];
        const double f = std::clamp((z - a.altitude) / (b.altitude - a.altitude), 0.0, 1.0);
        const double t = a.temperature + f * (b.temperature - a.temperature);
        if (hydrostatic) {
          const double at = a.altitude + f * (b.altitude - a.altitude);
          return std::pair{
              t, a.pressure * std::exp(hydrostatic_log_change(a.altitude, a.temperature, b.altitude,
                                                              b.temperature, at))};
        }
        return std::pair{
            t, std::exp(std::log(a.pressure) + f * (std::log(b.pressure) - std::log(a.pressure)))};
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

double Medium::density(double altitude, const MediumConditions& c) const {
  return ConditionedMedium(*this, c).density(altitude);
}

Air Medium::air(double altitude, const MediumConditions& c) const {
  return ConditionedMedium(*this, c).air(altitude);
}

double Medium::temperature(double altitude, const MediumConditions& c) const {
  return ConditionedMedium(*this, c).temperature(altitude);
}

double Medium::pressure(double altitude, const MediumConditions& c) const {
  return ConditionedMedium(*this, c).pressure(altitude);
}

ConditionedMedium::ConditionedMedium(const Medium& medium, const MediumConditions& conditions)
    : medium_(&medium), conditions_(conditions) {
  const double offset = conditions.temperature_offset;
  if (medium.kind_ == Medium::Kind::uniform || offset == 0.0) return;
  const auto& nodes = medium.offset_nodes_;
  if (nodes.empty())
    throw std::logic_error("a temperature offset on a medium without tabulated offsets");
  if (nodes.size() == 1) {
    day_count_ = 1;
    first_day_ = medium.offset_cells_.data();
    day_stride_ = 1;
    weights_[0] = 1.0;
    return;
  }
  // Cubic Lagrange interpolation on the four nodes around the offset (held within the lattice).
  const double spacing = nodes[1] - nodes[0];
  const double u = (std::clamp(offset, nodes.front(), nodes.back()) - nodes.front()) / spacing;
  const auto last_start = static_cast<double>(nodes.size() - 4);
  const double start = std::clamp(std::floor(u) - 1.0, 0.0, last_start);
  const auto first = static_cast<std::size_t>(start);
  const double t = u - start;
  weights_[0] = -(t - 1.0) * (t - 2.0) * (t - 3.0) / 6.0;
  weights_[1] = t * (t - 2.0) * (t - 3.0) / 2.0;
  weights_[2] = -t * (t - 1.0) * (t - 3.0) / 2.0;
  weights_[3] = t * (t - 1.0) * (t - 2.0) / 6.0;
  first_day_ = medium.offset_cells_.data() + first;
  day_stride_ = nodes.size();
  day_count_ = 4;
}

Air ConditionedMedium::air(double altitude) const {
  const Medium& m = *medium_;
  if (m.kind_ == Medium::Kind::uniform)
    return {conditions_.density_factor * m.uniform_density_, m.uniform_viscosity_,
            m.uniform_sound_speed_};
  // One cell look-up for all three; the density by the same path as density(), so every drag
  // model sees the same air.
  const Location at = m.locate(altitude);
  const double t =
      Medium::on_cell(at.cell.temperature, at.cell.temperature_slope, at.f, at.cell.split) +
      conditions_.temperature_offset;
  return {density_at(at), us1976::sutherland_viscosity(t), us1976::sound_speed(t)};
}

double ConditionedMedium::temperature(double altitude) const {
  if (medium_->kind_ == Medium::Kind::uniform) return std::numeric_limits<double>::quiet_NaN();
  const auto [cell, f] = medium_->locate(altitude);
  return Medium::on_cell(cell.temperature, cell.temperature_slope, f, cell.split) +
         conditions_.temperature_offset;
}

double ConditionedMedium::pressure(double altitude) const {
  if (medium_->kind_ == Medium::Kind::uniform) return std::numeric_limits<double>::quiet_NaN();
  return pressure_at(medium_->locate(altitude));
}

}  // namespace strewn
