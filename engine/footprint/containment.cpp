#include "footprint/containment.hpp"

#include <algorithm>
#include <boost/math/distributions/beta.hpp>
#include <boost/math/distributions/binomial.hpp>
#include <cmath>
#include <limits>

namespace strewn {

namespace {
constexpr double kInfinity = std::numeric_limits<double>::infinity();

// The smallest k in [1, n] with P[Bin(n, p) <= k - 1] >= target, or n + 1 when none is.
std::uint64_t smallest_rank_with_cdf(std::uint64_t n, double p, double target) {
  if (n == 0) return 1;
  const boost::math::binomial_distribution<double> binomial(static_cast<double>(n), p);
  if (boost::math::cdf(binomial, static_cast<double>(n - 1)) < target) return n + 1;
  std::uint64_t low = 1, high = n;  // the cdf grows with k: bisection
  while (low < high) {
    const std::uint64_t mid = low + (high - low) / 2;
    if (boost::math::cdf(binomial, static_cast<double>(mid - 1)) >= target)
      high = mid;
    else
      low = mid + 1;
  }
  return low;
}
}  // namespace

double Containment::relative_width() const {
  if (!radius_upper || !std::isfinite(*radius_upper) || !std::isfinite(radius)) return kInfinity;
  if (radius <= 0.0) return *radius_upper > 0.0 ? kInfinity : 0.0;
  return (*radius_upper - radius) / radius;
}

std::uint64_t upper_bound_rank(std::uint64_t n, double p, double c) {
  return smallest_rank_with_cdf(n, p, c);
}

std::uint64_t samples_for_bound(double p, double c, std::uint64_t r) {
  // The r-th largest is rank n - r + 1; it bounds when P[Bin(n, p) <= n - r] >= c. That
  // probability grows with n for fixed r.
  return smallest_count(r, [&](std::uint64_t n) {
    const boost::math::binomial_distribution<double> binomial(static_cast<double>(n), p);
    return boost::math::cdf(binomial, static_cast<double>(n - r)) >= c;
  });
}

std::uint64_t quantile_rank(std::uint64_t n, double p) {
  const auto k = static_cast<std::uint64_t>(std::ceil(p * static_cast<double>(n) - 1e-9));
  return std::clamp<std::uint64_t>(k, 1, std::max<std::uint64_t>(n, 1));
}

IntervalRanks quantile_interval_ranks(std::uint64_t n, double p, double c) {
  const double tail = 0.5 * (1.0 - c);
  IntervalRanks r;
  r.upper = smallest_rank_with_cdf(n, p, 1.0 - tail);
  // The largest l with P[Bin <= l - 1] <= tail is one below the smallest with the cdf above it.
  if (n == 0) return {0, 1};
  const boost::math::binomial_distribution<double> binomial(static_cast<double>(n), p);
  if (boost::math::cdf(binomial, 0.0) > tail) {
    r.lower = 0;
  } else {
    std::uint64_t low = 1, high = n;  // largest k in [1, n] with cdf(k - 1) <= tail
    while (low < high) {
      const std::uint64_t mid = high - (high - low) / 2;
      if (boost::math::cdf(binomial, static_cast<double>(mid - 1)) <= tail)
        low = mid;
      else
        high = mid - 1;
    }
    r.lower = low;
  }
  return r;
}

std::vector<Containment> containment_sorted(std::span<const double> d,
                                            const std::vector<double>& levels, double confidence) {
  const auto n = static_cast<std::uint64_t>(d.size());
  std::vector<Containment> out;
  for (double p : levels) {
    Containment c;
    c.level = p;
    c.confidence = confidence;
    c.radius = n == 0 ? std::numeric_limits<double>::quiet_NaN() : d[quantile_rank(n, p) - 1];
    const std::uint64_t rank = upper_bound_rank(n, p, confidence);
    if (rank <= n)
      c.radius_upper = d[rank - 1];
    else
      c.samples_needed = samples_for_bound(p, confidence);
    const IntervalRanks interval = quantile_interval_ranks(n, p, confidence);
    c.interval_lower = interval.lower >= 1 ? d[interval.lower - 1] : -kInfinity;
    c.interval_upper = interval.upper <= n ? d[interval.upper - 1] : kInfinity;
    out.push_back(c);
  }
  return out;
}

std::vector<Containment> containment(std::vector<double>& distances,
                                     const std::vector<double>& levels, double confidence) {
  std::sort(distances.begin(), distances.end());
  return containment_sorted(distances, levels, confidence);
}

double clopper_pearson_upper(std::uint64_t x, std::uint64_t n, double c) {
  if (n == 0 || x >= n) return 1.0;
  const boost::math::beta_distribution<double> beta(static_cast<double>(x) + 1.0,
                                                    static_cast<double>(n - x));
  return boost::math::quantile(beta, c);
}

double clopper_pearson_lower(std::uint64_t x, std::uint64_t n, double c) {
  if (n == 0 || x == 0) return 0.0;
  const boost::math::beta_distribution<double> beta(static_cast<double>(x),
                                                    static_cast<double>(n - x) + 1.0);
  return boost::math::quantile(beta, 1.0 - c);
}

}  // namespace strewn
