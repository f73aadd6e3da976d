#pragma once
// Where a sample's wind comes from, behind a static seam: each source is one file under
// wind_sources/ (its keys of [wind.uncertainty] and their checks, its sampled inputs, its
// precomputation, its random choices and how it makes a sample's profile) and one entry in
// `WindSources`. The loader reads the keys of the source the scenario names; a study visits the
// variant once per sample; the flight then reads a WindProfile, whatever its source.
#include <cstddef>
#include <optional>
#include <string>
#include <utility>
#include <variant>
#include <vector>

#include "scenario/wind_sources/bias.hpp"
#include "scenario/wind_sources/ensemble.hpp"
#include "scenario/wind_sources/layered.hpp"
#include "scenario/wind_sources/profile.hpp"

namespace strewn {

/// The registered wind sources, in the order the documentation lists them: adding one is its
/// file under wind_sources/ and its type here. The first is the default (no uncertainty).
using WindSources = std::variant<ProfileWind, BiasWind, LayeredWind, EnsembleWind>;

template <class Sources>
struct WindSourceParts;
template <class... Source>
struct WindSourceParts<std::variant<Source...>> {
  using Settings = std::variant<typename Source::Settings...>;
  using Scratch = std::variant<typename Source::Scratch...>;
};
/// What a scenario says of its wind source (the alternative is the source).
using WindSettings = typename WindSourceParts<WindSources>::Settings;
/// Per-thread storage of whichever source a study has.
using WindScratch = typename WindSourceParts<WindSources>::Scratch;

/// The names of the registered sources, in registration order.
std::vector<std::string> wind_source_names();
/// The source named `name` with its keys read from `keys`; nullopt for an unknown name.
std::optional<WindSettings> read_wind_source(const std::string& name, WindSourceKeys& keys);
/// Every key any registered source reads, with whether the source of `settings` reads it.
std::vector<std::pair<std::string, bool>> wind_source_keys(const WindSettings& settings);
/// The name of the source of `settings`.
const char* wind_source_name(const WindSettings& settings);
/// The profiles the source flies instead of the scenario's layers (an ensemble's members).
std::span<const std::vector<WindLayer>> own_wind_profiles(const WindSettings& settings);

/// The source of `settings`, built once per study on `base`.
WindSources make_wind_source(const WindSettings& settings, const WindBase& base);

}  // namespace strewn
