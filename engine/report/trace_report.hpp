#pragma once
// The output of `strewn trace`: one nominal flight (pipeline/nominal_flight.hpp) as a terminal
// summary, JSON or CSV.
#include <nlohmann/json.hpp>
#include <ostream>
#include <string>

#include "pipeline/nominal_flight.hpp"

namespace strewn {

/// {"impact": {...}, "release": {...}, "regime": {...}, "trajectory": [...], ...}; docs/commands.md
/// (`strewn trace`) for every field.
nlohmann::json trace_json(const TraceRecord& trace);
/// Where and how a landed flight hit: time, east, north, speed, energy, angle, and the ground
/// there (height, slope, angle to its surface); the `impact` of `trace --json` and of a replayed
/// sample (`run --sample`).
nlohmann::json impact_json(const FlightResult& result);
/// One row per recorded point with a header line.
void write_trace_csv(std::ostream& out, const TraceRecord& trace);
/// The terminal summary.
void write_trace_text(std::ostream& out, const TraceRecord& trace);

}  // namespace strewn
