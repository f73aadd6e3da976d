#pragma once
// The scenario's wind profile as given ([wind.uncertainty] model "none"): every sample flies the
// same wind.
#include "scenario/wind_sources/source.hpp"

namespace strewn {

class ProfileWind {
 public:
  static constexpr const char* name = "none";
  static constexpr std::array<const char*, 0> keys{};
  struct Settings {
    static Settings read(WindSourceKeys& /*table*/) { return {}; }
    void echo(auto& /*table*/, auto&& /*as_read*/) const {}
    [[nodiscard]] std::span<const std::vector<WindLayer>> own_profiles() const { return {}; }
  };
  static constexpr std::array<const char*, 0> choices{};
  struct Scratch {};

  ProfileWind(const Settings& /*settings*/, const WindBase& base) : wind_(*base.profile) {}
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
