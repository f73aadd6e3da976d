#pragma once
// JSON as text, always valid: a string that is not UTF-8 (a results file crafted or damaged
// outside strewn; the loader refuses such scenarios) is written with U+FFFD in place of its bad
// bytes, never an error of the JSON library.
#include <nlohmann/json.hpp>
#include <string>

namespace strewn {

/// `indent` spaces a level; -1 for one line.
inline std::string json_text(const nlohmann::json& json, int indent = 2) {
  return json.dump(indent, ' ', false, nlohmann::json::error_handler_t::replace);
}

}  // namespace strewn
