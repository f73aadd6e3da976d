// Containment radii and their distribution-free upper bounds.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

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
  ASSERT_TRUE(c[0].radius_upper.has_value());
  EXPECT_GE(*c[0].radius_upper, 50.0);
  // 100 samples cannot bound the 0.99 quantile at 95 percent (299 needed, Wilks).
  EXPECT_FALSE(c[2].radius_upper.has_value());
  EXPECT_EQ(c[2].samples_needed, 299u);
  // Failed flights count as infinitely far away.
  std::vector<double> f(10, 1.0);
  f[9] = std::numeric_limits<double>::infinity();
  EXPECT_TRUE(std::isinf(containment(f, {0.95}, 0.95)[0].radius));
}

}  // namespace
}  // namespace strewn
