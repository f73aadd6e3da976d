#pragma once
// The ground a flight ends on, behind a static seam: each kind of ground is one file under
// grounds/ and one entry in `Grounds`; a flight is compiled once per kind (flight.cpp visits the
// variant once per flight, so the step loop makes no virtual call). A ground declares
//   static constexpr const char* name;
//   static constexpr std::array<GroundKey, K> keys;  // what it reads of [site], with checks
//   explicit Ground(std::span<const double> values); // from their values, in that order
//   std::array<double, K> values() const;            // and back (the scenario report)
//   static constexpr bool level;        // one altitude everywhere (located as an altitude level)
//   double height(double east, double north) const;                  // m above mean sea level
//   std::array<double, 2> slope(double east, double north) const;    // its gradient
//   double lowest() const, highest() const;  // bounds of the height anywhere (m)
// Ground contact and deployment heights are located on the height above the ground along the
// trajectory (events.hpp), and the flight's bounds take its lowest point. What still reads the
// scenario's one ground altitude, `SiteSpec::ground_level()` (the wind's power-law floor, the
// release check of the loader, the trace's heights) is listed in DEVELOPERS.md, "A ground".
#include <algorithm>
#include <array>
#include <cstddef>
#include <functional>
#include <span>
#include <utility>
#include <variant>
#include <vector>

#include "flight/grounds/level.hpp"

namespace strewn {

/// The registered grounds: adding one is its file under grounds/ and its type here. A scenario's
/// ground is the first whose required keys [site] gives all of: the level ground, which requires
/// none, is the default and stays last.
using Grounds = std::variant<LevelGround>;

namespace ground_detail {
template <std::size_t i>
using GroundAt = std::variant_alternative_t<i, Grounds>;
template <std::size_t... i>
constexpr std::size_t max_keys(std::index_sequence<i...>) {
  return std::max({std::size_t{0}, GroundAt<i>::keys.size()...});
}
}  // namespace ground_detail
inline constexpr std::size_t kGroundKinds = std::variant_size_v<Grounds>;
/// The most keys any ground reads.
inline constexpr std::size_t kMaxGroundKeys =
    ground_detail::max_keys(std::make_index_sequence<kGroundKinds>{});
static_assert(ground_detail::GroundAt<kGroundKinds - 1>::keys.end() ==
                  std::find_if(ground_detail::GroundAt<kGroundKinds - 1>::keys.begin(),
                               ground_detail::GroundAt<kGroundKinds - 1>::keys.end(),
                               [](const GroundKey& k) { return k.required; }),
              "the last registered ground is the default: it may require no key");

/// The keys of ground kind `kind` (its index in Grounds).
[[nodiscard]] inline std::span<const GroundKey> ground_keys(std::size_t kind) {
  std::span<const GroundKey> keys;
  [&]<std::size_t... i>(std::index_sequence<i...>) {
    ((kind == i ? (keys = ground_detail::GroundAt<i>::keys, 0) : 0), ...);
  }
  (std::make_index_sequence<kGroundKinds>{});
  return keys;
}

/// The kind of ground a [site] table describes, given which of its keys are present.
[[nodiscard]] inline std::size_t choose_ground(const std::function<bool(const char*)>& has_key) {
  for (std::size_t kind = 0; kind < kGroundKinds; ++kind) {
    const auto keys = ground_keys(kind);
    if (std::all_of(keys.begin(), keys.end(),
                    [&](const GroundKey& k) { return !k.required || has_key(k.key); }))
      return kind;
  }
  return kGroundKinds - 1;
}

/// The ground of kind `kind` from its keys' values, in the order of its keys.
[[nodiscard]] inline Grounds make_ground(std::size_t kind, std::span<const double> values) {
  Grounds ground;
  [&]<std::size_t... i>(std::index_sequence<i...>) {
    ((kind == i ? (ground.emplace<i>(values), 0) : 0), ...);
  }
  (std::make_index_sequence<kGroundKinds>{});
  return ground;
}

/// A ground's keys with their values (what a scenario report writes back).
[[nodiscard]] inline std::vector<std::pair<const char*, double>> ground_settings(
    const Grounds& ground) {
  std::vector<std::pair<const char*, double>> out;
  std::visit(
      [&](const auto& g) {
        const auto values = g.values();
        for (std::size_t k = 0; k < values.size(); ++k) out.emplace_back(g.keys[k].key, values[k]);
      },
      ground);
  return out;
}

/// The lowest height of a ground anywhere, m above mean sea level: where the air is densest and
/// a body settles slowest (the bounds of a flight's estimates).
[[nodiscard]] inline double lowest_ground(const Grounds& ground) {
  return std::visit([](const auto& g) { return g.lowest(); }, ground);
}

}  // namespace strewn
