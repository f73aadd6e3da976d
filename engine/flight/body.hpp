#pragma once
// What one flight carries: the body's numbers (already sampled or nominal), its parachute stage,
// where and how it is released, and the medium it falls through.
#include <array>
#include <cstdint>
#include <limits>
#include <utility>

#include "core/enum_names.hpp"
#include "core/geometry.hpp"
#include "flight/drag.hpp"
#include "flight/ground.hpp"
#include "medium/medium.hpp"
#include "medium/wind.hpp"

namespace strewn {

/// What the canopy did on this flight.
enum class CanopyState : std::uint8_t {
  none = 0,     ///< the body has no parachute
  full = 1,     ///< opened to its full drag area
  partial = 2,  ///< opened only partly (the partial drag area)
  failed = 3,   ///< never opened
};
template <>
struct EnumNames<CanopyState> {
  static constexpr std::array names{
      std::pair{CanopyState::none, "none"}, std::pair{CanopyState::full, "full"},
      std::pair{CanopyState::partial, "partial"}, std::pair{CanopyState::failed, "failed"}};
};
inline const char* to_string(CanopyState state) {
  return name_of(state);
}

/// A parachute stage. Deployment by time after release or by height above the ground; then the
/// drag area ramps linearly in time from the body's own Cd A to the canopy's Cd S over fill_time.
struct Canopy {
  enum class Trigger { time, height };
  Trigger trigger = Trigger::time;
  double deploy_after = 0.0;   ///< s after release (trigger time), >= 0
  double deploy_height = 0.0;  ///< m above ground (trigger height), > 0
  double fill_time = 0.0;      ///< s, >= 0
  double drag_area = 0.0;      ///< Cd S of the canopy as opened on this flight, m^2
  CanopyState state = CanopyState::full;
};

struct Body {
  double mass = 1.0;    ///< kg, > 0
  DragSpec drag;        ///< the body's own drag
  double volume = 0.0;  ///< m^3; > 0 enables buoyancy, 0 means unknown (no buoyancy)
  bool has_canopy = false;
  Canopy canopy;

  /// What the canopy did on this flight (none without a parachute).
  [[nodiscard]] CanopyState canopy_state() const {
    return has_canopy ? canopy.state : CanopyState::none;
  }
};

/// Position (m, local frame, z above mean sea level) and ground-relative velocity (m/s) at release.
struct ReleaseState {
  Vec3 position = Vec3::Zero();
  Vec3 velocity = Vec3::Zero();
};

/// The medium, its per-flight conditions, the wind and the ground (ground.hpp; a number is a
/// level ground at that elevation, m above sea level). Medium and wind are shared and must
/// outlive the flight.
struct Environment {
  const Medium* medium = nullptr;
  MediumConditions conditions;
  const WindProfile* wind = nullptr;
  Grounds ground = LevelGround{};
  /// Gravity held at g0 everywhere instead of the inverse-square law. Closed-form solutions assume
  /// it (the analytic tests use it); studies keep the default.
  bool constant_gravity = false;
};

}  // namespace strewn
