#pragma once
// The figures of one object of a release when a release holds objects of several bodies: a
// mixture of the bodies' distributions, each body weighted by its objects per release
// (docs/statistics.md, "All bodies: one release").
//
// Every sample flies each body once, so each body's rows are an independent sample of its own
// distribution, n_b rows; the bodies' rows of one sample are not independent of each other (they
// share the release). The mixture's distribution function is F(x) = sum_b w_b F_b(x) with the
// weights w_b = count_b / sum count.
//
// - Estimates: the weighted empirical distribution, sum_b w_b #(values_b <= x) / n_b.
// - Bounds: Boole's inequality (the Bonferroni method). Each body's Clopper-Pearson (1934) bound
//   at confidence 1 - (1 - c) / B holds for all B bodies at once with probability at least c,
//   so the weighted sum of the bodies' bounds bounds the mixture's share at confidence c, whatever
//   the dependence between bodies. An order statistic's distribution-free bound is the
//   inversion of the Clopper-Pearson bound of the share beyond it (Thompson 1936): the upper
//   bound of the p-quantile is the smallest value x whose bounded share above it,
//   sum_b w_b CP_upper(#(values_b > x), n_b), is at most 1 - p; the lower bound the largest x
//   whose bounded share below it is at most p. With one body these are exactly the order
//   statistics of containment.hpp (Wilks 1941).
// Failed flights stand at +infinity, or for a low tail of a signed quantity at -infinity.
#include <cstdint>
#include <vector>

#include "footprint/containment.hpp"

namespace strewn {

class MixtureColumn {
 public:
  /// Each body's landed values (any order: sorted here), its failed rows, and its weight
  /// (objects per release, > 0). Bodies with no rows are left out.
  MixtureColumn(std::vector<std::vector<double>> landed, const std::vector<std::uint64_t>& failed,
                const std::vector<double>& weights);

  /// The weighted empirical p-quantile: the smallest value x with F(x) >= p.
  [[nodiscard]] double quantile(double p, bool failures_low) const;
  /// The one-sided upper confidence bound of the p-quantile at confidence c; +infinity when no
  /// value bounds it (too few samples, or failures reach it).
  [[nodiscard]] double upper_bound(double p, double c, bool failures_low) const;
  /// The one-sided lower confidence bound of the p-quantile at confidence c; -infinity when none.
  [[nodiscard]] double lower_bound(double p, double c, bool failures_low) const;
  /// The containment figures of a distance (failures far away): estimate, upper bound at c (or the
  /// samples it would need) and the two-sided interval at c.
  [[nodiscard]] Containment containment(double p, double c) const;
  /// The smallest number of samples for which the upper bound of the p-quantile at c exists.
  [[nodiscard]] std::uint64_t samples_needed(double p, double c) const;
  /// Whether the rows are enough for that bound, were every one of them landed (when they are
  /// and the bound is still infinite, failed flights reach it).
  [[nodiscard]] bool enough_for_bound(double p, double c) const;

  /// The weighted share of values above x (failures above everything) with its bounds at c.
  struct Share {
    double value = 0.0, lower = 0.0, upper = 0.0;
  };
  [[nodiscard]] Share share_above(double x, double c) const;
  /// The weighted share of values at or below x (failures above everything).
  [[nodiscard]] double share_at_most(double x) const;
  /// The smallest number of samples per body at which the share above x, were each body's share
  /// to hold, would be bounded at confidence c on one side of `accepted` (0 when none up to 2^40
  /// would, or the share equals it).
  [[nodiscard]] std::uint64_t samples_to_decide(double x, double accepted, double c) const;

  [[nodiscard]] std::size_t bodies() const { return components_.size(); }

 private:
  struct Component {
    std::vector<double> sorted;  // landed values, ascending
    std::uint64_t failed = 0, rows = 0;
    double weight = 0.0;  // normalised: the weights sum to 1
  };
  // Rows of a component strictly below / strictly above x, failures placed low or high.
  static std::uint64_t below(const Component& c, double x, bool failures_low);
  static std::uint64_t above(const Component& c, double x, bool failures_low);
  // The bodies' Bonferroni confidence for an overall confidence c.
  [[nodiscard]] double each(double c) const;

  std::vector<Component> components_;
  std::vector<double> merged_;  // every landed value, ascending: the candidates
};

}  // namespace strewn
