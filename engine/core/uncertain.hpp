#pragma once
// A scenario input that is either a fixed number or a probability distribution.
// The distributions are the interface's: normal (mean, sd), lognormal (median, sigma of the log),
// uniform (min, max), triangular (min, mode, max), choice (values, optional weights); `min`/`max`
// truncate normal and lognormal. Quantiles come from Boost.Math's distributions.
#include <array>
#include <cstddef>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "core/enum_names.hpp"

namespace strewn {

enum class DistributionKind { fixed, normal, lognormal, uniform, triangular, choice };

/// Name used in scenario files ("normal", ...); "fixed" for a plain number.
template <>
struct EnumNames<DistributionKind> {
  static constexpr std::array names{std::pair{DistributionKind::fixed, "fixed"},
                                    std::pair{DistributionKind::normal, "normal"},
                                    std::pair{DistributionKind::lognormal, "lognormal"},
                                    std::pair{DistributionKind::uniform, "uniform"},
                                    std::pair{DistributionKind::triangular, "triangular"},
                                    std::pair{DistributionKind::choice, "choice"}};
};
inline const char* to_string(DistributionKind kind) {
  return name_of(kind);
}

class Uncertain {
 public:
  /// A fixed number.
  Uncertain(double value = 0.0) : kind_(DistributionKind::fixed), p1_(value) {}  // NOLINT

  static Uncertain normal(double mean, double sd, double lower = -inf(), double upper = inf());
  static Uncertain lognormal(double median, double sigma, double lower = 0.0, double upper = inf());
  static Uncertain uniform(double min, double max);
  static Uncertain triangular(double min, double mode, double max);
  static Uncertain choice(std::vector<double> values, std::vector<double> weights = {});

  [[nodiscard]] DistributionKind kind() const { return kind_; }
  [[nodiscard]] bool is_fixed() const { return kind_ == DistributionKind::fixed; }

  /// Problems with the parameters as (parameter name, message) pairs; empty when valid.
  /// Checks finiteness, positive spreads, min < max, mode inside, weights non-negative and
  /// matching the values, and a truncation window holding some probability.
  [[nodiscard]] std::vector<std::pair<std::string, std::string>> problems() const;

  /// Inverse cumulative distribution at probability p in [0, 1], truncation included.
  /// Precondition: problems() is empty.
  [[nodiscard]] double quantile(double p) const;

  /// The nominal value: the median (the number itself when fixed). Used by `trace`.
  [[nodiscard]] double nominal() const { return quantile(0.5); }

  /// Probability that a draw falls below x (strictly) or above x (strictly).
  [[nodiscard]] double probability_below(double x) const;
  [[nodiscard]] double probability_above(double x) const;

  /// Smallest and largest value the input can take (may be infinite).
  [[nodiscard]] double lowest() const;
  [[nodiscard]] double highest() const;

  /// The handle of a sampled input: its place among the scenario's sampled inputs, given by the
  /// scenario loader to every distribution it reads (-1: not sampled, a fixed number). Sampling
  /// writes values by this place and flights read them by it, never by name.
  [[nodiscard]] int sampled_index() const { return sampled_index_; }
  void mark_sampled(std::size_t index) { sampled_index_ = static_cast<int>(index); }

  /// Parameters, for printing the resolved scenario.
  [[nodiscard]] double p1() const { return p1_; }
  [[nodiscard]] double p2() const { return p2_; }
  [[nodiscard]] double p3() const { return p3_; }
  [[nodiscard]] double lower() const { return lower_; }
  [[nodiscard]] double upper() const { return upper_; }
  [[nodiscard]] const std::vector<double>& values() const { return values_; }
  [[nodiscard]] const std::vector<double>& weights() const { return weights_; }

 private:
  static constexpr double inf() { return std::numeric_limits<double>::infinity(); }
  DistributionKind kind_;
  double p1_ = 0.0, p2_ = 0.0, p3_ = 0.0;  // kind-specific parameters, in the order above
  double lower_ = -inf(), upper_ = inf();  // truncation (normal, lognormal)
  std::vector<double> values_, weights_;   // choice, as given
  // choice: the values sorted and their cumulative weights (normalised to end at 1), built once
  // so that drawing allocates nothing.
  std::vector<double> sorted_values_, cumulative_;
  int sampled_index_ = -1;
};

}  // namespace strewn
