#pragma once
// One of several equally likely wind profiles, an ensemble's members, each from its own file
// ([wind.uncertainty] model "ensemble", key `members`), drawn per sample from the sample's own
// wind stream. Records the member drawn (from 0) as the choice "wind.member".
#include <algorithm>

#include "core/random_stream.hpp"
#include "scenario/wind_sources/source.hpp"

namespace strewn {

class EnsembleWind {
 public:
  static constexpr const char* name = "ensemble";
  static constexpr std::array<const char*, 1> keys{"members"};
  struct Settings {
    WindFiles members;  ///< the profile files, as written and as read

    static Settings read(WindSourceKeys& table) { return {table.profile_files("members")}; }
    void echo(auto& table, auto&& as_read) const {
      table["members"] = std::remove_cvref_t<decltype(table)>::array();
      for (const auto& member : members.names) table["members"].push_back(as_read(member));
    }
    [[nodiscard]] std::span<const std::vector<WindLayer>> own_profiles() const {
      return members.layers;
    }
  };
  static constexpr std::array<const char*, 1> choices{"wind.member"};
  struct Scratch {
    double member = 0.0;
  };

  EnsembleWind(const Settings& settings, const WindBase& base) : seed_(base.seed) {
    for (const auto& layers : settings.members.layers) members_.emplace_back(layers, base.ground);
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
