#pragma once
// The values of every sampled input of a scenario for one sample: the plan's uniforms, the rank
// correlations applied by the Gaussian copula, then each input's inverse distribution function
// (Uncertain::quantile, Boost.Math). Sample i always gets the same values, whoever draws it.
#include <cstdint>
#include <span>
#include <vector>

#include "sampling/correlation.hpp"
#include "sampling/plan.hpp"
#include "scenario/scenario.hpp"

namespace strewn {

class InputSampler {
 public:
  /// Resolves the scenario's correlations to inputs. Throws ScenarioError when they cannot hold
  /// together (the matrix is not positive definite), naming the pairs.
  InputSampler(const Scenario& scenario, std::uint64_t samples);

  [[nodiscard]] std::size_t dimensions() const { return inputs_.size(); }
  [[nodiscard]] const std::vector<SampledInput>& inputs() const { return inputs_; }
  [[nodiscard]] const SamplePlan& plan() const { return plan_; }

  /// Per-thread state: the plan cursor and scratch space.
  class Workspace {
   public:
    explicit Workspace(const InputSampler& sampler);

   private:
    friend class InputSampler;
    SamplePlan::Cursor cursor_;
    std::vector<double> uniforms_, scratch_;
  };

  /// The values of every sampled input for sample i, in the order of inputs(), into `values`.
  void draw(std::uint64_t sample, std::span<double> values, Workspace& workspace) const;

 private:
  std::vector<SampledInput> inputs_;
  SamplePlan plan_;
  RankCorrelation correlation_;
};

}  // namespace strewn
