#include "flight/drag.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "core/constants.hpp"

namespace strewn {

MachTable::MachTable(std::vector<double> mach, std::vector<double> factor)
    : mach_(std::move(mach)), factor_(std::move(factor)) {
  if (mach_.size() != factor_.size() || mach_.empty())
    throw std::invalid_argument("a Mach table needs one factor per Mach number");
  for (std::size_t i = 0; i < mach_.size(); ++i) {
    if (!(std::isfinite(mach_[i]) && mach_[i] >= 0.0))
      throw std::invalid_argument("Mach numbers must be finite and non-negative");
    if (!(std::isfinite(factor_[i]) && factor_[i] > 0.0))
      throw std::invalid_argument("Mach table factors must be finite and positive");
    if (i > 0 && !(mach_[i] > mach_[i - 1]))
      throw std::invalid_argument("Mach numbers must be strictly increasing");
  }
}

double MachTable::at(double mach) const {
  if (mach_.empty()) return 1.0;
  if (mach <= mach_.front()) return factor_.front();
  if (mach >= mach_.back()) return factor_.back();
  const auto upper = std::upper_bound(mach_.begin(), mach_.end(), mach);
  const auto i = static_cast<std::size_t>(upper - mach_.begin());
  const double f = (mach - mach_[i - 1]) / (mach_[i] - mach_[i - 1]);
  return factor_[i - 1] + f * (factor_[i] - factor_[i - 1]);
}

namespace drag {

double morrison_cd_re(double re) {
  // Morrison (2013): Cd = 24/Re + 2.6 (Re/5) / (1 + (Re/5)^1.52)
  //   + 0.411 (Re/2.63e5)^-7.94 / (1 + (Re/2.63e5)^-8.00) + 0.25 (Re/1e6) / (1 + Re/1e6).
  // The third term is rewritten as 0.411 x^0.06 / (1 + x^8), x = Re/2.63e5, which is the same
  // function without overflow at small Re.
  const double x5 = re / 5.0;
  const double x = re / 2.63e5;
  const double x2 = x * x, x4 = x2 * x2, x8 = x4 * x4;
  const double y = re / 1.0e6;
  const double rest = 2.6 * x5 / (1.0 + std::pow(x5, 1.52)) +
                      0.411 * std::pow(x, 0.06) / (1.0 + x8) + 0.25 * y / (1.0 + y);
  return 24.0 + re * rest;
}

double morrison_cd(double re) {
  return morrison_cd_re(re) / re;
}

double schiller_naumann_cd(double re) {
  return 24.0 / re * (1.0 + 0.15 * std::pow(re, 0.687));
}

HaiderLevenspiel::HaiderLevenspiel(double phi)
    : a(std::exp(2.3288 - 6.4581 * phi + 2.4486 * phi * phi)),
      b(0.0964 + 0.5565 * phi),
      c(std::exp(4.905 - 13.8944 * phi + 18.4222 * phi * phi - 10.2599 * phi * phi * phi)),
      d(std::exp(1.4681 + 12.2584 * phi - 20.7322 * phi * phi + 15.8855 * phi * phi * phi)) {}

double HaiderLevenspiel::cd_re(double re) const {
  return 24.0 * (1.0 + a * std::pow(re, b)) + c * re * re / (re + d);
}

double HaiderLevenspiel::cd(double re) const {
  return cd_re(re) / re;
}

}  // namespace drag

DragLaw::DragLaw(const DragSpec& spec) : spec_(spec) {
  switch (spec.model) {
    case DragModel::area:
      area_ = spec.area;
      length_ = std::sqrt(4.0 * spec.area / constants::pi);
      half_cd_area_ = 0.5 * spec.cd * spec.area;
      break;
    case DragModel::sphere:
    case DragModel::shape:
      length_ = spec.diameter;
      area_ = constants::pi * spec.diameter * spec.diameter / 4.0;
      viscous_factor_ = area_ / (2.0 * spec.diameter);
      needs_viscosity_ = true;
      if (spec.model == DragModel::shape) shape_ = drag::HaiderLevenspiel(spec.sphericity);
      break;
    case DragModel::stokes:
      length_ = spec.diameter;
      area_ = constants::pi * spec.diameter * spec.diameter / 4.0;
      stokes_factor_ = 3.0 * constants::pi * spec.diameter;
      needs_viscosity_ = true;
      break;
  }
}

double DragLaw::general_coefficient(double speed, const Air& air) const {
  const double factor = spec_.mach_table ? spec_.mach_table->at(speed / air.sound_speed) : 1.0;
  switch (spec_.model) {
    case DragModel::area:
      return half_cd_area_ * air.density * speed * factor;
    case DragModel::sphere: {
      // k = 1/2 rho A |u| Cd = (A mu / 2D) (Cd Re), finite at |u| = 0.
      const double re = air.density * speed * length_ / air.viscosity;
      return viscous_factor_ * air.viscosity * drag::morrison_cd_re(re) * factor;
    }
    case DragModel::shape: {
      const double re = air.density * speed * length_ / air.viscosity;
      return viscous_factor_ * air.viscosity * shape_.cd_re(re) * factor;
    }
    case DragModel::stokes:
      return stokes_factor_ * air.viscosity;
  }
  return 0.0;
}

double DragLaw::cd(double re, double mach) const {
  const double m = mach_factor(mach);
  switch (spec_.model) {
    case DragModel::area:
      return spec_.cd * m;
    case DragModel::sphere:
      return drag::morrison_cd(re) * m;
    case DragModel::shape:
      return shape_.cd(re) * m;
    case DragModel::stokes:
      return 24.0 / re;
  }
  return 0.0;
}

double DragLaw::quadratic_cd(double re, double mach) const {
  const double m = mach_factor(mach);
  switch (spec_.model) {
    case DragModel::area:
      return spec_.cd * m;
    case DragModel::sphere:
      return (drag::morrison_cd_re(re) - 24.0) / re * m;
    case DragModel::shape:
      return (shape_.cd_re(re) - 24.0) / re * m;
    case DragModel::stokes:
      return 0.0;
  }
  return 0.0;
}

}  // namespace strewn
