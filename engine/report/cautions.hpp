#pragma once
// The cautions every report carries (README, docs, terminal summaries, JSON, HTML).
#include <string>
#include <vector>

namespace strewn {

/// The standing cautions, one sentence each.
const std::vector<std::string>& cautions();

}  // namespace strewn
