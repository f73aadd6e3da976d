#pragma once
// The ground a flight ends on, behind a static seam: each kind of ground is one file under
// grounds/ and one entry in `Grounds`; a flight is compiled once per kind (flight.cpp visits the
// variant once per flight, so the step loop makes no virtual call). A ground declares
//   static constexpr const char* name;
//   static constexpr std::array<GroundKey, K> keys;  // what it reads of [site], with checks
//   explicit Ground(std::span<const double> values); // from their values, in that order
//     or Ground(values, std::shared_ptr<const TerrainSurface>)  // a ground read from a raster
//   std::array<double, K> values() const;            // and back (the scenario report; a file
//                                                    // key's value is the scenario's to write)
//   static constexpr bool level;        // one altitude everywhere (located as an altitude level)
//   double height(double east, double north) const;  // m above mean sea level; NaN: no ground
//   std::array<double, 2> slope(double east, double north) const;    // its gradient
//   double lowest() const, highest() const;  // bounds of the height anywhere (m)
// Ground contact and deployment heights are located on the height above the ground along the
// trajectory (events.hpp), and the flight's bounds take its lowest point. What still reads the
// scenario's one ground altitude, `SiteSpec::ground_level()` (the wind's power-law floor, the
// release check of the loader, the trace's heights) is listed in DEVELOPERS.md, "A ground".
#include <algorithm>
#include <array>
#include <cstddef>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <variant>
#include <vector>

#include "flight/grounds/level.hpp"
#include "flight/grounds/terrain.hpp"

namespace strewn {

/// The registered grounds: adding one is its file under grounds/ and its type here. A scenario's
/// ground is the first whose required keys [site] gives all of: the level ground, which requires
/// none, is the default and stays last.
using Grounds = std::variant<TerrainGround, LevelGround>;

/// The kinds of ground of a variant (Grounds; tests give their own): their keys, the choice of
/// a kind from the keys a [site] table gives, and the ground built from its keys' values.
template <class Variant>
struct GroundKinds {
  static constexpr std::size_t count = std::variant_size_v<Variant>;
  template <std::size_t i>
  using At = std::variant_alternative_t<i, Variant>;

  /// The keys of kind `kind` (its index in the variant).
  static std::span<const GroundKey> keys(std::size_t kind) {
    std::span<const GroundKey> out;
    [&]<std::size_t... i>(std::index_sequence<i...>) {
      ((kind == i ? (out = At<i>::keys, 0) : 0), ...);
    }
    (std::make_index_sequence<count>{});
    return out;
  }
  static const char* name(std::size_t kind) {
    const char* out = "";
    [&]<std::size_t... i>(std::index_sequence<i...>) {
      ((kind == i ? (out = At<i>::name, 0) : 0), ...);
    }
    (std::make_index_sequence<count>{});
    return out;
  }
  /// The most keys any kind reads.
  static constexpr std::size_t max_keys() {
    return [&]<std::size_t... i>(std::index_sequence<i...>) {
      return std::max({std::size_t{0}, At<i>::keys.size()...});
    }
    (std::make_index_sequence<count>{});
  }
  /// Exactly one kind, the last, requires no key: it is the default, and every other kind can be
  /// chosen.
  static constexpr bool default_is_last() {
    auto requires_none = [](const auto& keys) {
      return std::none_of(keys.begin(), keys.end(), [](const GroundKey& k) { return k.required; });
    };
    return [&]<std::size_t... i>(std::index_sequence<i...>) {
      return ((requires_none(At<i>::keys) == (i + 1 == count)) && ...);
    }
    (std::make_index_sequence<count>{});
  }
  /// The first kind whose required keys are all present.
  template <class HasKey>
  static std::size_t choose(HasKey&& has_key) {
    for (std::size_t kind = 0; kind < count; ++kind) {
      const auto k = keys(kind);
      if (std::all_of(k.begin(), k.end(),
                      [&](const GroundKey& key) { return !key.required || has_key(key.key); }))
        return kind;
    }
    return count - 1;
  }
  /// The ground of kind `kind` from its keys' values, in the order of its keys, and the surface
  /// read from its raster (for the kinds built on one).
  static Variant make(std::size_t kind, std::span<const double> values,
                      std::shared_ptr<const TerrainSurface> surface = nullptr) {
    std::optional<Variant> ground;
    auto build = [&]<std::size_t i>(std::integral_constant<std::size_t, i>) {
      using Kind = At<i>;
      if constexpr (std::is_constructible_v<Kind, std::span<const double>,
                                            std::shared_ptr<const TerrainSurface>>)
        ground.emplace(std::in_place_index<i>, values, surface);
      else
        ground.emplace(std::in_place_index<i>, values);
    };
    [&]<std::size_t... i>(std::index_sequence<i...>) {
      ((kind == i ? (build(std::integral_constant<std::size_t, i>{}), 0) : 0), ...);
    }
    (std::make_index_sequence<count>{});
    return std::move(ground.value());
  }
  /// The keys present that kind `kind` does not read, each with the kind of ground it belongs to
  /// and that kind's required keys that are missing (the words of a message).
  template <class HasKey>
  static std::vector<std::pair<std::string, std::string>> keys_of_others(std::size_t kind,
                                                                         HasKey&& has_key) {
    std::vector<std::pair<std::string, std::string>> out;
    const auto own = keys(kind);
    auto read_here = [&](const char* key) {
      return std::any_of(own.begin(), own.end(),
                         [&](const GroundKey& k) { return std::string_view(k.key) == key; });
    };
    for (std::size_t other = 0; other < count; ++other) {
      if (other == kind) continue;
      for (const GroundKey& k : keys(other)) {
        if (!has_key(k.key) || read_here(k.key) ||
            std::any_of(out.begin(), out.end(), [&](const auto& o) { return o.first == k.key; }))
          continue;
        std::string missing;
        for (const GroundKey& r : keys(other))
          if (r.required && !has_key(r.key))
            missing += (missing.empty() ? "" : ", ") + std::string(r.key);
        out.emplace_back(k.key, "is a key of ground \"" + std::string(name(other)) + "\"" +
                                    (missing.empty() ? "" : ", which also needs " + missing) +
                                    ", not of the ground \"" + name(kind) +
                                    "\" this [site] describes");
      }
    }
    return out;
  }
};

using GroundKindsOf = GroundKinds<Grounds>;
inline constexpr std::size_t kGroundKinds = GroundKindsOf::count;
/// The most keys any ground reads.
inline constexpr std::size_t kMaxGroundKeys = GroundKindsOf::max_keys();
static_assert(GroundKindsOf::default_is_last(),
              "exactly one registered ground, the last, may require no key: it is the default");

/// A ground's number keys with their values (what a scenario report writes back; its file keys
/// are the scenario's to write, as given).
[[nodiscard]] inline std::vector<std::pair<const char*, double>> ground_settings(
    const Grounds& ground) {
  std::vector<std::pair<const char*, double>> out;
  std::visit(
      [&](const auto& g) {
        const auto values = g.values();
        for (std::size_t k = 0; k < values.size(); ++k)
          if (!g.keys[k].file) out.emplace_back(g.keys[k].key, values[k]);
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
