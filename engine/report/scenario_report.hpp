#pragma once
// What `strewn check` prints: the fully resolved scenario and its sampled inputs.
#include <nlohmann/json.hpp>
#include <ostream>

#include "scenario/scenario.hpp"

namespace strewn {

/// The fully resolved scenario (every default shown) and its sampled inputs.
nlohmann::json scenario_json(const Scenario& scenario);
void write_scenario_text(std::ostream& out, const Scenario& scenario);

}  // namespace strewn
