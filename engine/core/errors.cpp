#include "core/errors.hpp"

namespace strewn {

std::string Problem::describe() const {
  std::string text = file;
  if (line > 0) text.append(":").append(std::to_string(line));
  if (!text.empty()) text.append(": ");
  if (!key_path.empty()) text.append(key_path).append(": ");
  return text.append(message);
}

namespace {
std::string summary(const std::vector<Problem>& problems) {
  std::string text;
  for (const auto& problem : problems) {
    if (!text.empty()) text += '\n';
    text += problem.describe();
  }
  return text;
}
}  // namespace

ScenarioError::ScenarioError(std::vector<Problem> problems)
    : std::runtime_error(summary(problems)), problems_(std::move(problems)) {}

}  // namespace strewn
