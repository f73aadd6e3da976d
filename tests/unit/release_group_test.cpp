// "all" as one release (footprint/mixture.hpp): each body weighted by its objects per release,
// one centre, bounds by Boole's inequality. Held against the order statistics of one sample
// (Wilks 1941, already checked against Boost.Math's binomial in containment_test.cpp), against
// the plain order statistics of the rows replicated by their counts, and against the exact
// quantile of a known mixture (Boost.Math's exponential and normal distributions) in
// independent repetitions.
#include <gtest/gtest.h>

#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/exponential.hpp>
#include <boost/math/tools/roots.hpp>
#include <boost/random/exponential_distribution.hpp>
#include <boost/random/mersenne_twister.hpp>
#include <boost/random/normal_distribution.hpp>
#include <cmath>

#include "footprint/containment.hpp"
#include "footprint/footprint.hpp"
#include "footprint/mixture.hpp"
#include "impact_rows.hpp"

namespace strewn {
namespace {

TEST(ReleaseGroup, OneBodyGivesTheOrderStatisticsOfOneSample) {
  boost::random::mt19937 rng(7);
  boost::random::exponential_distribution<double> draw(1.0);
  for (std::size_t n : {5u, 59u, 300u, 3000u}) {
    std::vector<double> values(n);
    for (double& v : values) v = draw(rng);
    for (std::uint64_t failed : {0u, 2u}) {
      const MixtureColumn m({values}, {failed}, {1.0});
      std::vector<double> sorted = values;
      std::sort(sorted.begin(), sorted.end());
      sorted.resize(n + failed, std::numeric_limits<double>::infinity());
      const auto reference = containment_sorted(sorted, {0.5, 0.9, 0.99}, 0.95);
      for (const Containment& k : reference) {
        SCOPED_TRACE("n " + std::to_string(n) + " failed " + std::to_string(failed) + " level " +
                     std::to_string(k.level));
        const Containment c = m.containment(k.level, 0.95);
        EXPECT_EQ(c.radius, k.radius);
        ASSERT_EQ(c.radius_upper.has_value(), k.radius_upper.has_value());
        if (k.radius_upper) {
          EXPECT_EQ(*c.radius_upper, *k.radius_upper);
        } else {
          EXPECT_EQ(c.samples_needed, k.samples_needed);
        }
        EXPECT_EQ(c.interval_lower, k.interval_lower);
        EXPECT_EQ(c.interval_upper, k.interval_upper);
      }
      // Clopper-Pearson shares.
      const auto share = m.share_above(1.0, 0.95);
      std::uint64_t above = failed;
      for (double v : values) above += v > 1.0 ? 1 : 0;
      EXPECT_DOUBLE_EQ(share.upper, clopper_pearson_upper(above, n + failed, 0.95));
      EXPECT_DOUBLE_EQ(share.lower, clopper_pearson_lower(above, n + failed, 0.95));
    }
  }
}

// Found in a code review: the mixture's quantile allowed 1e-12 of rounding in p where
// quantile_rank allows 1e-9 in p n, so a level a hair above a whole p n (0.99 + 5e-12 of 100
// samples) took the 100th distance for one body where the order statistic (Wilks 1941; the rank
// ceil(p n)) is the 99th.
TEST(ReleaseGroup, QuantileRoundsTheLevelAsTheOrderStatisticDoes) {
  std::vector<double> values(100);
  for (std::size_t i = 0; i < values.size(); ++i) values[i] = static_cast<double>(i + 1);
  const MixtureColumn m({values}, {0}, {1.0});
  for (double p : {0.99 + 5e-12, 0.5 + 5e-12, 0.5 - 5e-12, 0.25}) {
    SCOPED_TRACE(p);
    EXPECT_EQ(m.quantile(p, false), values[quantile_rank(values.size(), p) - 1]);
  }
  EXPECT_EQ(m.quantile(0.99 + 5e-12, false), 99.0);
}

TEST(ReleaseGroup, EstimatesEqualTheRowsRepeatedByTheirCounts) {
  // Two bodies with 1 and 3 objects per release: the weighted empirical distribution is that of
  // the rows with each of the second body's repeated three times.
  boost::random::mt19937 rng(11);
  boost::random::exponential_distribution<double> near(1.0), far(0.2);
  std::vector<double> a(400), b(400);
  for (double& v : a) v = near(rng);
  for (double& v : b) v = far(rng);
  const MixtureColumn m({a, b}, {0, 0}, {1.0, 3.0});
  std::vector<double> repeated = a;
  for (double v : b) repeated.insert(repeated.end(), 3, v);
  std::sort(repeated.begin(), repeated.end());
  for (double p : {0.1, 0.5, 0.9, 0.99, 0.999}) {
    const std::uint64_t k = quantile_rank(repeated.size(), p);
    EXPECT_EQ(m.quantile(p, false), repeated[k - 1]) << p;
  }
}

// The p-quantile of the mixture w1 Exp(l1) + w2 Exp(l2), solved with Boost.Math's cdfs.
double mixture_quantile(double p, double w1, double l1, double w2, double l2) {
  const boost::math::exponential_distribution<double> e1(l1), e2(l2);
  auto f = [&](double x) {
    return (w1 * boost::math::cdf(e1, x) + w2 * boost::math::cdf(e2, x)) / (w1 + w2) - p;
  };
  std::uintmax_t iterations = 200;
  const auto root = boost::math::tools::toms748_solve(
      f, 0.0, 1e3, boost::math::tools::eps_tolerance<double>(50), iterations);
  return 0.5 * (root.first + root.second);
}

TEST(ReleaseGroup, UpperBoundCoversTheMixtureQuantileAtLeastAtTheConfidence) {
  // 1000 independent studies of 300 releases, each release one object of a body near (rate 1)
  // and three of a body far (rate 0.2), correlated within the release (they share a factor, as
  // objects of one release share its wind): the 95 % upper bound of the 0.9-quantile of the
  // mixture must cover the true quantile in at least 95 % of the studies, within the binomial
  // spread of 1000 trials (Boost.Math).
  constexpr int kStudies = 1000, kReleases = 300;
  const double truth = mixture_quantile(0.9, 1.0, 1.0, 3.0, 0.2);
  boost::random::mt19937 rng(2026);
  boost::random::exponential_distribution<double> unit(1.0);
  int covered = 0, covered_interval = 0;
  for (int s = 0; s < kStudies; ++s) {
    std::vector<double> a(kReleases), b(kReleases);
    for (int i = 0; i < kReleases; ++i) {
      // Both bodies' values of one release move with a shared factor: a copula, leaving each
      // body's own distribution exponential (the smaller of two exponentials is exponential).
      const double shared = unit(rng);
      a[i] = std::min(unit(rng), shared) * 2.0 / 1.0;  // min of two Exp(1): Exp(2); scaled: Exp(1)
      b[i] = std::min(unit(rng), shared) * 2.0 / 0.2;  // Exp(0.2)
    }
    const MixtureColumn m({a, b}, {0, 0}, {1.0, 3.0});
    covered += m.upper_bound(0.9, 0.95, false) >= truth ? 1 : 0;
    const Containment c = m.containment(0.9, 0.95);
    covered_interval += c.interval_lower <= truth && truth <= c.interval_upper ? 1 : 0;
  }
  const boost::math::binomial_distribution<double> trials(kStudies, 0.95);
  const double least = boost::math::quantile(trials, 0.001);  // a 1-in-1000 shortfall
  EXPECT_GE(covered, least) << "covered " << covered << " of " << kStudies;
  EXPECT_GE(covered_interval, least) << "interval covered " << covered_interval;
}

TEST(ReleaseGroup, AllIsOneReleaseAboutOneWeightedCentre) {
  // Two bodies, 1 and 3 objects per release, landing about (3, 0) and (103, 0): the centre of
  // "all" is the objects' mean, (78, 0), and its zone rule counts about that centre.
  test::OwnedTable rows;
  std::vector<double> input;  // a sampled input that moves every impact east
  boost::random::mt19937 rng(5);
  boost::random::normal_distribution<double> spread(0.0, 5.0);
  constexpr int kReleases = 2000;
  for (int i = 0; i < kReleases; ++i)
    for (std::uint16_t b = 0; b < 2; ++b) {
      input.push_back(static_cast<double>(i % 7));
      const double east = 100.0 * b + spread(rng) + input.back();
      rows.add(b, east, spread(rng), true, b ? 50.0 : 5.0);
    }
  rows.names = {"push"};
  rows.inputs = {input};
  const ImpactTable t = rows.view();
  FootprintSettings s;
  s.body_names = {"light", "heavy"};
  s.body_counts = {1.0, 3.0};
  s.releases = kReleases;
  s.levels = {0.5, 0.9};
  s.rules.zone_radius = 40.0;
  s.rules.max_outside = 0.5;
  s.rules.energy_limit = 20.0;
  s.rules.max_exceed = 0.5;
  const Footprint f = compute_footprint(t, s);
  ASSERT_EQ(f.groups.size(), 3u);
  const GroupFootprint& all = f.groups[2];
  EXPECT_EQ(all.name, "all");
  EXPECT_NEAR(all.centre.east, 78.0, 0.5);  // the input pushes every impact 3 m east
  EXPECT_NEAR(all.centre.north, 0.0, 0.5);
  EXPECT_DOUBLE_EQ(all.objects_per_release, 4.0);
  // A quarter of the objects (the light body's) lie about 75 m from that centre, outside 40 m;
  // the heavy ones about 25 m away, inside.
  for (const RuleCheck& k : f.rules) {
    if (k.group != "all") continue;
    if (k.rule == "zone_radius") {
      EXPECT_NEAR(k.value, 0.25, 0.02);
      EXPECT_LT(k.lower, k.value);
      EXPECT_GT(k.upper, k.value);
      EXPECT_EQ(k.status, RuleStatus::within);
    } else {
      EXPECT_NEAR(k.value, 0.75, 1e-12);  // the heavy body's three objects of every four
      EXPECT_EQ(k.status, RuleStatus::exceeds);
    }
  }
  // The figures of each body are its own: the light body's centre is its own mean.
  EXPECT_NEAR(f.groups[0].centre.east, 3.0, 0.5);
  EXPECT_NEAR(f.groups[1].centre.east, 103.0, 0.5);
  // Sensitivities are each body's own; none are pooled across bodies.
  EXPECT_TRUE(all.sensitivity.empty());
  // Found by a user: a body's table listed another body's inputs, which cannot move it.
  {
    ImpactTable own = rows.view();
    own.input_names = {"push", "light.drag.cd", "heavy.mass"};
    own.inputs = {input, input, input};
    const Footprint g = compute_footprint(own, s);
    std::vector<std::string> light, heavy;
    for (const auto& x : g.groups[0].sensitivity) light.push_back(x.input);
    for (const auto& x : g.groups[1].sensitivity) heavy.push_back(x.input);
    std::sort(light.begin(), light.end());
    std::sort(heavy.begin(), heavy.end());
    EXPECT_EQ(light, (std::vector<std::string>{"light.drag.cd", "push"}));
    EXPECT_EQ(heavy, (std::vector<std::string>{"heavy.mass", "push"}));
  }
  ASSERT_EQ(f.groups[0].sensitivity.size(), 1u);
  EXPECT_GT(f.groups[0].sensitivity[0].crossrange, 0.2);  // east: right of a northward track
  // The hazard polygons hold at least their level of the objects, weighted.
  for (const auto& p : all.polygons) {
    ASSERT_TRUE(p.determined);
    EXPECT_GE(p.coverage, p.level);
  }
}

}  // namespace
}  // namespace strewn
