#pragma once
// The profile shifted as a whole by an uncertain (east, north) offset, the same at every layer
// ([wind.uncertainty] model "bias"): a Gaussian vector of standard deviation `speed_sd` per
// component, as the two sampled inputs wind.bias_east and wind.bias_north (m/s), so that
// sampling plans and rank correlations apply to it like to any other input.
#include <algorithm>

#include "scenario/wind_sources/source.hpp"

namespace strewn {

class BiasWind {
 public:
  static constexpr const char* name = "bias";
  static constexpr std::array<const char*, 1> keys{"speed_sd"};
  struct Settings {
    double speed_sd = 0.0;              ///< m/s, per horizontal component
    Uncertain east = 0.0, north = 0.0;  ///< the offset, m/s (sampled)

    static Settings read(WindSourceKeys& table) {
      Settings s;
      s.speed_sd = table.number("speed_sd", kNonNegative, true, 0.0);
      if (s.speed_sd > 0.0) {
        s.east = table.sampled("bias_east", Uncertain::normal(0.0, s.speed_sd));
        s.north = table.sampled("bias_north", Uncertain::normal(0.0, s.speed_sd));
      }
      return s;
    }
    void echo(auto& table, auto&& /*as_read*/) const { table["speed_sd"] = speed_sd; }
    [[nodiscard]] std::span<const std::vector<WindLayer>> own_profiles() const { return {}; }
  };
  static constexpr std::array<const char*, 0> choices{};
  struct Scratch {
    std::vector<double> add_east, add_north;
    WindProfile wind;
  };

  BiasWind(const Settings& settings, const WindBase& base)
      : settings_(settings), base_(perturbable_profile(base)) {}
  [[nodiscard]] Scratch scratch() const {
    return {std::vector<double>(base_.layers()), std::vector<double>(base_.layers()), base_};
  }
  [[nodiscard]] const WindProfile& wind(std::uint64_t /*sample*/, const InputValues& value,
                                        Scratch& s) const {
    const double de = value(settings_.east), dn = value(settings_.north);
    std::fill(s.add_east.begin(), s.add_east.end(), de);
    std::fill(s.add_north.begin(), s.add_north.end(), dn);
    s.wind.assign_perturbed(base_, s.add_east, s.add_north);
    return s.wind;
  }
  void choices_of(const Scratch& /*scratch*/, std::span<double> /*out*/) const {}

 private:
  Settings settings_;
  WindProfile base_;
};

}  // namespace strewn
