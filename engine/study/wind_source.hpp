#pragma once
// Where a sample's wind comes from, behind a static seam: each source is one file under
// wind_sources/ (what it takes of the scenario's wind, its precomputation, the sampled inputs it
// reads by handle, its random choices, and how it makes a sample's profile) and one entry in
// `WindSources`. Its keys are read by the loader (read_wind), below this module. A study visits the
// variant once per sample; the flight then reads a WindProfile, whatever its source.
#include <cstddef>
#include <optional>
#include <utility>
#include <variant>

#include "study/wind_sources/bias.hpp"
#include "study/wind_sources/ensemble.hpp"
#include "study/wind_sources/layered.hpp"
#include "study/wind_sources/profile.hpp"

namespace strewn {

/// The registered wind sources: adding one is its file under wind_sources/, its type here and its
/// name in WindUncertaintyModel (scenario.hpp), which the scenario's [wind] uncertainty chooses.
using WindSources = std::variant<ProfileWind, BiasWind, LayeredWind, EnsembleWind>;

template <class Sources>
struct ScratchesOf;
template <class... Source>
struct ScratchesOf<std::variant<Source...>> {
  using type = std::variant<typename Source::Scratch...>;
};
/// Per-thread storage of whichever source a study has.
using WindScratch = typename ScratchesOf<WindSources>::type;

/// The source that the scenario's [wind] uncertainty names, built once per study.
WindSources make_wind_source(const Scenario& scenario, const World& world);

}  // namespace strewn
