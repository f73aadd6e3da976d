#include "flight/model_range.hpp"

#include <cmath>

#include "core/text.hpp"
#include "flight/flight.hpp"

namespace strewn {

ModelLimits model_limits(const Body& body, const Environment& environment) {
  ModelLimits l;
  l.drag_model = body.drag.model();
  const DragValidity& validity = drag_model_facts(l.drag_model).validity;
  l.reynolds_min = validity.reynolds_min;
  l.reynolds_max = validity.reynolds_max;
  if (body.drag.mach_table != nullptr && !body.drag.mach_table->empty()) {
    l.mach_table = true;
    l.mach_max = body.drag.mach_table->highest_mach();
  } else {
    l.mach_max = drag::kIncompressibleMaxMach;
  }
  if (environment.medium != nullptr) l.medium_top = environment.medium->top();
  // One layer is a uniform wind, defined everywhere; with two or more, the wind above the top
  // layer is the top layer's, held.
  if (environment.wind != nullptr && environment.wind->layers() >= 2)
    l.wind_top = environment.wind->layer_altitudes().back();
  return l;
}

double limit_of(ModelRangeFlag flag, const ModelLimits& l) {
  switch (flag) {
    case kReynoldsAboveLaw:
      return l.reynolds_max;
    case kReynoldsBelowLaw:
      return l.reynolds_min;
    case kMachBeyondTable:
    case kMachWithoutTable:
      return l.mach_max;
    case kAboveMedium:
      return l.medium_top;
    case kAboveWind:
      return l.wind_top;
    case kLongFlight:
    case kFrameOffset:
      break;
  }
  return std::nan("");
}

double extreme_of(ModelRangeFlag flag, const RegimeExtent& e) {
  switch (flag) {
    case kReynoldsAboveLaw:
    case kReynoldsBelowLaw:
      return e.reynolds_beyond;
    case kMachBeyondTable:
    case kMachWithoutTable:
      return e.mach_beyond;
    case kAboveMedium:
    case kAboveWind:
      return e.altitude_max;
    case kLongFlight:
    case kFrameOffset:
      break;
  }
  return std::nan("");
}

namespace {
// Lengths without exponents: whole metres from 100 m, three significant figures below.
std::string metres(double v) {
  return std::abs(v) >= 100.0 ? printf_text("%.0f", v) : printf_text("%.3g", v);
}
}  // namespace

std::string describe(ModelRangeFlag flag, double extreme, double limit, DragModel model) {
  auto number = [](double v) { return printf_text("%.3g", v); };  // three significant figures
  switch (flag) {
    case kReynoldsAboveLaw:
      return "the Reynolds number reached " + number(extreme) + ", above " + number(limit) +
             drag_model_facts(model).validity.above;
    case kReynoldsBelowLaw:
      return "the Reynolds number fell to " + number(extreme) + ", below " + number(limit) +
             drag_model_facts(model).validity.below;
    case kMachBeyondTable:
      return "the Mach number reached " + number(extreme) + ", beyond the Mach table's last Mach " +
             number(limit) + "; its last factor was held";
    case kMachWithoutTable:
      return "the Mach number reached " + number(extreme) +
             " without a Mach table: " + "compressibility is ignored above Mach " + number(limit);
    case kAboveMedium:
      return "the flight rose to " + metres(extreme) + " m, above the medium's top at " +
             metres(limit) + " m; the values at the top were held";
    case kAboveWind:
      return "the flight rose to " + metres(extreme) +
             " m, above the wind profile's top layer at " + metres(limit) +
             " m; the top layer's wind was held";
    case kLongFlight:
    case kFrameOffset:
      break;
  }
  return "";
}

std::string describe_long_flight(double time) {
  return printf_text(
      "the flight lasted %.2g h: a wind held steady for hours is implausible, and "
      "the footprint is only as good as that wind",
      time / 3600.0);
}

std::string describe_frame_offset(double curvature, double rotation, double tolerance) {
  return "the flat, non-rotating frame may misplace the impact by about " + metres(curvature) +
         " m (Earth's curvature) and " + metres(rotation) +
         " m (Earth's rotation), more than the study tolerance of " + printf_text("%g", tolerance) +
         " m";
}

std::vector<std::string> flight_warnings(const FlightResult& r, const ModelLimits& limits,
                                         double tolerance) {
  std::vector<std::string> out;
  if (r.status != FlightStatus::landed)
    out.push_back(std::string("the flight did not land: ") + to_string(r.status));
  for (int bit = 0; bit < kModelRangeFlagCount; ++bit) {
    const auto flag = static_cast<ModelRangeFlag>(1u << bit);
    if (!(r.regime.flags & flag)) continue;
    if (flag == kLongFlight)
      out.push_back(describe_long_flight(r.time));
    else if (flag == kFrameOffset)
      out.push_back(describe_frame_offset(r.curvature_offset, r.rotation_offset, tolerance));
    else
      out.push_back(
          describe(flag, extreme_of(flag, r.regime), limit_of(flag, limits), limits.drag_model));
  }
  return out;
}

}  // namespace strewn
