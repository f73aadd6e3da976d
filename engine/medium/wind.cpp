#include "medium/wind.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include "core/geometry.hpp"

namespace strewn {

WindProfile::WindProfile(const std::vector<WindLayer>& layers, double ground) : ground_(ground) {
  for (std::size_t i = 0; i < layers.size(); ++i) {
    const auto& l = layers[i];
    if (!(std::isfinite(l.altitude) && std::isfinite(l.speed) && l.speed >= 0.0 &&
          std::isfinite(l.from)))
      throw std::invalid_argument("wind layer " + std::to_string(i) +
                                  ": altitude, speed (>= 0) and direction must be finite");
    if (i > 0 && !(l.altitude > layers[i - 1].altitude))
      throw std::invalid_argument("wind layers must have strictly increasing altitudes");
    altitude_.push_back(l.altitude);
    const Eigen::Vector2d v = wind_from(l.speed, l.from);
    east_.push_back(v.x());
    north_.push_back(v.y());
  }
  derive();
}

void WindProfile::assign_perturbed(const WindProfile& base, std::span<const double> add_east,
                                   std::span<const double> add_north) {
  ground_ = base.ground_;
  altitude_.assign(base.altitude_.begin(), base.altitude_.end());
  east_.resize(base.east_.size());
  north_.resize(base.north_.size());
  for (std::size_t i = 0; i < altitude_.size(); ++i) {
    east_[i] = base.east_[i] + add_east[i];
    north_[i] = base.north_[i] + add_north[i];
  }
  derive();
}

void WindProfile::derive() {
  const std::size_t n = altitude_.size();
  constexpr double kInfinity = std::numeric_limits<double>::infinity();
  // One piece per interval between layers and one above the top; keeps the storage it has.
  pieces_.resize(std::max<std::size_t>(n, 1));
  bottom_ = n > 0 ? altitude_.front() : -kInfinity;
  max_speed_ = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    Piece& piece = pieces_[i];
    if (i + 1 < n) {
      const double thickness = altitude_[i + 1] - altitude_[i];
      piece.top = altitude_[i + 1];
      piece.east_slope = (east_[i + 1] - east_[i]) / thickness;
      piece.north_slope = (north_[i + 1] - north_[i]) / thickness;
      piece.east_intercept = east_[i + 1] - piece.east_slope * altitude_[i + 1];
      piece.north_intercept = north_[i + 1] - piece.north_slope * altitude_[i + 1];
    } else {
      piece = Piece{kInfinity, east_[i], 0.0, north_[i], 0.0};
    }
    max_speed_ = std::max(max_speed_, std::hypot(east_[i], north_[i]));
  }
  if (n == 0) pieces_[0] = Piece{kInfinity, 0.0, 0.0, 0.0, 0.0};
  power_law_ = n > 0 && altitude_.front() - ground_ > kPowerLawFloor;
  max_change_ = 0.0;
  if (n > 0) {
    double min_e = east_[0], max_e = east_[0], min_n = north_[0], max_n = north_[0];
    auto hold = [&](double e, double nn) {
      min_e = std::min(min_e, e);
      max_e = std::max(max_e, e);
      min_n = std::min(min_n, nn);
      max_n = std::max(max_n, nn);
    };
    for (std::size_t i = 1; i < n; ++i) hold(east_[i], north_[i]);
    if (power_law_) {
      double e = 0.0, nn = 0.0;
      below_lowest(ground_, e, nn);  // the floor's vector
      hold(e, nn);
    }
    max_change_ = std::hypot(max_e - min_e, max_n - min_n);
  }
  kinks_.clear();  // keeps its capacity
  if (power_law_) kinks_.push_back(ground_ + kPowerLawFloor);
  kinks_.insert(kinks_.end(), altitude_.begin(), altitude_.end());
}

void WindProfile::below_lowest(double z, double& east, double& north) const {
  east = east_.front();
  north = north_.front();
  if (!power_law_) return;
  const double height = std::max(z - ground_, kPowerLawFloor);
  const double factor = std::pow(height / (altitude_.front() - ground_), kPowerLawExponent);
  east *= factor;
  north *= factor;
}

}  // namespace strewn
