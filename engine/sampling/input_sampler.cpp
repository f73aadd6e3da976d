#include "sampling/input_sampler.hpp"

#include <algorithm>

#include "core/errors.hpp"

namespace strewn {

namespace {
RankCorrelation resolve(const Scenario& s) {
  std::vector<RankCorrelation::Pair> pairs;
  auto index = [&](const std::string& name) {
    for (std::size_t i = 0; i < s.sampled_inputs.size(); ++i)
      if (s.sampled_inputs[i].name == name) return i;
    throw ScenarioError(
        {{s.path, "correlation", 0,
          "\"" + name + "\" is not a sampled input"}});  // the loader reports it first
  };
  for (const auto& c : s.correlations) pairs.push_back({index(c.first), index(c.second), c.rho});
  try {
    return RankCorrelation(s.sampled_inputs.size(), pairs);
  } catch (const RankCorrelation::NotPositiveDefinite& e) {
    std::vector<Problem> problems;
    for (std::size_t i : e.pairs) {
      const auto& c = s.correlations[i];
      problems.push_back({s.path, c.key_path, c.line,
                          "the correlations cannot hold together (their matrix is not positive "
                          "definite); this pair between \"" +
                              c.first + "\" and \"" + c.second + "\" is one of those in conflict"});
    }
    throw ScenarioError(std::move(problems));
  }
}
}  // namespace

InputSampler::InputSampler(const Scenario& scenario, std::uint64_t samples)
    : inputs_(scenario.sampled_inputs),
      plan_(scenario.study.sampling, scenario.study.seed, scenario.sampled_inputs.size(), samples),
      correlation_(resolve(scenario)) {}

InputSampler::Workspace::Workspace(const InputSampler& sampler)
    : cursor_(sampler.plan_),
      uniforms_(sampler.dimensions()),
      scratch_(sampler.correlation_.scratch_size()) {}

void InputSampler::draw(std::uint64_t sample, std::span<double> values, Workspace& w) const {
  w.cursor_.uniforms(sample, w.uniforms_);
  correlation_.apply(w.uniforms_, w.scratch_);
  for (std::size_t d = 0; d < inputs_.size(); ++d)
    values[d] = inputs_[d].distribution.quantile(w.uniforms_[d]);
}

}  // namespace strewn
