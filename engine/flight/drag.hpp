#pragma once
// Drag laws. Every law gives the drag force on a body moving at velocity u relative to the air as
// F = -k u, with k >= 0 in kg/s; `coefficient()` returns k. Writing the force this way keeps it
// finite and smooth at u = 0 (the Stokes limit) for every model.
//
// Each law is one file under drag_laws/ (its equations, the keys it reads with their bounds, its
// range of validity) and one entry in `DragLaws` below; nothing else names it. Today's laws (see
// docs/model.md for equations, sources and ranges):
// - area:   constant drag coefficient on a reference area (Newton regime, Re > ~1e3);
// - sphere: standard drag curve of a smooth sphere, Morrison (2013), valid 0 < Re <= 1e6;
// - shape:  non-spherical particles by sphericity, Haider and Levenspiel (1989), Re < 2.6e5;
// - stokes: linear drag only, F = -3 pi mu D u (Stokes 1851), valid Re < ~1 (common practice);
// and an optional Mach table that multiplies Cd (for the laws that take one).
#include <array>
#include <cstddef>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "flight/drag_laws/area.hpp"
#include "flight/drag_laws/shape.hpp"
#include "flight/drag_laws/sphere.hpp"
#include "flight/drag_laws/stokes.hpp"
#include "medium/medium.hpp"

namespace strewn {

/// The registered drag laws: adding one is its file under drag_laws/ and its type here (in the
/// order that messages and docs/scenario.md list them).
using DragLaws = std::variant<SphereDrag, ShapeDrag, AreaDrag, StokesDrag>;

/// Which law, by its place in DragLaws (what a scenario's `model = "..."` chooses).
using DragModel = std::size_t;
inline constexpr std::size_t kDragModels = std::variant_size_v<DragLaws>;
/// The model of a law's type.
template <class Law>
constexpr DragModel drag_model_of() {
  return DragLaws(Law{}).index();
}
/// The most inputs any law reads.
inline constexpr std::size_t kMaxDragInputs = [] {
  std::size_t most = 0;
  [&]<std::size_t... i>(std::index_sequence<i...>) {
    ((most = std::max(most, std::variant_alternative_t<i, DragLaws>::inputs.size())), ...);
  }
  (std::make_index_sequence<kDragModels>{});
  return most;
}();

/// What the rest of strewn knows of a law without its type: name, inputs, validity.
struct DragModelFacts {
  const char* name;
  std::span<const DragInput> inputs;
  bool takes_mach_table;
  DragValidity validity;
};
[[nodiscard]] const DragModelFacts& drag_model_facts(DragModel model);
/// The model of a name, nullopt for none.
[[nodiscard]] std::optional<DragModel> drag_model_named(std::string_view name);
/// Every law's name, in registration order (for messages).
[[nodiscard]] const std::vector<std::string>& drag_model_names();
[[nodiscard]] inline const char* drag_model_name(DragModel model) {
  return drag_model_facts(model).name;
}

/// A law's inputs' values, in the order of its `inputs`.
struct DragValues {
  std::array<double, kMaxDragInputs> value{};
  std::size_t size = 0;
  [[nodiscard]] std::span<const double> view() const { return {value.data(), size}; }
};
/// Builds law `model` from its inputs' values (as many as it declares; allocates nothing).
[[nodiscard]] DragLaws make_drag_law(DragModel model, std::span<const double> values);
[[nodiscard]] DragValues drag_values(const DragLaws& law);

/// A piecewise-linear multiplier of Cd against Mach number, held constant beyond its ends.
class MachTable {
 public:
  MachTable() = default;
  /// Mach numbers strictly increasing and >= 0, factors positive; throws std::invalid_argument.
  MachTable(std::vector<double> mach, std::vector<double> factor);
  [[nodiscard]] bool empty() const { return mach_.empty(); }
  [[nodiscard]] double at(double mach) const;
  [[nodiscard]] double highest_mach() const { return mach_.empty() ? 0.0 : mach_.back(); }
  [[nodiscard]] const std::vector<double>& mach() const { return mach_; }
  [[nodiscard]] const std::vector<double>& factor() const { return factor_; }

 private:
  std::vector<double> mach_, factor_;
};

/// The drag of one body: its law with its numbers (already sampled or nominal).
struct DragSpec {
  DragLaws law = AreaDrag{};
  /// Optional Cd multiplier against Mach (not owned: tables are shared by every flight of a body
  /// kind, so that building a flight allocates nothing). Null for none.
  const MachTable* mach_table = nullptr;
  [[nodiscard]] DragModel model() const { return law.index(); }
};

/// The evaluated drag law of one body, ready for the force loop.
class DragLaw {
 public:
  explicit DragLaw(const DragSpec& spec);

  /// k (kg/s) for air-relative speed |u| (m/s) in the given air, such that F = -k u.
  [[nodiscard]] double coefficient(double speed, const Air& air) const {
    // The constant-Cd law without a Mach table is the common case of studies: kept inline.
    if (constant_cd_) return half_cd_area_ * air.density * speed;
    return general_coefficient(speed, air);
  }

  /// Whether the law reads the viscosity or the speed of sound (to skip them otherwise).
  [[nodiscard]] bool needs_viscosity() const { return needs_viscosity_; }
  [[nodiscard]] bool needs_sound_speed() const { return mach_table_ != nullptr; }
  /// A constant Cd A without a Mach table: k = (Cd A / 2) rho |u|.
  [[nodiscard]] bool constant_cd() const { return constant_cd_; }
  /// Cd A / 2 (m^2) of a constant-Cd law, 0 otherwise.
  [[nodiscard]] double half_cd_area() const { return half_cd_area_; }
  /// k independent of the speed (Stokes drag).
  [[nodiscard]] bool linear() const { return linear_; }

  /// Length used for the Reynolds number: the diameter, or for `area` the diameter of the circle
  /// of the reference area.
  [[nodiscard]] double length() const { return length_; }
  /// Reference area, m^2 (pi D^2 / 4 for the diameter models).
  [[nodiscard]] double reference_area() const { return area_; }
  /// Drag coefficient at a Reynolds and Mach number (for reports; Stokes: 24/Re).
  [[nodiscard]] double cd(double reynolds, double mach) const;
  /// The part of Cd that is not the Stokes term 24/Re (all of it for `area`, none for `stokes`).
  [[nodiscard]] double quadratic_cd(double reynolds, double mach) const;
  [[nodiscard]] const DragSpec& spec() const { return spec_; }

 private:
  [[nodiscard]] double general_coefficient(double speed, const Air& air) const;
  DragSpec spec_;
  const MachTable* mach_table_ = nullptr;  // only for laws that take one
  double area_ = 0.0, length_ = 0.0;
  double half_cd_area_ = 0.0;
  bool constant_cd_ = false, needs_viscosity_ = false, linear_ = false;
};

}  // namespace strewn
