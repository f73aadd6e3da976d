#pragma once
// Containment radii: the radius about a centre that holds a share p of the impacts, estimated by
// the empirical p-quantile of the impact distances, with its one-sided distribution-free upper
// confidence bound: the order statistic r_(k) with the smallest k such that
// P[Binomial(n, p) <= k - 1] >= c (Wilks 1941). Failed flights count as landing infinitely far
// away. Where k > n the bound is undetermined and the number of samples it would need is given.
#include <cstdint>
#include <optional>
#include <vector>

namespace strewn {

struct Containment {
  double level = 0.0;  ///< p
  double radius =
      0.0;  ///< empirical p-quantile of the distances, m (infinite if failures reach it)
  std::optional<double> radius_upper;  ///< the distribution-free upper bound at `confidence`
  double confidence = 0.0;
  std::uint64_t samples_needed =
      0;  ///< when radius_upper is empty: the smallest n that supports it
};

/// The 1-based rank k of the order statistic that bounds the p-quantile from above with
/// confidence c among n samples; n + 1 when no order statistic does.
std::uint64_t upper_bound_rank(std::uint64_t n, double p, double c);

/// The smallest sample count for which the r-th largest of n samples bounds the p-quantile with
/// confidence c (r = 1: the maximum).
std::uint64_t samples_for_bound(double p, double c, std::uint64_t r = 1);

/// Containment radii at each level for the given distances (sorted in place; +infinity for
/// failed flights).
std::vector<Containment> containment(std::vector<double>& distances,
                                     const std::vector<double>& levels, double confidence);

}  // namespace strewn
