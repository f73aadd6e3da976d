#include "scenario/world.hpp"

#include <algorithm>
#include <cmath>
#include <variant>

#include "core/constants.hpp"
#include "medium/us1976.hpp"

namespace strewn {

World build_world(const Scenario& s) {
  Medium medium = [&] {
    switch (s.medium.model) {
      case Medium::Kind::profile:
        return Medium::profile(s.medium.profile);
      case Medium::Kind::uniform:
        return Medium::uniform(s.medium.density, s.medium.viscosity, s.medium.sound_speed);
      case Medium::Kind::us1976:
        break;
    }
    return Medium::us1976();
  }();
  // The hot/cold days the flights may draw (a fixed offset: that day alone; an unbounded
  // distribution: all but 1e-12 of it at each end, the rest held at the ends).
  const Uncertain& offset = s.medium.temperature_offset;
  if (!(offset.is_fixed() && offset.p1() == 0.0)) {
    const double lowest = std::isfinite(offset.lowest()) ? offset.lowest() : offset.quantile(1e-12);
    const double highest =
        std::isfinite(offset.highest()) ? offset.highest() : offset.quantile(1.0 - 1e-12);
    medium.tabulate_offsets(lowest, highest);
  }
  return {std::move(medium), WindProfile(s.wind.layers, s.site.ground_level()), s.site.ground};
}

ReleaseState release_state(double altitude, double east, double north, double speed, double track,
                           double climb, double along_error, double cross_error, double delay) {
  const Eigen::Vector2d ahead = bearing_unit(track);
  const Eigen::Vector2d right(ahead.y(), -ahead.x());  // 90 degrees clockwise from the track
  const Eigen::Vector2d horizontal =
      Eigen::Vector2d(east, north) + (along_error + speed * delay) * ahead + cross_error * right;
  ReleaseState state;
  state.position = Vec3(horizontal.x(), horizontal.y(), altitude);
  state.velocity = Vec3(speed * ahead.x(), speed * ahead.y(), climb);
  return state;
}

FlightInputs build_flight(const Scenario& s, std::size_t body_index, const InputValues& value,
                          CanopyState canopy) {
  const BodySpec& spec = s.bodies.at(body_index);
  FlightInputs in;
  Body& body = in.body;
  body.mass = value(spec.mass);
  // The law's inputs into a fixed array: building a sampled flight allocates nothing.
  DragValues drag;
  drag.size = drag_model_facts(spec.drag_model).inputs.size();
  for (std::size_t i = 0; i < drag.size; ++i) drag.value[i] = value(spec.drag_inputs[i]);
  body.drag.law = make_drag_law(spec.drag_model, drag.view());
  body.drag.mach_table = spec.mach_table.get();
  // A law's volume: its optional input (0: unknown, no buoyancy) or its volume-equivalent sphere.
  body.volume = std::visit([](const auto& law) { return law.volume(); }, body.drag.law);
  if (spec.parachute) {
    const auto& p = *spec.parachute;
    body.has_canopy = true;
    body.canopy.trigger = p.trigger;
    body.canopy.deploy_after = value(p.deploy_after);
    body.canopy.deploy_height = value(p.deploy_height);
    body.canopy.fill_time = value(p.fill_time);
    body.canopy.state = canopy;
    if (canopy == CanopyState::full) body.canopy.drag_area = value(p.drag_area);
    if (canopy == CanopyState::partial) body.canopy.drag_area = value(p.partial_drag_area);
  }
  in.conditions.temperature_offset = value(s.medium.temperature_offset);
  in.conditions.density_factor = value(s.medium.density_factor);
  const auto& r = s.release;
  in.release = release_state(value(r.altitude), value(r.east), value(r.north), value(r.speed),
                             value(r.track), value(r.climb), value(r.along_error),
                             value(r.cross_error), value(r.delay));
  if (r.above_ground) {
    // A height above the ground under the release point (NaN beyond the terrain read: the flight
    // ends at once, off the terrain).
    const Vec3& p = in.release.position;
    in.release.position.z() +=
        std::visit([&](const auto& ground) { return ground.height(p.x(), p.y()); }, s.site.ground);
  }
  return in;
}

FlightInputs nominal_flight(const Scenario& s, std::size_t body_index) {
  return build_flight(s, body_index, InputValues::nominal());
}

}  // namespace strewn
