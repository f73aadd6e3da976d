#pragma once
// What every drag law declares beside its equations, so that reading, checking, sampling and
// reporting it need no code of their own (see drag.hpp for the list of laws and DEVELOPERS.md,
// "Adding a drag law"):
//   static constexpr const char* name;                  // the scenario's `model = "..."`
//   static constexpr std::array<DragInput, N> inputs;   // the keys of [body.drag] it reads
//   static constexpr bool takes_mach_table;             // whether a Mach table may multiply Cd
//   static constexpr bool linear;                       // k independent of the speed
//   static constexpr DragValidity validity;             // its Reynolds range, in words too
//   explicit Law(std::span<const double, N> values);    // built from its inputs' values
//   std::array<double, N> values() const;               // the same values back (for reports)
//   double coefficient(double speed, const Air&) const; // k, kg/s, F = -k u, without Mach factor
//   double cd_at(double re) const, quadratic_cd(double re) const;  // Cd, and its non-Stokes part
//   double length() const, reference_area() const, volume() const;  // volume 0: unknown
//   static constexpr bool needs_viscosity;
// and, for a law with a constant Cd A (the quick path of the force loop), a member
// `half_cd_area` (Cd A / 2, m^2).
#include <limits>

#include "core/bounds.hpp"

namespace strewn {

/// One number a drag law reads from its [body.drag] table. Each is an uncertain input of the
/// scenario, sampled per flight under the name "<body>.drag.<key>".
struct DragInput {
  const char* key;
  Bounds bounds;
  bool required;
  double fallback;  ///< the value when an optional key is absent
  const char* meaning;
};

/// The Reynolds range where a law holds, with the words that explain a flight beyond it.
struct DragValidity {
  double reynolds_min = 0.0;
  double reynolds_max = std::numeric_limits<double>::infinity();
  const char* above = "";  ///< completes "the Reynolds number reached X, above Y ..."
  const char* below = "";  ///< completes "the Reynolds number fell to X, below Y ..."
};

namespace drag {
inline constexpr double kIncompressibleMaxMach = 0.3;  // common practice
}  // namespace drag

}  // namespace strewn
