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
// trajectory (events.hpp), and the flight's bounds take its lowest point. What still reads the
// scenario's one `site.ground` (the wind's power-law floor, the release check of the loader, the
// trace's heights) is listed in DEVELOPERS.md, "A ground".
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

}  // namespace strewn
