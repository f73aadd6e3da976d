#pragma once
// Trajectory recording and the regime report of one flight (used by `trace`): the points flown and
// the Reynolds and Mach ranges met along them, and the ratio of quadratic to linear drag. Where
// the flight left its models' ranges is watched by every flight (model_range.hpp), recorded or
// not.
#include <string>
#include <vector>

#include "flight/flight.hpp"

namespace strewn {

struct RecordedPoint {
  TrajectoryPoint point;
  double reynolds;             ///< rho |u| L / mu with the body's drag length L
  double mach;                 ///< |u| / a (0 where the medium has no speed of sound)
  double quadratic_to_linear;  ///< (1/2 rho Cq A |u|^2) / (3 pi mu L |u|) = Re Cq / 24
  double air_speed;            ///< |u|, m/s
  double density;              ///< kg/m^3
  Eigen::Vector2d wind;        ///< m/s
};

struct Range {
  double min = std::numeric_limits<double>::infinity();
  double max = -std::numeric_limits<double>::infinity();
  void add(double v) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  [[nodiscard]] bool empty() const { return min > max; }
};

class TrajectoryRecorder : public FlightObserver {
 public:
  void record(const TrajectoryPoint& point, const Forces& forces) override;

  [[nodiscard]] const std::vector<RecordedPoint>& points() const { return points_; }
  [[nodiscard]] const Range& reynolds() const { return reynolds_; }
  [[nodiscard]] const Range& mach() const { return mach_; }
  [[nodiscard]] const Range& quadratic_to_linear() const { return ratio_; }
  [[nodiscard]] const Range& altitude() const { return altitude_; }

 private:
  std::vector<RecordedPoint> points_;
  Range reynolds_, mach_, ratio_, altitude_;
};

}  // namespace strewn
