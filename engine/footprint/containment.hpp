#pragma once
// Order-statistic estimates and their distribution-free confidence bounds.
//
// Containment radius r_p about a centre: the empirical p-quantile of the impact distances. Its
// one-sided upper confidence bound at confidence c is the order statistic r_(k) with the smallest
// k such that P[Binomial(n, p) <= k - 1] >= c (Wilks 1941). Where k > n the bound is undetermined
// and the number of samples it would need is given. Failed flights count as landing infinitely
// far away.
//
// Two-sided interval of the p-quantile: the order statistics (X_(l), X_(u)) with equal tails,
// l the largest rank with P[Bin(n, p) <= l - 1] <= (1 - c) / 2 and u the smallest with
// P[Bin(n, p) <= u - 1] >= (1 + c) / 2, so that P[X_(l) <= xi_p <= X_(u)] >= c for any
// continuous distribution (e.g. David and Nagaraja, Order Statistics, 3rd ed., section 7.1).
// Binomial probabilities come from Boost.Math.
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

namespace strewn {

struct Containment {
  double level = 0.0;   ///< p
  double radius = 0.0;  ///< empirical p-quantile of the distances, m (+inf: failures)
  std::optional<double> radius_upper;  ///< the distribution-free upper bound at `confidence`
  double confidence = 0.0;
  std::uint64_t samples_needed =
      0;                        ///< when radius_upper is empty: the smallest n that supports it
  double interval_lower = 0.0;  ///< two-sided interval of the quantile (-inf: undetermined)
  double interval_upper = 0.0;  ///< (+inf: undetermined)
  /// (radius_upper - radius) / radius: how far the conservative bound stands above the estimate
  /// (+inf when the bound is undetermined). `study.target_width` is held against this.
  [[nodiscard]] double relative_width() const;
};

/// The 1-based rank k of the order statistic that bounds the p-quantile from above with
/// confidence c among n samples; n + 1 when no order statistic does.
std::uint64_t upper_bound_rank(std::uint64_t n, double p, double c);

/// The smallest sample count for which the r-th largest of n samples bounds the p-quantile with
/// confidence c (r = 1: the maximum).
std::uint64_t samples_for_bound(double p, double c, std::uint64_t r = 1);

/// The smallest count n >= `from` (at least 1) at which `holds(n)` is true, for a `holds` that is
/// false below some count and true from it on: doubling, then bisection. 0 when it does not hold
/// by `most`.
template <class Holds>
std::uint64_t smallest_count(std::uint64_t from, Holds holds,
                             std::uint64_t most = std::uint64_t{1} << 40) {
  const std::uint64_t first = from > 0 ? from : 1;
  std::uint64_t high = first;
  while (!holds(high) && high < most) high *= 2;
  if (!holds(high)) return 0;
  std::uint64_t low = high / 2 > first ? high / 2 : first;
  while (low < high) {
    const std::uint64_t mid = low + (high - low) / 2;
    if (holds(mid))
      high = mid;
    else
      low = mid + 1;
  }
  return high;
}

/// The rank of the empirical p-quantile among n samples: the smallest k with k >= p n (at least 1).
std::uint64_t quantile_rank(std::uint64_t n, double p);

/// Ranks (l, u) of the two-sided equal-tailed interval of the p-quantile at confidence c; l = 0
/// when no order statistic bounds it from below, u = n + 1 when none bounds it from above.
struct IntervalRanks {
  std::uint64_t lower = 0, upper = 0;
};
IntervalRanks quantile_interval_ranks(std::uint64_t n, double p, double c);

/// Containment radii at each level for distances sorted ascending (+infinity for failed flights).
std::vector<Containment> containment_sorted(std::span<const double> sorted_distances,
                                            const std::vector<double>& levels, double confidence);

/// The same for unsorted distances (sorted in place).
std::vector<Containment> containment(std::vector<double>& distances,
                                     const std::vector<double>& levels, double confidence);

/// Exact one-sided Clopper-Pearson (1934) bounds of a binomial proportion with x successes in n
/// trials at confidence c: the upper bound is the c-quantile of Beta(x + 1, n - x) (1 when x = n),
/// the lower bound the (1 - c)-quantile of Beta(x, n - x + 1) (0 when x = 0). Boost.Math.
double clopper_pearson_upper(std::uint64_t x, std::uint64_t n, double c);
double clopper_pearson_lower(std::uint64_t x, std::uint64_t n, double c);

}  // namespace strewn
