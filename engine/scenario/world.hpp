#pragma once
// The immutable objects a scenario's flights share (the tabulated medium and the wind profile),
// and the nominal flight of each body: every uncertain input at its median.
#include <cstddef>
#include <span>
#include <vector>

#include "flight/flight.hpp"
#include "scenario/input_values.hpp"
#include "scenario/scenario.hpp"

namespace strewn {

struct World {
  Medium medium;
  WindProfile wind;
  Grounds ground;
};

/// Tabulates the medium and builds the wind profile and the ground once for the scenario.
World build_world(const Scenario& scenario);

/// One flight's inputs: the body's numbers, the medium conditions and the release.
struct FlightInputs {
  Body body;
  MediumConditions conditions;
  ReleaseState release;
};

/// The one builder of a flight's inputs (nominal, sampled and replayed flights alike): body
/// `body_index` with every input's value from `values`, its canopy (if any) in `canopy` state
/// (the full or partial drag area; none when failed). The burst velocity, a sample's random
/// choice, is the caller's.
FlightInputs build_flight(const Scenario& scenario, std::size_t body_index,
                          const InputValues& values, CanopyState canopy = CanopyState::full);

/// The nominal flight of body `body_index`: every input at its median, the canopy fully opened,
/// no burst velocity (its direction is random; `trace` says so).
FlightInputs nominal_flight(const Scenario& scenario, std::size_t body_index);

/// The release position and velocity from the carrier's state and the release errors (m, m/s):
/// the body leaves `delay` seconds late, i.e. speed * delay further along the track.
ReleaseState release_state(double altitude, double east, double north, double speed, double track,
                           double climb, double along_error, double cross_error, double delay);

}  // namespace strewn
