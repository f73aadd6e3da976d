#include "pipeline/nominal_flight.hpp"

#include <algorithm>
#include <string>

#include "core/errors.hpp"

namespace strewn {

TraceRecord trace_body(const Scenario& scenario, const World& world, const std::string& body_name) {
  std::size_t index = 0;
  if (!body_name.empty()) {
    const int found = scenario.body_index(body_name);
    if (found < 0) {
      std::string names;
      for (const auto& b : scenario.bodies) names += (names.empty() ? "" : ", ") + b.name;
      throw UsageError("no body named \"" + body_name + "\" in " + scenario.path +
                       " (bodies: " + names + ")");
    }
    index = static_cast<std::size_t>(found);
  }
  TraceRecord t;
  t.scenario = &scenario;
  t.body_index = index;
  t.inputs = nominal_flight(scenario, index);
  t.tolerance = scenario.study.tolerance;
  Environment environment{&world.medium, t.inputs.conditions, &world.wind, world.ground};
  FlightOptions options;
  options.tolerance = scenario.study.tolerance;
  // A first flight gives the time of flight, so the recorded points can be spread evenly
  // (about 400 of them) whatever the flight's length.
  const FlightResult first = fly(t.inputs.body, environment, t.inputs.release, options);
  options.record_interval = std::max(first.time / 400.0, 1e-3);
  t.result = fly(t.inputs.body, environment, t.inputs.release, options, &t.recorder);
  t.warnings = flight_warnings(t.result, model_limits(t.inputs.body, environment), t.tolerance);
  return t;
}

}  // namespace strewn
