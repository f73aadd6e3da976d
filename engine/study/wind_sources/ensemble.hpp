#pragma once
// One of several equally likely wind profiles (an ensemble's members, each from its own file),
// drawn per sample from the sample's own wind stream. Records the member drawn (from 0).
#include <algorithm>

#include "sampling/random_stream.hpp"
#include "study/wind_sources/source.hpp"

namespace strewn {

class EnsembleWind {
 public:
  static constexpr WindUncertaintyModel model = WindUncertaintyModel::ensemble;
  static constexpr std::array<const char*, 1> choices{"wind.member"};
  struct Scratch {
    double member = 0.0;
  };

  EnsembleWind(const Scenario& scenario, const World& /*world*/) : seed_(scenario.study.seed) {
    for (const auto& layers : scenario.wind.member_layers)
      members_.emplace_back(layers, scenario.site.ground);
  }
  [[nodiscard]] Scratch scratch() const { return {}; }
  [[nodiscard]] const WindProfile& wind(std::uint64_t sample, const InputValues& /*values*/,
                                        Scratch& s) const {
    RandomStream stream(seed_, sample, purpose::wind);
    const auto k =
        std::min(static_cast<std::size_t>(stream.uniform() * static_cast<double>(members_.size())),
                 members_.size() - 1);
    s.member = static_cast<double>(k);
    return members_[k];
  }
  void choices_of(const Scratch& s, std::span<double> out) const { out[0] = s.member; }

 private:
  std::uint64_t seed_;
  std::vector<WindProfile> members_;
};

}  // namespace strewn
