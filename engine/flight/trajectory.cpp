#include "flight/trajectory.hpp"

#include <cmath>

namespace strewn {

void TrajectoryRecorder::record(const TrajectoryPoint& point, const Forces& forces) {
  if (!points_.empty() && points_.back().point.time == point.time) return;  // stage boundary
  const double z = point.position.z();
  const Air air = forces.air().air(z);
  const Eigen::Vector2d w = forces.wind().at(z);
  const Vec3 u = point.velocity - Vec3(w.x(), w.y(), 0.0);
  const double speed = u.norm();
  const DragLaw& law = forces.drag();
  const double re = air.density * speed * law.length() / air.viscosity;
  const double mach = std::isfinite(air.sound_speed) ? speed / air.sound_speed : 0.0;
  const double ratio = re > 0.0 ? re * law.quadratic_cd(re, mach) / 24.0 : 0.0;
  points_.push_back({point, re, mach, ratio, speed, air.density, w});
  altitude_.add(z);
  // Ranges describe the body's own drag law, so canopy stages and the quasi-steady form are
  // counted too (the body still moves through that air) but a zero air speed is not.
  if (speed > 0.0) {
    reynolds_.add(re);
    mach_.add(mach);
    ratio_.add(ratio);
  }
}

}  // namespace strewn
