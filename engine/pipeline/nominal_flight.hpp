#pragma once
// One body's nominal flight (every input at its median), recorded: what `strewn trace` reports
// and where the footprint's "nominal" centre lies.
#include <cstddef>
#include <string>
#include <vector>

#include "flight/trajectory.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"

namespace strewn {

/// Everything `trace` reports about one flight.
struct TraceRecord {
  const Scenario* scenario = nullptr;
  std::size_t body_index = 0;
  FlightInputs inputs;
  FlightResult result;
  TrajectoryRecorder recorder;
  double tolerance = 0.05;
  /// Where the flight left its models' ranges or their assumptions, in words (model_range.hpp).
  std::vector<std::string> warnings;
};

/// Flies the nominal flight of one body and records it. Throws UsageError for an unknown body.
TraceRecord trace_body(const Scenario& scenario, const World& world, const std::string& body_name);

}  // namespace strewn
