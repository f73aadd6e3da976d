// Containment radii and their distribution-free upper bounds.
#include <gtest/gtest.h>

#include <algorithm>
#include <boost/math/special_functions/beta.hpp>
#include <cmath>
#include <cstdint>
#include <limits>
#include <random>
#include <vector>

#include "footprint/containment.hpp"
#include "support.hpp"

namespace strewn {
namespace {

// Wilks (1941, 1942) sample sizes, tests/reference/distribution_free_sample_sizes.csv: the
// smallest n for which the r-th largest of n samples bounds the coverage with the confidence.
TEST(Containment, WilksSampleSizes) {
  const auto rows = test::read_reference("distribution_free_sample_sizes.csv");
  ASSERT_EQ(rows.size(), 12u);
  for (const auto& row : rows) {
    const double p = std::stod(row.at("coverage")), c = std::stod(row.at("confidence"));
    const auto r = std::stoull(row.at("order_from_top"));
    EXPECT_EQ(samples_for_bound(p, c, r), std::stoull(row.at("min_samples")))
        << p << "/" << c << " r " << r;
    // And with exactly that many samples the bound is the r-th largest.
    const auto n = std::stoull(row.at("min_samples"));
    EXPECT_EQ(upper_bound_rank(n, p, c), n - r + 1);
  }
}

TEST(Containment, RadiiBoundsAndFailures) {
  std::vector<double> d;
  for (int i = 1; i <= 100; ++i) d.push_back(i);  // distances 1..100
  const auto c = containment(d, {0.5, 0.9, 0.99}, 0.95);
  EXPECT_DOUBLE_EQ(c[0].radius, 50.0);
  EXPECT_DOUBLE_EQ(c[1].radius, 90.0);
  // The bounds are the 59th and the 96th smallest distances: P[Bin(100, 0.5) <= 58] = 0.9557 is
  // the first binomial sum to reach 0.95 (P[... <= 57] = 0.9334), and P[Bin(100, 0.9) <= 95] =
  // 0.9763 (P[... <= 94] = 0.9424); the rule and its source in the test below.
  ASSERT_TRUE(c[0].radius_upper.has_value());
  EXPECT_DOUBLE_EQ(*c[0].radius_upper, 59.0);
  ASSERT_TRUE(c[1].radius_upper.has_value());
  EXPECT_DOUBLE_EQ(*c[1].radius_upper, 96.0);
  // 100 samples cannot bound the 0.99 quantile at 95 percent (299 needed, Wilks).
  EXPECT_FALSE(c[2].radius_upper.has_value());
  EXPECT_EQ(c[2].samples_needed, 299u);
  // Failed flights count as infinitely far away.
  std::vector<double> f(10, 1.0);
  f[9] = std::numeric_limits<double>::infinity();
  EXPECT_TRUE(std::isinf(containment(f, {0.95}, 0.95)[0].radius));
}

// The distribution-free upper bound of the p-quantile at confidence c is the k-th smallest of n
// samples, k the smallest rank with P[Binomial(n, p) <= k - 1] >= c: X_(k) lies below the
// quantile only when at most k - 1 samples do (Hahn and Meeker, Statistical Intervals, Wiley
// 1991, chapter 5, distribution-free one-sided bounds on quantiles). The rank is found here by
// another route than the engine's (a bisection over Boost.Math's binomial cdf): the binomial
// terms summed one by one in a linear scan, that sum held against Boost.Math's complement of the
// regularized incomplete beta function, P[Bin(n, p) <= k - 1] = ibetac(k, n - k + 1, p) (the
// identity the Boost.Math documentation of the binomial distribution gives for its cdf). The
// distances are a shuffled 0.5, 1.0, ..., n / 2, so the bound's value names its rank.
TEST(Containment, UpperBoundIsTheOrderStatisticOfTheBinomialRule) {
  constexpr double kConfidence = 0.95;
  std::mt19937_64 rng(13);
  int determined = 0, undetermined = 0;
  for (const std::uint64_t n : {20u, 59u, 100u, 299u, 1000u}) {
    std::vector<double> d(n);
    for (std::uint64_t i = 0; i < n; ++i) d[i] = 0.5 * static_cast<double>(i + 1);
    std::shuffle(d.begin(), d.end(), rng);
    for (const Containment& c : containment(d, {0.5, 0.9, 0.99}, kConfidence)) {
      const double p = c.level, nn = static_cast<double>(n);
      SCOPED_TRACE("n " + std::to_string(n) + " p " + std::to_string(p));
      // P[Bin(n, p) = j] = C(n, j) p^j (1 - p)^(n - j), in logarithms (no overflow at n = 1000).
      auto term = [&](std::uint64_t j) {
        const double jj = static_cast<double>(j);
        return std::exp(std::lgamma(nn + 1.0) - std::lgamma(jj + 1.0) - std::lgamma(nn - jj + 1.0) +
                        jj * std::log(p) + (nn - jj) * std::log1p(-p));
      };
      std::uint64_t k = n + 1;  // no order statistic bounds it
      double below = 0.0;       // P[Bin(n, p) <= k - 1]
      for (std::uint64_t rank = 1; rank <= n; ++rank) {
        below += term(rank - 1);
        if (below >= kConfidence) {
          k = rank;
          break;
        }
      }
      EXPECT_EQ(upper_bound_rank(n, p, kConfidence), k);
      if (k <= n) {
        const double kk = static_cast<double>(k);
        EXPECT_NEAR(below, boost::math::ibetac(kk, nn - kk + 1.0, p), 1e-12);
        ASSERT_TRUE(c.radius_upper.has_value());
        EXPECT_EQ(*c.radius_upper, 0.5 * static_cast<double>(k));  // the k-th smallest
        ++determined;
      } else {
        EXPECT_FALSE(c.radius_upper.has_value());
        EXPECT_GT(c.samples_needed, n);
        ++undetermined;
      }
    }
  }
  // Both cases met: 20 samples bound neither the 0.9 nor the 0.99 quantile, 59 not the 0.99 one,
  // 100 not the 0.99 one (299 are needed for it).
  EXPECT_EQ(determined, 11);
  EXPECT_EQ(undetermined, 4);
}

}  // namespace
}  // namespace strewn
