#pragma once
// The ground a flight ends on, behind a static seam: each kind of ground is one file under
// grounds/ and one entry in `Grounds`; a flight is compiled once per kind (flight.cpp visits the
// variant once per flight, so the step loop makes no virtual call). A ground declares
//   static constexpr const char* name;
//   static constexpr bool level;        // one altitude everywhere (located as an altitude level)
//   double height(double east, double north) const;                  // m above mean sea level
//   std::array<double, 2> slope(double east, double north) const;    // its gradient
//   double lowest() const, highest() const;  // bounds of the height anywhere (m)
// Ground contact and deployment heights are located on the height above the ground along the
// trajectory (events.hpp): nothing outside a ground's file assumes it is level.
#include <variant>

#include "flight/grounds/level.hpp"

namespace strewn {

/// The registered grounds: adding one is its file under grounds/ and its type here.
using Grounds = std::variant<LevelGround>;

/// The lowest height of a ground anywhere, m above mean sea level: where the air is densest and
/// a body settles slowest (the bounds of a flight's estimates).
[[nodiscard]] inline double lowest_ground(const Grounds& ground) {
  return std::visit([](const auto& g) { return g.lowest(); }, ground);
}
/// The ground's height at a point, m above mean sea level.
[[nodiscard]] inline double ground_height(const Grounds& ground, double east, double north) {
  return std::visit([&](const auto& g) { return g.height(east, north); }, ground);
}

}  // namespace strewn
