#pragma once
// The scenario's wind profile as given: every sample flies the same wind.
#include "study/wind_sources/source.hpp"

namespace strewn {

class ProfileWind {
 public:
  static constexpr WindUncertaintyModel model = WindUncertaintyModel::none;
  static constexpr std::array<const char*, 0> choices{};
  struct Scratch {};

  ProfileWind(const Scenario& /*scenario*/, const World& world) : wind_(world.wind) {}
  [[nodiscard]] Scratch scratch() const { return {}; }
  [[nodiscard]] const WindProfile& wind(std::uint64_t /*sample*/, const InputValues& /*values*/,
                                        Scratch& /*scratch*/) const {
    return wind_;
  }
  void choices_of(const Scratch& /*scratch*/, std::span<double> /*out*/) const {}

 private:
  const WindProfile& wind_;
};

}  // namespace strewn
