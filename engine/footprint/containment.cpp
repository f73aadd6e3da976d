#include "footprint/containment.hpp"

#include <algorithm>
#include <boost/math/distributions/binomial.hpp>
#include <cmath>
#include <limits>

namespace strewn {

std::uint64_t upper_bound_rank(std::uint64_t n, double p, double c) {
  if (n == 0) return 1;
  const boost::math::binomial_distribution<double> binomial(static_cast<double>(n), p);
  // P[Bin <= k - 1] grows with k: find the smallest k by bisection on [1, n].
  if (boost::math::cdf(binomial, static_cast<double>(n - 1)) < c) return n + 1;
  std::uint64_t low = 1, high = n;
  while (low < high) {
    const std::uint64_t mid = low + (high - low) / 2;
    if (boost::math::cdf(binomial, static_cast<double>(mid - 1)) >= c)
      high = mid;
    else
      low = mid + 1;
  }
  return low;
}

std::uint64_t samples_for_bound(double p, double c, std::uint64_t r) {
  // The r-th largest is rank n - r + 1; it bounds when P[Bin(n, p) <= n - r] >= c.
  std::uint64_t n = r;
  while (true) {
    const boost::math::binomial_distribution<double> binomial(static_cast<double>(n), p);
    if (boost::math::cdf(binomial, static_cast<double>(n - r)) >= c) return n;
    ++n;
  }
}

std::vector<Containment> containment(std::vector<double>& distances,
                                     const std::vector<double>& levels, double confidence) {
  std::sort(distances.begin(), distances.end());
  const auto n = static_cast<std::uint64_t>(distances.size());
  std::vector<Containment> out;
  for (double p : levels) {
    Containment c;
    c.level = p;
    c.confidence = confidence;
    // Empirical quantile: the smallest order statistic with at least p n samples at or below it.
    const auto k = static_cast<std::uint64_t>(std::ceil(p * static_cast<double>(n) - 1e-9));
    c.radius = n == 0 ? std::numeric_limits<double>::quiet_NaN()
                      : distances[std::max<std::uint64_t>(k, 1) - 1];
    const std::uint64_t rank = upper_bound_rank(n, p, confidence);
    if (rank <= n)
      c.radius_upper = distances[rank - 1];
    else
      c.samples_needed = samples_for_bound(p, confidence);
    out.push_back(c);
  }
  return out;
}

}  // namespace strewn
