#include "scenario/world.hpp"

#include <algorithm>

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
  return {std::move(medium), WindProfile(s.wind.layers, s.site.ground)};
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

FlightInputs nominal_flight(const Scenario& s, std::size_t body_index) {
  const BodySpec& spec = s.bodies.at(body_index);
  FlightInputs in;
  Body& body = in.body;
  body.mass = spec.mass.nominal();
  body.drag.model = spec.drag_model;
  body.drag.cd = spec.cd.nominal();
  body.drag.area = spec.area.nominal();
  body.drag.diameter = spec.diameter.nominal();
  body.drag.sphericity = spec.sphericity.nominal();
  body.drag.mach_table = spec.mach_table.get();
  if (spec.drag_model == DragModel::area) {
    body.volume = spec.volume.nominal();
  } else {
    const double d = body.drag.diameter;
    body.volume = constants::pi * d * d * d / 6.0;  // volume-equivalent sphere
  }
  if (spec.parachute) {
    const auto& p = *spec.parachute;
    body.has_canopy = true;
    body.canopy.trigger = p.trigger;
    body.canopy.deploy_after = p.deploy_after.nominal();
    body.canopy.deploy_height = p.deploy_height.nominal();
    body.canopy.fill_time = p.fill_time.nominal();
    body.canopy.drag_area = p.drag_area.nominal();
    body.canopy.state = CanopyState::full;
  }
  in.conditions.temperature_offset = s.medium.temperature_offset.nominal();
  in.conditions.density_factor = s.medium.density_factor.nominal();
  const auto& r = s.release;
  in.release = release_state(r.altitude.nominal(), r.east.nominal(), r.north.nominal(),
                             r.speed.nominal(), r.track.nominal(), r.climb.nominal(),
                             r.along_error.nominal(), r.cross_error.nominal(), r.delay.nominal());
  return in;
}

}  // namespace strewn
