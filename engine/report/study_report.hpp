#pragma once
// What `strewn run` and `strewn check` print: the study summary (JSON of the interface and a
// terminal table), a replayed sample, and the fully resolved scenario.
#include <nlohmann/json.hpp>
#include <ostream>

#include "scenario/scenario.hpp"
#include "scenario/world.hpp"
#include "study/study.hpp"

namespace strewn {

/// The summary object of `run --json`: counts, and per body and for "all" the mean impact point,
/// the containment radii about the study's centre with their distribution-free upper bounds, and
/// the share of impacts above the energy threshold with its Clopper-Pearson upper bound. Failed
/// flights count as landing infinitely far away and as exceeding the energy threshold.
nlohmann::json study_summary(const Scenario& scenario, const World& world,
                             const StudyResult& result);

/// The terminal form of the summary, with the cautions.
void write_study_text(std::ostream& out, const nlohmann::json& summary, const std::string& file);

/// The fully resolved scenario (every default shown) and its sampled inputs.
nlohmann::json scenario_json(const Scenario& scenario);
void write_scenario_text(std::ostream& out, const Scenario& scenario);

}  // namespace strewn
