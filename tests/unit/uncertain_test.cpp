// Nominal values and quantiles of the scenario distributions against closed forms.
#include <gtest/gtest.h>

#include <cmath>

#include "core/uncertain.hpp"

namespace strewn {
namespace {

TEST(Uncertain, MediansInClosedForm) {
  EXPECT_DOUBLE_EQ(Uncertain(3.5).nominal(), 3.5);
  EXPECT_NEAR(Uncertain::normal(95.0, 4.0).nominal(), 95.0, 1e-12);
  EXPECT_NEAR(Uncertain::lognormal(40.0, 0.3).nominal(), 40.0, 1e-12);
  EXPECT_NEAR(Uncertain::uniform(0.9, 1.2).nominal(), 1.05, 1e-15);
  // Triangular (a, c, b) with c >= (a + b)/2: median a + sqrt((b - a)(c - a) / 2) (the usual
  // closed form of the triangular distribution).
  EXPECT_NEAR(Uncertain::triangular(0.0, 8.0, 10.0).nominal(), std::sqrt(10.0 * 8.0 / 2.0), 1e-12);
  // Weighted choice: the smallest value whose cumulative weight reaches one half.
  EXPECT_EQ(Uncertain::choice({3.0, 1.0, 2.0}, {0.2, 0.2, 0.6}).nominal(), 2.0);
  EXPECT_EQ(Uncertain::choice({5.0, 7.0}).nominal(), 5.0);
}

// A normal truncated to [mean, inf) is the half-normal shifted to the mean: its median is
// mean + sd * Phi^-1(3/4) = mean + 0.6744897501960817 sd (standard normal quartile).
TEST(Uncertain, TruncationShiftsTheMedian) {
  EXPECT_NEAR(Uncertain::normal(10.0, 2.0, 10.0).nominal(), 10.0 + 2.0 * 0.6744897501960817, 1e-9);
  EXPECT_GE(Uncertain::normal(10.0, 2.0, 9.0, 11.0).quantile(0.0), 9.0);
  EXPECT_LE(Uncertain::normal(10.0, 2.0, 9.0, 11.0).quantile(1.0), 11.0);
}

// Probabilities below and quantiles are inverses of each other.
TEST(Uncertain, ProbabilityBelowInvertsTheQuantile) {
  const Uncertain cases[] = {Uncertain::normal(0.0, 1.0, -1.0, 3.0), Uncertain::lognormal(2.0, 0.5),
                             Uncertain::uniform(-4.0, 6.0), Uncertain::triangular(1.0, 2.0, 7.0)};
  for (const auto& u : cases)
    for (double p : {0.01, 0.25, 0.5, 0.9, 0.999})
      EXPECT_NEAR(u.probability_below(u.quantile(p)), p, 1e-9) << to_string(u.kind());
}

TEST(Uncertain, ParameterProblemsAreNamed) {
  EXPECT_TRUE(Uncertain::normal(1.0, 0.5).problems().empty());
  EXPECT_EQ(Uncertain::normal(1.0, -0.5).problems().at(0).first, "sd");
  EXPECT_EQ(Uncertain::uniform(2.0, 1.0).problems().at(0).first, "min");
  EXPECT_EQ(Uncertain::triangular(0.0, 5.0, 3.0).problems().at(0).first, "mode");
  EXPECT_EQ(Uncertain::choice({1.0, 2.0}, {1.0}).problems().at(0).first, "weights");
  EXPECT_EQ(Uncertain::lognormal(-1.0, 0.2).problems().at(0).first, "median");
  EXPECT_FALSE(Uncertain::normal(0.0, 1.0, 50.0, 60.0).problems().empty());  // no probability left
  EXPECT_FALSE(Uncertain(std::nan("")).problems().empty());
}

}  // namespace
}  // namespace strewn
