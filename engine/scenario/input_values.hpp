#pragma once
// How a flight reads its inputs' values by their handles (see InputValues below).
#include <cstddef>
#include <span>
#include <vector>

#include "core/uncertain.hpp"

namespace strewn {

/// Where a flight's inputs take their values: every input at its median (nominal), or a sample's
/// values of the sampled inputs, read by their handles (Uncertain::sampled_index), the others at
/// their fixed numbers.
class InputValues {
 public:
  /// Every input at its median.
  static InputValues nominal() { return InputValues({}); }
  /// A sample's values, in the order of Scenario::sampled_inputs.
  static InputValues of_sample(std::span<const double> values) { return InputValues(values); }
  /// Refused: the values must outlive the InputValues that reads them.
  static InputValues of_sample(std::vector<double>&& values) = delete;
  [[nodiscard]] double operator()(const Uncertain& input) const {
    const int index = input.sampled_index();
    if (index >= 0 && !values_.empty()) return values_[static_cast<std::size_t>(index)];
    // A fixed number is read as it is, without the quantile function (a flight reads a dozen).
    return input.is_fixed() ? input.p1() : input.nominal();
  }

 private:
  explicit InputValues(std::span<const double> values) : values_(values) {}
  std::span<const double> values_;
};

}  // namespace strewn
