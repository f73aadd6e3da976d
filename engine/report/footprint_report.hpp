#pragma once
// A study's record as JSON (the summary of `run --json` and `report --json`, names in
// docs/results.md) and as the terminal summary table. Both carry the cautions; neither calls
// anything safe: rule statuses say where the figures stand against the user's criteria.
#include <nlohmann/json.hpp>
#include <ostream>

#include "pipeline/study_record.hpp"

namespace strewn {

/// The summary. With `provenance`, also the file, engine version, creation time and threads
/// (left out of `run --json` so that one seed gives the same text on any thread count).
nlohmann::json record_json(const StudyRecord& record, bool provenance);

/// The terminal summary: counts, per group the containment table, dispersion, energy, rule
/// statuses, the leading sensitivities, warnings and the cautions.
void write_record_text(std::ostream& out, const StudyRecord& record);

/// A number for JSON: null when NaN or infinite.
nlohmann::json json_number(double value);

/// The groups a reader needs: every body, and "all" only when there are several bodies (with one
/// body, "all" holds the same figures).
std::vector<const GroupFootprint*> shown_groups(const Footprint& footprint);

/// What the centre of a group is, in words with its east/north (and latitude/longitude when the
/// site has coordinates), e.g. "the mean impact of bundle, east 512.3 m, north -40.1 m
/// (46.950412 N, 7.446712 E)".
std::string centre_text(const StudyRecord& record, const GroupFootprint& group);

}  // namespace strewn
