#pragma once
// A level ground: one altitude everywhere, the [site] key `ground` (0 when absent).
#include <array>
#include <span>

#include "core/bounds.hpp"
#include "flight/grounds/key.hpp"

namespace strewn {

struct LevelGround {
  static constexpr const char* name = "level";
  /// Its keys of [site]; none required, so a scenario without them is on level ground.
  /// `ground`: the ground's altitude, m above mean sea level.
  static constexpr std::array<GroundKey, 1> keys{{{"ground", kAltitude, false, 0.0}}};
  /// The ground is one altitude: events on it are located as altitude levels (events.hpp).
  static constexpr bool level = true;

  double elevation = 0.0;  ///< m above mean sea level

  constexpr LevelGround() = default;
  constexpr LevelGround(double elevation_m)
      : elevation(elevation_m) {}  // NOLINT: a level is a number
  /// From the values of its keys, in the order of `keys`.
  explicit LevelGround(std::span<const double> values) : elevation(values[0]) {}
  [[nodiscard]] std::array<double, 1> values() const { return {elevation}; }

  [[nodiscard]] double height(double /*east*/, double /*north*/) const { return elevation; }
  /// d height / d east, d height / d north.
  [[nodiscard]] std::array<double, 2> slope(double /*east*/, double /*north*/) const {
    return {0.0, 0.0};
  }
  [[nodiscard]] double lowest() const { return elevation; }
  [[nodiscard]] double highest() const { return elevation; }
};

}  // namespace strewn
