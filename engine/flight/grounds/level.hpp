#pragma once
// A level ground: one elevation everywhere (the [site] ground of a scenario).
#include <array>

namespace strewn {

struct LevelGround {
  static constexpr const char* name = "level";
  /// The ground is one altitude: events on it are located as altitude levels (events.hpp).
  static constexpr bool level = true;

  double elevation = 0.0;  ///< m above mean sea level

  constexpr LevelGround() = default;
  constexpr LevelGround(double elevation_m)
      : elevation(elevation_m) {}  // NOLINT: a level is a number

  [[nodiscard]] double height(double /*east*/, double /*north*/) const { return elevation; }
  /// d height / d east, d height / d north.
  [[nodiscard]] std::array<double, 2> slope(double /*east*/, double /*north*/) const {
    return {0.0, 0.0};
  }
  [[nodiscard]] double lowest() const { return elevation; }
  [[nodiscard]] double highest() const { return elevation; }
};

}  // namespace strewn
