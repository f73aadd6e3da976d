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
    velocity_.push_back(wind_from(l.speed, l.from));
    max_speed_ = std::max(max_speed_, l.speed);
  }
  power_law_ = !altitude_.empty() && altitude_.front() - ground_ > kPowerLawFloor;
  if (power_law_) kinks_.push_back(ground_ + kPowerLawFloor);
  kinks_.insert(kinks_.end(), altitude_.begin(), altitude_.end());
}

Eigen::Vector2d WindProfile::at(double z) const {
  if (altitude_.empty()) return Eigen::Vector2d::Zero();
  if (z >= altitude_.back()) return velocity_.back();
  if (z <= altitude_.front()) {
    if (!power_law_) return velocity_.front();
    const double height = std::max(z - ground_, kPowerLawFloor);
    return velocity_.front() *
           std::pow(height / (altitude_.front() - ground_), kPowerLawExponent);
  }
  const auto upper = std::upper_bound(altitude_.begin(), altitude_.end(), z);
  const auto i = static_cast<std::size_t>(upper - altitude_.begin());
  const double f = (z - altitude_[i - 1]) / (altitude_[i] - altitude_[i - 1]);
  return velocity_[i - 1] + f * (velocity_[i] - velocity_[i - 1]);
}

}  // namespace strewn
