#include "medium/us1976.hpp"

#include <array>
#include <cmath>
#include <stdexcept>
#include <string>

#include "core/constants.hpp"

namespace strewn::us1976 {

namespace {
struct Layer {
  double base_geopotential;  // m'
  double lapse;              // K per m'
};
constexpr std::array<Layer, 7> kLayers{{{0.0, -6.5e-3},
                                        {11000.0, 0.0},
                                        {20000.0, 1.0e-3},
                                        {32000.0, 2.8e-3},
                                        {47000.0, 0.0},
                                        {51000.0, -2.8e-3},
                                        {71000.0, -2.0e-3}}};
constexpr double kSeaLevelTemperature = 288.15;  // K
constexpr double kSeaLevelPressure = 101325.0;   // Pa
// g0 M0 / R*, the hydrostatic constant of the standard (K per m').
constexpr double kHydrostatic = constants::g0 * constants::air_molar_mass / constants::gas_constant;

struct Base {
  double temperature;
  double pressure;
};

// Temperatures and pressures at each layer base, from the layer equations themselves so that the
// model is continuous (the standard's own construction).
std::array<Base, 7> compute_bases() {
  std::array<Base, 7> bases{};
  bases[0] = {kSeaLevelTemperature, kSeaLevelPressure};
  for (std::size_t i = 1; i < kLayers.size(); ++i) {
    const auto& below = kLayers[i - 1];
    const double dh = kLayers[i].base_geopotential - below.base_geopotential;
    const double t0 = bases[i - 1].temperature;
    const double p0 = bases[i - 1].pressure;
    const double t1 = t0 + below.lapse * dh;
    const double p1 = below.lapse == 0.0 ? p0 * std::exp(-kHydrostatic * dh / t0)
                                         : p0 * std::pow(t0 / t1, kHydrostatic / below.lapse);
    bases[i] = {t1, p1};
  }
  return bases;
}
const std::array<Base, 7> kBases = compute_bases();
}  // namespace

double geopotential(double z) {
  return constants::earth_radius * z / (constants::earth_radius + z);
}

double sutherland_viscosity(double temperature) {
  return constants::sutherland_beta * temperature * std::sqrt(temperature) /
         (temperature + constants::sutherland_s);
}

double sound_speed(double temperature) {
  return std::sqrt(constants::air_gamma * constants::air_specific_gas_constant * temperature);
}

State at(double z) {
  if (!(z >= lowest_altitude && z <= highest_altitude))
    throw std::domain_error("U.S. Standard Atmosphere 1976 is defined from -5 km to 86 km; got " +
                            std::to_string(z) + " m");
  const double h = geopotential(z);
  std::size_t i = kLayers.size() - 1;
  while (i > 0 && h < kLayers[i].base_geopotential) --i;
  const auto& layer = kLayers[i];
  const auto& base = kBases[i];
  const double dh = h - layer.base_geopotential;
  const double t = base.temperature + layer.lapse * dh;
  const double p = layer.lapse == 0.0
                       ? base.pressure * std::exp(-kHydrostatic * dh / base.temperature)
                       : base.pressure * std::pow(base.temperature / t, kHydrostatic / layer.lapse);
  const double rho = p / (constants::air_specific_gas_constant * t);
  return {t, p, rho, sutherland_viscosity(t), sound_speed(t)};
}

}  // namespace strewn::us1976
