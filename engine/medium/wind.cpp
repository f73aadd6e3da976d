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
    double east_slope = 0.0, north_slope = 0.0;
    if (i > 0) {
      const double thickness = l.altitude - altitude_[i - 1];
      east_slope = (east_[i] - east_[i - 1]) / thickness;
      north_slope = (north_[i] - north_[i - 1]) / thickness;
    }
    east_slope_.push_back(east_slope);
    north_slope_.push_back(north_slope);
    east_intercept_.push_back(east_[i] - east_slope * l.altitude);
    north_intercept_.push_back(north_[i] - north_slope * l.altitude);
    max_speed_ = std::max(max_speed_, l.speed);
  }
  power_law_ = !altitude_.empty() && altitude_.front() - ground_ > kPowerLawFloor;
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
