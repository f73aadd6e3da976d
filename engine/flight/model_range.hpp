#pragma once
// Where one flight leaves the ranges in which its models hold, watched on every flight (studies
// and `trace` alike) so that no sample leaves them unnoticed.
//
// What is watched, at the release and at the end of every accepted step:
// - the Reynolds number of the body's own drag law (Re = rho |u| L / mu), against the law's range
//   (each law's `validity`: sphere Re <= 1e6, shape Re <= 2.6e5, stokes Re <= 1, area Re >= 1e3);
// - the Mach number |u| / a, against the Mach table's last Mach number, or against 0.3 without a
//   table (compressibility ignored above it; common practice);
// - the highest altitude, against the medium's top (a sounding's last level, US76's 86 km) and
//   the wind profile's top layer (above it the wind is held).
// The drag law is judged only where its drag is at least 1 % of the body's weight
// (kDragShareWatched) and while the body's own drag acts (not under an open canopy): at the first
// instants of a drop from rest the air speed, hence Re, is near zero, but the drag is too small
// for its law to move the body, and flagging it would bury the warnings that matter.
//
// A landed flight also carries two estimates of what the flat, non-rotating frame leaves out
// (docs/model.md, "Frame and units"):
// - curvature: over a horizontal range R the true ground lies R^2 / (2 r0) below the plane, and a
//   body descending at an angle theta lands about R^2 / (2 r0 tan theta) further on; and gravity,
//   which points to the Earth's centre, leans back toward the origin by x / r0 at a range x <= R,
//   moving a body by at most g R T min(tau, T / 2) / r0 (tau as below; T / 2 for a ballistic
//   one). The two are added as sizes (they partly cancel);
// - Earth's rotation: the Coriolis acceleration 2 Omega x v (|.| <= 2 Omega |v|) displaces a body
//   by about 2 Omega L min(tau, T / 2) over a path of length L flown in time T: a drag-bound body
//   settles to a velocity offset 2 Omega |v| tau within its relaxation time tau (taken as the
//   impact speed over g, an upper value), a ballistic one drifts by Omega |v| T^2 = Omega L T.
//   L is taken as the horizontal range plus the height fallen plus twice any climb above the
//   release. An order-of-magnitude estimate meant to say when the frame matters, not a correction.
#include <array>
#include <cstdint>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "core/enum_names.hpp"
#include "flight/body.hpp"

namespace strewn {

struct FlightResult;

/// The ways a flight can leave its models' ranges, as bits of RegimeExtent::flags.
enum ModelRangeFlag : std::uint8_t {
  kReynoldsAboveLaw = 1u << 0,  ///< Reynolds number above the drag law's range
  kReynoldsBelowLaw = 1u << 1,  ///< below it (a constant Cd below the Newton regime)
  kMachBeyondTable = 1u << 2,   ///< Mach number beyond the Mach table's last entry
  kMachWithoutTable = 1u << 3,  ///< above Mach 0.3 with no Mach table
  kAboveMedium = 1u << 4,       ///< above the medium's top (its top values were held)
  kAboveWind = 1u << 5,         ///< above the wind profile's top layer (its wind was held)
  // Where the models' assumptions stop being plausible:
  kLongFlight = 1u << 6,   ///< longer than kLongFlightTime: a wind held steady for hours
  kFrameOffset = 1u << 7,  ///< curvature or rotation moves the impact more than the tolerance
};
inline constexpr int kModelRangeFlagCount = 8;
/// A flight longer than this (s) has flown through a wind held steady for over an hour, which
/// real winds are not: they are observed and forecast hour by hour (common practice).
inline constexpr double kLongFlightTime = 3600.0;

/// A flag's name in files ("reynolds_above_law", ...).
template <>
struct EnumNames<ModelRangeFlag> {
  static constexpr std::array names{std::pair{kReynoldsAboveLaw, "reynolds_above_law"},
                                    std::pair{kReynoldsBelowLaw, "reynolds_below_law"},
                                    std::pair{kMachBeyondTable, "mach_beyond_table"},
                                    std::pair{kMachWithoutTable, "mach_without_table"},
                                    std::pair{kAboveMedium, "above_medium"},
                                    std::pair{kAboveWind, "above_wind"},
                                    std::pair{kLongFlight, "long_flight"},
                                    std::pair{kFrameOffset, "frame_offset"}};
};
inline const char* to_string(ModelRangeFlag flag) {
  return name_of(flag);
}

/// The limits a flight is held against (from its body and environment).
struct ModelLimits {
  double reynolds_min = 0.0;  ///< the drag law's range
  double reynolds_max = std::numeric_limits<double>::infinity();
  double mach_max = 0.3;                                        ///< the table's last Mach, or 0.3
  bool mach_table = false;                                      ///< a Mach table is given
  double medium_top = std::numeric_limits<double>::infinity();  ///< m above mean sea level
  double wind_top = std::numeric_limits<double>::infinity();    ///< m; infinite for one layer
  DragModel drag_model = drag_model_of<AreaDrag>();             ///< the body's law
};
ModelLimits model_limits(const Body& body, const Environment& environment);

/// The limit a flag is held against, in its own unit (Reynolds number, Mach number, m).
double limit_of(ModelRangeFlag flag, const ModelLimits& limits);

/// What one flight met beyond its models' ranges: the most extreme Reynolds and Mach numbers
/// beyond the drag law's range and the Mach limit (NaN when the flight stayed within them), the
/// highest altitude reached, and the flags. Points are taken at the release, at the end of every
/// accepted step and at the events; a quick bound on the air speed (the body's speed plus or
/// minus the strongest wind) skips the exact evaluation where the point is plainly in range, so
/// the values beyond the ranges are exact at those points and the watch costs the force loop
/// almost nothing. The quasi-steady part of a fall is judged at its start and at the impact,
/// between which the settling speed changes monotonically with the air.
struct RegimeExtent {
  double reynolds_beyond = std::numeric_limits<double>::quiet_NaN();
  double mach_beyond = std::numeric_limits<double>::quiet_NaN();
  double altitude_max = -std::numeric_limits<double>::infinity();
  std::uint8_t flags = 0;
};

/// The extreme that a flag is about: the Reynolds number beyond the law's range, the Mach number
/// beyond its limit, or the highest altitude (NaN for the plausibility flags, whose figures are
/// the flight's time and offsets).
double extreme_of(ModelRangeFlag flag, const RegimeExtent& extent);

/// A plain-language sentence on a model-range flag, given the extreme met and the limit, e.g.
/// "the Reynolds number reached 284, above 1 where Stokes (linear) drag underestimates the drag;
/// consider the sphere model".
std::string describe(ModelRangeFlag flag, double extreme, double limit, DragModel model);
/// The sentences of the plausibility flags: a flight of `time` seconds; impact offsets of
/// `curvature` and `rotation` metres against the study tolerance.
std::string describe_long_flight(double time);
std::string describe_frame_offset(double curvature, double rotation, double tolerance);

/// Every warning on one flight (`trace`): a flight that did not land, each flag, in words.
std::vector<std::string> flight_warnings(const FlightResult& result, const ModelLimits& limits,
                                         double tolerance);

/// Share of the weight at or above which the drag law is judged.
inline constexpr double kDragShareWatched = 0.01;
/// Earth's rotation rate, rad/s (WGS 84, NIMA TR8350.2, table 3.1).
inline constexpr double kEarthRotationRate = 7.292115e-5;

}  // namespace strewn
