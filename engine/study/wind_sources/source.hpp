#pragma once
// What every wind source declares, so that a sample's wind needs no code outside its file (see
// study/wind_source.hpp for the list and DEVELOPERS.md, "Adding a wind source"):
//   static constexpr WindUncertaintyModel model;       // the scenario's [wind] uncertainty
//   Source(const Scenario&, const World&);             // checks and precomputes, once per study
//   static constexpr std::array<const char*, N> choices;  // its random choices' column names
//   struct Scratch;                                    // per-thread storage (no allocation per
//   Scratch scratch() const;                           //   sample once made)
//   const WindProfile& wind(std::uint64_t sample, const InputValues& values, Scratch&) const;
//   void choices_of(const Scratch&, std::span<double> out) const;  // after wind(), N numbers
// The sampled inputs a source reads (e.g. the bias's east and north offsets) are handles of the
// scenario (Uncertain::sampled_index), read through `values`.
#include <Eigen/Cholesky>
#include <Eigen/Core>
#include <array>
#include <cstdint>
#include <span>
#include <vector>

#include "medium/wind.hpp"
#include "scenario/world.hpp"

namespace strewn {

/// The profile that perturbations apply to: the scenario's, or for calm air one calm layer at
/// the ground (a perturbation needs a layer to act on).
inline WindProfile perturbable_profile(const Scenario& s, const World& world) {
  if (!world.wind.calm()) return world.wind;
  return WindProfile({{s.site.ground, 0.0, 0.0}}, s.site.ground);
}

}  // namespace strewn
