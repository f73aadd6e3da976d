#pragma once
// A study's record as JSON (the summary of `run --json` and `report --json`, names in
// docs/results.md) and as the terminal summary table. Both carry the cautions; neither calls
// anything safe: rule statuses say where the figures stand against the user's criteria.
#include <nlohmann/json.hpp>
#include <ostream>

#include "io/study_record.hpp"

namespace strewn {

/// The summary. With `provenance`, also the file, engine version, creation time and threads
/// (left out of `run --json` so that one seed gives the same text on any thread count).
nlohmann::json record_json(const StudyRecord& record, bool provenance);

/// The terminal summary: counts, per group the containment table, dispersion, energy, rule
/// statuses, the leading sensitivities, warnings and the cautions.
void write_record_text(std::ostream& out, const StudyRecord& record);

/// A number for JSON: null when NaN or infinite.
nlohmann::json json_number(double value);

}  // namespace strewn
