#pragma once
// Where an input number must lie: the one description that input files are checked against and
// that models declare for the numbers they read (a drag law's diameter is positive, a sphericity
// lies in the range of its correlation's data).
#include <limits>
#include <string>

namespace strewn {

/// Where a value must lie. Bounds are closed unless marked open.
struct Bounds {
  double low = -std::numeric_limits<double>::infinity();
  double high = std::numeric_limits<double>::infinity();
  bool low_open = false, high_open = false;
  const char* words = nullptr;  // e.g. "positive"; built from the bounds when null

  [[nodiscard]] constexpr bool contains(double v) const {
    return (low_open ? v > low : v >= low) && (high_open ? v < high : v <= high);
  }
  /// The bounds in words, for messages ("positive", "a number from 1 to 5").
  [[nodiscard]] std::string describe() const;
};
inline constexpr Bounds kAny{};
inline constexpr Bounds kPositive{0.0, std::numeric_limits<double>::infinity(), true, false,
                                  "positive"};
inline constexpr Bounds kNonNegative{0.0, std::numeric_limits<double>::infinity(), false, false,
                                     "zero or more"};
inline constexpr Bounds kProbability{0.0, 1.0, false, false, "a probability in [0, 1]"};
inline constexpr Bounds kDegrees{0.0, 360.0, false, false, "an angle in [0, 360] degrees"};
/// The altitudes strewn's air covers: its U.S. Standard Atmosphere 1976 tables run from -5 km
/// to 86 km geometric (medium/us1976.hpp).
inline constexpr Bounds kAltitude{-5000.0, 86000.0, false, false,
                                  "an altitude from -5000 to 86000 m above mean sea level"};
inline constexpr Bounds kHeightAboveGround{0.0, 86000.0, true, false,
                                           "a height above the ground in (0, 86000] m"};

}  // namespace strewn
