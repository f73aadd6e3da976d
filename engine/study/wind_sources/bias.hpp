#pragma once
// The profile shifted as a whole by an uncertain (east, north) offset, the same at every layer:
// the sampled inputs wind.bias_east and wind.bias_north (m/s).
#include <algorithm>

#include "study/wind_sources/source.hpp"

namespace strewn {

class BiasWind {
 public:
  static constexpr WindUncertaintyModel model = WindUncertaintyModel::bias;
  static constexpr std::array<const char*, 0> choices{};
  struct Scratch {
    std::vector<double> add_east, add_north;
    WindProfile wind;
  };

  BiasWind(const Scenario& scenario, const World& world)
      : spec_(scenario.wind), base_(perturbable_profile(scenario, world)) {}
  [[nodiscard]] Scratch scratch() const {
    return {std::vector<double>(base_.layers()), std::vector<double>(base_.layers()), base_};
  }
  [[nodiscard]] const WindProfile& wind(std::uint64_t /*sample*/, const InputValues& value,
                                        Scratch& s) const {
    const double de = value(spec_.bias_east), dn = value(spec_.bias_north);
    std::fill(s.add_east.begin(), s.add_east.end(), de);
    std::fill(s.add_north.begin(), s.add_north.end(), dn);
    s.wind.assign_perturbed(base_, s.add_east, s.add_north);
    return s.wind;
  }
  void choices_of(const Scratch& /*scratch*/, std::span<double> /*out*/) const {}

 private:
  const WindSpec& spec_;
  WindProfile base_;
};

}  // namespace strewn
