#pragma once
// What every wind source declares, so that everything about it is in its own file: its keys,
// their checks, its sampled inputs and how it makes a sample's wind (the list is
// scenario/wind_source.hpp; DEVELOPERS.md, "Adding a wind source", walks through one):
//   static constexpr const char* name;                   // its [wind.uncertainty] model
//   static constexpr std::array<const char*, K> keys;    // the [wind.uncertainty] keys it reads
//   struct Settings {                                    // what the scenario says of it
//     static Settings read(WindSourceKeys&);             //   reads and checks its keys
//     void echo(auto& table, auto&& as_read) const;      //   writes them back (as_read: a file
//                                                        //   as the scenario wrote it)
//     std::span<const std::vector<WindLayer>> own_profiles() const;  // flown instead of the
//   };                                                   //   scenario's layers (none: empty)
//   Source(const Settings&, const WindBase&);            // precomputes, once a study
//   static constexpr std::array<const char*, N> choices; // its random choices' column names
//   struct Scratch;                                      // per-thread storage (no allocation per
//   Scratch scratch() const;                             //   sample once made)
//   const WindProfile& wind(std::uint64_t sample, const InputValues&, Scratch&) const;
//   void choices_of(const Scratch&, std::span<double> out) const;  // after wind(), N numbers
// A sampled input of a source (the bias's east and north offsets) is registered while its keys
// are read (WindSourceKeys::sampled) and read back by its handle through InputValues.
#include <array>
#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "core/bounds.hpp"
#include "core/uncertain.hpp"
#include "medium/wind.hpp"
#include "scenario/input_values.hpp"

namespace strewn {

/// Wind profile files named in the scenario: as written, and their layers as read.
struct WindFiles {
  std::vector<std::string> names;
  std::vector<std::vector<WindLayer>> layers;
};

/// The [wind.uncertainty] table as the loader lends it to the source it names: every problem is
/// reported with its key path and line, and reading goes on (the loader collects them all).
class WindSourceKeys {
 public:
  virtual ~WindSourceKeys() = default;
  /// A number, checked against `bounds`; `fallback` when absent or invalid (then reported).
  virtual double number(const char* key, const Bounds& bounds, bool required, double fallback) = 0;
  /// Registers a sampled input of the wind, "wind.<name>", and gives it its handle.
  virtual Uncertain sampled(const char* name, Uncertain input) = 0;
  /// A required list of wind profile files (altitude_m, speed_ms, from_deg), each read and checked.
  virtual WindFiles profile_files(const char* key) = 0;

 protected:
  WindSourceKeys() = default;
  WindSourceKeys(const WindSourceKeys&) = default;
  WindSourceKeys& operator=(const WindSourceKeys&) = default;
};

/// What a source is built on, once per study: the scenario's wind profile (which outlives the
/// source), the ground's altitude (the profiles' power-law floor) and the study's seed.
struct WindBase {
  const WindProfile* profile = nullptr;
  double ground = 0.0;  ///< m above mean sea level
  std::uint64_t seed = 0;
};

/// The profile that perturbations apply to: the scenario's, or for calm air one calm layer at
/// the ground (a perturbation needs a layer to act on).
inline WindProfile perturbable_profile(const WindBase& base) {
  if (!base.profile->calm()) return *base.profile;
  return WindProfile({{base.ground, 0.0, 0.0}}, base.ground);
}

}  // namespace strewn
