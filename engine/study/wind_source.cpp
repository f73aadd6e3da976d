#include "study/wind_source.hpp"

#include <stdexcept>

namespace strewn {

namespace {
// Every wind uncertainty a scenario may name has exactly one registered source.
template <std::size_t... i>
constexpr bool each_model_has_one_source(std::index_sequence<i...>) {
  for (const auto& [model, name] : EnumNames<WindUncertaintyModel>::names)
    if (((std::variant_alternative_t<i, WindSources>::model == model ? 1 : 0) + ... + 0) != 1)
      return false;
  return true;
}
static_assert(
    each_model_has_one_source(std::make_index_sequence<std::variant_size_v<WindSources>>{}),
    "register one wind source per WindUncertaintyModel in WindSources");

template <std::size_t... i>
WindSources make(const Scenario& s, const World& world, std::index_sequence<i...>) {
  std::optional<WindSources> source;
  auto make_one = [&]<std::size_t n>() {
    if (std::variant_alternative_t<n, WindSources>::model == s.wind.uncertainty)
      source.emplace(std::in_place_index<n>, s, world);
  };
  (make_one.template operator()<i>(), ...);
  if (!source) throw std::logic_error("no wind source is registered for this wind uncertainty");
  return std::move(*source);
}
}  // namespace

WindSources make_wind_source(const Scenario& scenario, const World& world) {
  return make(scenario, world, std::make_index_sequence<std::variant_size_v<WindSources>>{});
}

}  // namespace strewn
