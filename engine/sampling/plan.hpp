#pragma once
// Sampling plans: for sample i of a study, one uniform number in (0, 1) per sampled input
// (dimension). Every plan gives sample i the same numbers whichever thread or block asks.
//
// - random: independent uniforms from each sample's own streams (the only plan under which the
//   distribution-free confidence bounds hold).
// - latin: Latin hypercube sampling (McKay, Beckman and Conover 1979): in each dimension the n
//   samples fall one in each of n equal strata, in a random order per dimension, at a random
//   place in the stratum.
// - sobol: the Sobol low-discrepancy sequence (Boost.Random's sobol, Joe-Kuo directions) with a
//   random shift per dimension (Cranley and Patterson 1976), point i for sample i.
#include <boost/random/sobol.hpp>
#include <cstdint>
#include <memory>
#include <span>
#include <vector>

#include "scenario/scenario.hpp"

namespace strewn {

class SamplePlan {
 public:
  /// `samples` is the study's sample count (latin strata). Throws std::invalid_argument for a
  /// dimension count the Sobol table cannot hold.
  SamplePlan(SamplingPlan kind, std::uint64_t seed, std::size_t dimensions, std::uint64_t samples);

  [[nodiscard]] SamplingPlan kind() const { return kind_; }
  [[nodiscard]] std::size_t dimensions() const { return dimensions_; }

  /// Reads the plan for a run of samples. One cursor per thread or block: it holds the Sobol
  /// engine, so that drawing allocates nothing.
  class Cursor {
   public:
    explicit Cursor(const SamplePlan& plan);
    /// The uniforms of sample i, one per dimension, into `out` (size dimensions()).
    void uniforms(std::uint64_t sample, std::span<double> out);

   private:
    const SamplePlan& plan_;
    std::unique_ptr<boost::random::sobol> sobol_;
    std::uint64_t next_ = 0;  // the Sobol point the engine stands at
  };

 private:
  SamplingPlan kind_;
  std::uint64_t seed_;
  std::size_t dimensions_;
  std::uint64_t samples_;
  std::vector<std::uint32_t> strata_;  // latin: stratum of sample i in dimension d at [d * n + i]
  std::vector<double> shifts_;         // sobol: random shift per dimension
};

}  // namespace strewn
