#pragma once
// Drag laws. Every law gives the drag force on a body moving at velocity u relative to the air as
// F = -k u, with k >= 0 in kg/s; `coefficient()` returns k. Writing the force this way keeps it
// finite and smooth at u = 0 (the Stokes limit) for every model.
//
// Models (see docs/model.md for equations, sources and ranges):
// - sphere: standard drag curve of a smooth sphere, Morrison (2013), valid 0 < Re <= 1e6.
// - shape:  non-spherical particles by sphericity, Haider and Levenspiel (1989), valid Re < 2.6e5,
//           sphericity 0.026 .. 1.
// - area:   constant drag coefficient on a reference area (Newton regime, Re > ~1e3).
// - stokes: linear drag only, F = -3 pi mu D u (Stokes 1851), valid Re < ~1 (common practice).
// An optional Mach table multiplies Cd (not for stokes).
#include <array>
#include <string>
#include <utility>
#include <vector>

#include "core/enum_names.hpp"
#include "medium/medium.hpp"

namespace strewn {

enum class DragModel { sphere, shape, area, stokes };
template <>
struct EnumNames<DragModel> {
  static constexpr std::array names{
      std::pair{DragModel::sphere, "sphere"}, std::pair{DragModel::shape, "shape"},
      std::pair{DragModel::area, "area"}, std::pair{DragModel::stokes, "stokes"}};
};
inline const char* to_string(DragModel model) {
  return name_of(model);
}

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

namespace drag {
/// Morrison (2013), "Data correlation for drag coefficient for sphere", Cd of a smooth sphere.
double morrison_cd(double reynolds);
/// Cd Re for Morrison (2013), written to stay finite as Re -> 0 (tends to 24).
double morrison_cd_re(double reynolds);
/// Schiller and Naumann (1933), Cd = 24/Re (1 + 0.15 Re^0.687), Re < 800: the cross-check.
double schiller_naumann_cd(double reynolds);

/// Coefficients A, B, C, D of Haider and Levenspiel (1989), Powder Technol. 58:63-70, eq. (10).
struct HaiderLevenspiel {
  double a = 0.0, b = 0.0, c = 0.0, d = 0.0;
  HaiderLevenspiel() = default;  // unset: only `shape` bodies compute the coefficients
  explicit HaiderLevenspiel(double sphericity);
  [[nodiscard]] double cd(double reynolds) const;
  /// Cd Re = 24 (1 + A Re^B) + C Re^2 / (Re + D); finite as Re -> 0 (tends to 24).
  [[nodiscard]] double cd_re(double reynolds) const;
};

inline constexpr double kMorrisonMaxReynolds = 1.0e6;
inline constexpr double kHaiderLevenspielMaxReynolds = 2.6e5;
inline constexpr double kHaiderLevenspielMinSphericity = 0.026;
inline constexpr double kStokesMaxReynolds = 1.0;      // common practice
inline constexpr double kAreaMinReynolds = 1.0e3;      // Newton regime, common practice
inline constexpr double kIncompressibleMaxMach = 0.3;  // common practice
}  // namespace drag

/// The drag of one body: its model and numbers (already sampled or nominal).
struct DragSpec {
  DragModel model = DragModel::area;
  double cd = 1.0;          ///< area: drag coefficient
  double area = 1.0;        ///< area: reference area, m^2
  double diameter = 0.0;    ///< sphere, shape (volume-equivalent), stokes: m
  double sphericity = 1.0;  ///< shape
  /// Optional Cd multiplier against Mach (not owned: tables are shared by every flight of a body
  /// kind, so that building a flight allocates nothing). Null for none.
  const MachTable* mach_table = nullptr;
};

/// The evaluated drag law of one body, ready for the force loop.
class DragLaw {
 public:
  explicit DragLaw(const DragSpec& spec);

  /// k (kg/s) for air-relative speed |u| (m/s) in the given air, such that F = -k u.
  [[nodiscard]] double coefficient(double speed, const Air& air) const {
    // The constant-Cd law without a Mach table is the common case of studies: kept inline.
    if (spec_.model == DragModel::area && spec_.mach_table == nullptr)
      return half_cd_area_ * air.density * speed;
    return general_coefficient(speed, air);
  }

  /// Whether the law reads the viscosity or the speed of sound (to skip them otherwise).
  [[nodiscard]] bool needs_viscosity() const { return needs_viscosity_; }
  [[nodiscard]] bool needs_sound_speed() const { return spec_.mach_table != nullptr; }

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
  [[nodiscard]] double mach_factor(double mach) const {
    return spec_.mach_table ? spec_.mach_table->at(mach) : 1.0;
  }
  DragSpec spec_;
  double area_ = 0.0, length_ = 0.0;
  double half_cd_area_ = 0.0;    // area: Cd A / 2
  double viscous_factor_ = 0.0;  // sphere, shape: A / (2 D), so k = factor mu (Cd Re)
  double stokes_factor_ = 0.0;   // stokes: 3 pi D
  drag::HaiderLevenspiel shape_;
  bool needs_viscosity_ = false;
};

}  // namespace strewn
