#include "flight/trajectory.hpp"

#include <cmath>

#include "core/text.hpp"

namespace strewn {

void TrajectoryRecorder::record(const TrajectoryPoint& point, const Forces& forces) {
  if (!points_.empty() && points_.back().point.time == point.time) return;  // stage boundary
  if (points_.empty()) {
    drag_ = forces.drag().spec();
    medium_bottom_ = forces.medium().bottom();
    medium_top_ = forces.medium().top();
  }
  const double z = point.position.z();
  const Air air = forces.medium().air(z, forces.conditions());
  const Eigen::Vector2d w = forces.wind().at(z);
  const Vec3 u = point.velocity - Vec3(w.x(), w.y(), 0.0);
  const double speed = u.norm();
  const DragLaw& law = forces.drag();
  const double re = air.density * speed * law.length() / air.viscosity;
  const double mach = std::isfinite(air.sound_speed) ? speed / air.sound_speed : 0.0;
  const double ratio = re > 0.0 ? re * law.quadratic_cd(re, mach) / 24.0 : 0.0;
  points_.push_back({point, re, mach, ratio, speed, air.density, w});
  altitude_.add(z);
  if (!forces.medium().covers(z)) left_medium_ = true;
  // Ranges describe the body's own drag law, so canopy stages and the quasi-steady form are
  // counted too (the body still moves through that air) but a zero air speed is not.
  if (speed > 0.0) {
    reynolds_.add(re);
    mach_.add(mach);
    ratio_.add(ratio);
  }
}

std::vector<std::string> TrajectoryRecorder::warnings(const FlightResult& result) const {
  std::vector<std::string> out;
  if (result.status != FlightStatus::landed)
    out.push_back(std::string("the flight did not land: ") + to_string(result.status));
  if (reynolds_.empty()) return out;
  const DragSpec& spec = drag_;
  auto number = [](double v) { return printf_text("%.3g", v); };  // three significant figures
  switch (spec.model) {
    case DragModel::sphere:
      if (reynolds_.max > drag::kMorrisonMaxReynolds)
        out.push_back("Reynolds number reached " + number(reynolds_.max) +
                      ", above 1e6 where the Morrison (2013) sphere correlation ends");
      break;
    case DragModel::shape:
      if (reynolds_.max > drag::kHaiderLevenspielMaxReynolds)
        out.push_back("Reynolds number reached " + number(reynolds_.max) +
                      ", above 2.6e5 where the Haider-Levenspiel (1989) correlation ends");
      break;
    case DragModel::stokes:
      if (reynolds_.max > drag::kStokesMaxReynolds)
        out.push_back("Reynolds number reached " + number(reynolds_.max) +
                      ": Stokes (linear) drag underestimates the drag above Re ~ 1; consider "
                      "the sphere model");
      break;
    case DragModel::area:
      if (reynolds_.min < drag::kAreaMinReynolds)
        out.push_back("Reynolds number fell to " + number(reynolds_.min) +
                      ": a constant drag coefficient assumes the Newton regime (Re > ~1e3)");
      break;
  }
  if (spec.mach_table == nullptr && mach_.max > drag::kIncompressibleMaxMach)
    out.push_back("Mach number reached " + number(mach_.max) +
                  " without a Mach table: compressibility is ignored above Mach 0.3");
  if (spec.mach_table != nullptr && mach_.max > spec.mach_table->highest_mach())
    out.push_back("Mach number reached " + number(mach_.max) +
                  ", beyond the Mach table; its last factor was held");
  if (left_medium_)
    out.push_back("the flight left the altitude range of the medium (" + number(medium_bottom_) +
                  " .. " + number(medium_top_) + " m); the end values were held");
  return out;
}

}  // namespace strewn
