#include "sampling/plan.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

#include "core/random_stream.hpp"

namespace strewn {

SamplePlan::SamplePlan(SamplingPlan kind, std::uint64_t seed, std::size_t dimensions,
                       std::uint64_t samples)
    : kind_(kind), seed_(seed), dimensions_(dimensions), samples_(samples) {
  if (kind_ == SamplingPlan::latin) {
    // A random permutation of the strata per dimension (Fisher-Yates), from its own stream.
    strata_.resize(dimensions_ * samples_);
    for (std::size_t d = 0; d < dimensions_; ++d) {
      auto first = strata_.begin() + static_cast<std::ptrdiff_t>(d * samples_);
      std::iota(first, first + static_cast<std::ptrdiff_t>(samples_), 0u);
      RandomStream stream(seed_, d, purpose::latin_permutation);
      for (std::uint64_t i = samples_; i > 1; --i) {
        const auto j = static_cast<std::uint64_t>(stream.uniform() * static_cast<double>(i));
        std::swap(first[static_cast<std::ptrdiff_t>(i - 1)], first[static_cast<std::ptrdiff_t>(j)]);
      }
    }
  }
  if (kind_ == SamplingPlan::sobol) {
    if (dimensions_ > boost::random::default_sobol_table::max_dimension)
      throw std::invalid_argument("too many sampled inputs for the Sobol sequence");
    for (std::size_t d = 0; d < dimensions_; ++d)
      shifts_.push_back(RandomStream(seed_, d, purpose::sobol_shift).uniform());
  }
}

SamplePlan::Cursor::Cursor(const SamplePlan& plan) : plan_(plan) {
  if (plan_.kind_ == SamplingPlan::sobol && plan_.dimensions_ > 0)
    sobol_ = std::make_unique<boost::random::sobol>(plan_.dimensions_);
}

void SamplePlan::Cursor::uniforms(std::uint64_t sample, std::span<double> out) {
  const std::size_t dims = plan_.dimensions_;
  switch (plan_.kind_) {
    case SamplingPlan::random:
      for (std::size_t d = 0; d < dims; ++d)
        out[d] = RandomStream(plan_.seed_, sample, static_cast<std::uint32_t>(d)).uniform();
      return;
    case SamplingPlan::latin: {
      const double n = static_cast<double>(plan_.samples_);
      for (std::size_t d = 0; d < dims; ++d) {
        const double place =
            RandomStream(plan_.seed_, sample, static_cast<std::uint32_t>(d)).uniform();
        const std::uint32_t stratum = plan_.strata_[d * plan_.samples_ + sample % plan_.samples_];
        out[d] = (static_cast<double>(stratum) + place) / n;
      }
      return;
    }
    case SamplingPlan::sobol: {
      if (dims == 0) return;  // a study of fixed inputs: no engine, nothing to draw
      if (sample != next_) sobol_->seed(sample);  // direct access by index (Gray code)
      next_ = sample + 1;
      for (std::size_t d = 0; d < dims; ++d) {
        const double x = static_cast<double>((*sobol_)() >> 11) * 0x1p-53;  // 53 bits in [0, 1)
        double u = x + plan_.shifts_[d];
        if (u >= 1.0) u -= 1.0;
        out[d] = std::clamp(u, 0x1p-54, 1.0 - 0x1p-53);  // open interval
      }
      return;
    }
  }
}

}  // namespace strewn
