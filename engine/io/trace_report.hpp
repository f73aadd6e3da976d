#pragma once
// The output of `strewn trace`: one nominal flight as a terminal summary, JSON or CSV.
#include <nlohmann/json.hpp>
#include <ostream>
#include <string>

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

/// {"impact": {...}, "release": {...}, "regime": {...}, "trajectory": [...], ...}; see
/// docs/trace.md for every field.
nlohmann::json trace_json(const TraceRecord& trace);
/// One row per recorded point with a header line.
void write_trace_csv(std::ostream& out, const TraceRecord& trace);
/// The terminal summary.
void write_trace_text(std::ostream& out, const TraceRecord& trace);

}  // namespace strewn
