#pragma once
// The horizontal wind as a function of altitude, immutable once built.
//
// Layers are given as (altitude above mean sea level, speed, direction the wind blows *from*);
// between layers the east and north components are interpolated linearly in altitude. Above the
// top layer the wind is constant. Below the lowest layer, when that layer stands more than 10 m
// above the ground, the speed falls toward the ground by the 1/7 power law (common practice for a
// neutral surface layer), w(z) = w(z_low) ((z - ground) / (z_low - ground))^(1/7), held constant
// below 10 m above the ground; otherwise the lowest layer's wind holds down to the ground.
// There is no vertical wind.
#include <Eigen/Core>
#include <cstddef>
#include <limits>
#include <span>
#include <vector>

namespace strewn {

struct WindLayer {
  double altitude;  ///< m above mean sea level
  double speed;     ///< m/s, >= 0
  double from;      ///< degrees clockwise from true north, [0, 360]
};

class WindProfile {
 public:
  /// Calm air.
  WindProfile() = default;
  /// Layers sorted by strictly increasing altitude, speeds >= 0 and finite.
  /// Throws std::invalid_argument otherwise.
  WindProfile(const std::vector<WindLayer>& layers, double ground);

  /// Wind velocity (east, north), m/s, at altitude z (m above mean sea level).
  [[nodiscard]] Eigen::Vector2d at(double altitude) const {
    double east = 0.0, north = 0.0;
    at(altitude, east, north);
    return {east, north};
  }
  /// The same into two numbers (the force loop's form: no vector temporaries).
  void at(double z, double& east, double& north) const {
    if (z <= bottom_) {
      below_lowest(z, east, north);
      return;
    }
    // Profiles have few layers: a linear scan beats a binary search, and the last piece reaches
    // to infinity, so the scan needs no bound. Each piece is intercept + slope * z, one
    // multiply-add on the force loop's critical path.
    const Piece* piece = pieces_.data();
    while (z > piece->top) ++piece;
    east = piece->east_intercept + piece->east_slope * z;
    north = piece->north_intercept + piece->north_slope * z;
  }

  /// Makes this profile `base` with (east, north) added at each of its layers, reusing this
  /// profile's storage when it already has as many layers (so a study's samples allocate
  /// nothing). Negative speeds cannot arise: the components are perturbed, not the speed.
  void assign_perturbed(const WindProfile& base, std::span<const double> add_east,
                        std::span<const double> add_north);

  [[nodiscard]] bool calm() const { return altitude_.empty(); }
  [[nodiscard]] std::size_t layers() const { return altitude_.size(); }
  /// Largest wind speed anywhere in the profile, m/s.
  [[nodiscard]] double max_speed() const { return max_speed_; }
  /// A bound on the largest difference between the wind vectors at any two altitudes, m/s: the
  /// diagonal of the box holding every layer's vector and the power-law floor's (the profile is
  /// a path through those vertices, so no two of its points lie farther apart). Zero for a
  /// uniform wind.
  [[nodiscard]] double max_change() const { return max_change_; }
  /// Altitudes of the layers, m.
  [[nodiscard]] const std::vector<double>& layer_altitudes() const { return altitude_; }
  /// Altitudes where the profile's slope jumps (the layers and the power-law floor), ascending, m.
  /// Integrators end their steps on these so the forces are smooth inside each step.
  [[nodiscard]] const std::vector<double>& kinks() const { return kinks_; }

  static constexpr double kPowerLawExponent = 1.0 / 7.0;
  static constexpr double kPowerLawFloor = 10.0;  ///< m above ground below which it is constant

 private:
  void below_lowest(double z, double& east, double& north) const;
  void derive();  // slopes, intercepts, largest speed and kinks from the layer values
  std::vector<double> altitude_;
  std::vector<double> east_, north_;
  // The profile above the lowest layer, piece by piece: piece i spans (altitude_[i],
  // altitude_[i+1]] (the last one up to infinity, constant), wind = intercept + slope * z there.
  // Calm air is a single still piece over everything.
  struct Piece {
    double top;
    double east_intercept, east_slope, north_intercept, north_slope;
  };
  std::vector<Piece> pieces_{Piece{std::numeric_limits<double>::infinity(), 0.0, 0.0, 0.0, 0.0}};
  double bottom_ = -std::numeric_limits<double>::infinity();  // the lowest layer's altitude
  std::vector<double> kinks_;
  double ground_ = 0.0;
  double max_speed_ = 0.0;
  double max_change_ = 0.0;
  bool power_law_ = false;
};

}  // namespace strewn
