// Footprint statistics held against references outside strewn: the exact Gaussian footprint of a
// linear-drag body in a uniform wind with a Gaussian bias, the coverage of the distribution-free
// bounds in independent repetitions, Boost.Math's binomial, beta, chi-square and normal figures,
// and the rank correlation of a bivariate normal.
#include <gtest/gtest.h>

#include <tbb/global_control.h>
#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/random/mersenne_twister.hpp>
#include <boost/random/normal_distribution.hpp>
#include <cmath>
#include <numbers>

#include <filesystem>
#include "footprint/footprint.hpp"
#include "footprint/ranks.hpp"
#include "impact_rows.hpp"

#include "pipeline/study_record.hpp"
#include "report/footprint_report.hpp"
#include "store/results_file.hpp"
#include "study/study.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::OwnedTable;

FootprintSettings one_body(std::uint64_t releases) {
  FootprintSettings s;
  s.body_names = {"item"};
  s.body_counts = {1.0};
  s.releases = releases;
  return s;
}

// Physics.md's footprint with a known answer. A Stokes (linear-drag) body released at rest in a
// uniform medium and a uniform wind w drifts x = w (t - tau (1 - e^(-t/tau))) while it falls
// v_t (t - tau (1 - e^(-t/tau))): it lands at exactly x = w h / v_t, an affine function of the
// wind. With a Gaussian wind bias of standard deviation s per component the footprint is exactly
// Gaussian: mean w0 h / v_t, isotropic standard deviation sigma = s h / v_t, containment radii
// sigma sqrt(-2 ln(1 - p)) about the mean (Rayleigh), v_t from Stokes' law with buoyancy.
TEST(Footprint, ExactGaussianFootprintOfLinearDragInABiasedWind) {
  const std::string text = R"(title = "linear drag in a biased uniform wind"
[medium]
model = "uniform"
density = 1.2
viscosity = 1.8e-5
[wind]
layers = [ { altitude = 0.0, speed = 3.0, from = 270.0 }, { altitude = 500.0, speed = 3.0, from = 270.0 } ]
[wind.uncertainty]
model = "bias"
speed_sd = 1.0
[release]
altitude = 100.0
[[body]]
name = "droplet"
mass = 6.544984694978735e-11
[body.drag]
model = "stokes"
diameter = 5.0e-5
[study]
samples = 20000
seed = 77
levels = [0.5, 0.9, 0.99]
tolerance = 0.05
)";
  const Scenario s = parse_scenario(text, "gaussian.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 20000);
  StudyOptions options;
  options.samples = 20000;
  const StudyResult result = run_study(model, options);
  ASSERT_EQ(result.failed, 0u);
  const Footprint f =
      compute_footprint(impact_table(result.columns), footprint_settings(s, world, 20000));

  // Stokes (1851): v_t = (m - rho V) g / (3 pi mu d). Gravity at the release height differs
  // from g0 by 3e-5, far below the Monte Carlo error.
  const double d = 5.0e-5, volume = std::numbers::pi * d * d * d / 6.0;
  const double vt =
      (6.544984694978735e-11 - 1.2 * volume) * 9.80665 / (3.0 * std::numbers::pi * 1.8e-5 * d);
  const double k = 100.0 / vt;  // metres of drift per m/s of wind
  const double sigma = 1.0 * k;
  const double n = 20000.0;
  const GroupFootprint& g = f.groups.back();
  ASSERT_EQ(g.name, "all");
  // Mean: 3 m/s east times k, within 4 standard errors sigma / sqrt(n).
  EXPECT_NEAR(g.mean.east, 3.0 * k, 4.0 * sigma / std::sqrt(n));
  EXPECT_NEAR(g.mean.north, 0.0, 4.0 * sigma / std::sqrt(n));
  // Variances: relative standard error sqrt(2 / n).
  EXPECT_NEAR(g.covariance[0] / (sigma * sigma), 1.0, 4.0 * std::sqrt(2.0 / n));
  EXPECT_NEAR(g.covariance[2] / (sigma * sigma), 1.0, 4.0 * std::sqrt(2.0 / n));
  EXPECT_NEAR(g.covariance[1] / (sigma * sigma), 0.0, 4.0 / std::sqrt(n));
  for (const auto& c : g.containment) {
    const double exact = sigma * std::sqrt(-2.0 * std::log1p(-c.level));
    // The exact radius lies in the distribution-free 95 % interval, and the estimate is within
    // 4 standard errors of it: sqrt(p (1 - p) / n) / f(r), f the Rayleigh density.
    const double density =
        exact / (sigma * sigma) * std::exp(-exact * exact / (2.0 * sigma * sigma));
    const double se = std::sqrt(c.level * (1.0 - c.level) / n) / density;
    EXPECT_NEAR(c.radius, exact, 4.0 * se) << c.level;
    EXPECT_LE(c.interval_lower, exact * 1.001) << c.level;
    EXPECT_GE(c.interval_upper, exact * 0.999) << c.level;
    ASSERT_TRUE(c.radius_upper);
    EXPECT_GE(*c.radius_upper, c.radius);
  }
  // Gaussian CEP: the Rayleigh median sigma sqrt(2 ln 2); the counted one within its error.
  EXPECT_NEAR(g.cep_gaussian, sigma * std::sqrt(2.0 * std::log(2.0)), 0.02 * sigma);
  EXPECT_NEAR(g.cep, sigma * std::sqrt(2.0 * std::log(2.0)), 0.03 * sigma);
  // Ellipses: semi-axes sigma sqrt(-2 ln(1 - p)), and about p of the impacts counted inside.
  for (const auto& e : g.ellipses) {
    EXPECT_NEAR(e.semi_major, sigma * e.scale, 0.03 * sigma * e.scale);
    EXPECT_NEAR(e.semi_minor, sigma * e.scale, 0.03 * sigma * e.scale);
    EXPECT_NEAR(e.counted, e.level, 4.0 * std::sqrt(e.level * (1.0 - e.level) / n) + 1e-4);
  }
  // The release track is 0 (north), so downrange is north and crossrange, to its right, is east:
  // about the mean, quantiles of N(0, sigma) (Boost.Math normal quantile).
  const boost::math::normal_distribution<double> normal(0.0, sigma);
  for (const auto& q : g.crossrange) {
    const double exact = boost::math::quantile(normal, q.probability);
    EXPECT_LE(q.lower, exact + 0.01 * sigma) << q.probability;
    EXPECT_GE(q.upper, exact - 0.01 * sigma) << q.probability;
  }
  // The wind bias drives the spread: Spearman of wind.bias_east with crossrange (east) near 1.
  for (const auto& sens : g.sensitivity)
    if (sens.input == "wind.bias_east") {
      EXPECT_GT(sens.crossrange, 0.999);
      EXPECT_NEAR(sens.downrange, 0.0, 0.05);
    }
  // Hazard polygons hold at least their level, counted.
  for (const auto& p : g.polygons) {
    ASSERT_TRUE(p.determined);
    EXPECT_GE(p.coverage, p.level);
  }
}

// Standard normal impact points around the origin, Rayleigh distances (seeded Mersenne twister).
std::vector<double> rayleigh_distances(std::uint32_t seed, int n, double sigma) {
  boost::random::mt19937 engine(seed);
  boost::random::normal_distribution<double> normal(0.0, sigma);
  std::vector<double> d(n);
  for (auto& x : d) x = std::hypot(normal(engine), normal(engine));
  return d;
}

// The one-sided bound covers the true radius in the share of repetitions that the binomial law
// gives (Wilks 1941): exactly P[Bin(n, p) <= k - 1] for the rank k used.
TEST(Footprint, UpperBoundCoversTheTrueRadiusAtTheStatedRate) {
  const int n = 300, repetitions = 4000;
  const double p = 0.9, c = 0.95, sigma = 2.0;
  const double truth = sigma * std::sqrt(-2.0 * std::log1p(-p));
  const std::uint64_t k = upper_bound_rank(n, p, c);
  const boost::math::binomial_distribution<double> binomial(n, p);
  const double exact_coverage = boost::math::cdf(binomial, static_cast<double>(k - 1));
  EXPECT_GE(exact_coverage, c);
  int covered = 0, interval_covered = 0;
  const double median_truth = sigma * std::sqrt(2.0 * std::log(2.0));
  for (int r = 0; r < repetitions; ++r) {
    auto d = rayleigh_distances(1000 + static_cast<std::uint32_t>(r), n, sigma);
    const auto result = containment(d, {p, 0.5}, c);
    covered += *result[0].radius_upper >= truth ? 1 : 0;
    interval_covered +=
        result[1].interval_lower <= median_truth && median_truth <= result[1].interval_upper ? 1
                                                                                             : 0;
  }
  const double share = static_cast<double>(covered) / repetitions;
  const double se = std::sqrt(exact_coverage * (1.0 - exact_coverage) / repetitions);
  EXPECT_NEAR(share, exact_coverage, 4.0 * se);
  // The two-sided interval of the median covers it in at least c of the repetitions (minus 4 SE).
  EXPECT_GE(static_cast<double>(interval_covered) / repetitions,
            c - 4.0 * std::sqrt(c * (1.0 - c) / repetitions));
}

// Interval ranks against the binomial law directly (Boost.Math): the coverage of (X_(l), X_(u))
// is F(u - 1) - F(l - 1) >= c, with the tails at most (1 - c) / 2 each.
TEST(Footprint, QuantileIntervalRanksHoldTheBinomialCoverage) {
  for (std::uint64_t n : {20u, 59u, 300u, 5000u})
    for (double p : {0.05, 0.5, 0.9, 0.99}) {
      const double c = 0.95;
      const IntervalRanks r = quantile_interval_ranks(n, p, c);
      const boost::math::binomial_distribution<double> b(static_cast<double>(n), p);
      const double below =
          r.lower == 0 ? 0.0 : boost::math::cdf(b, static_cast<double>(r.lower - 1));
      const double upto = r.upper > n ? 1.0 : boost::math::cdf(b, static_cast<double>(r.upper - 1));
      EXPECT_LE(below, 0.5 * (1.0 - c) + 1e-12) << n << " " << p;
      EXPECT_GE(upto, 1.0 - 0.5 * (1.0 - c) - 1e-12) << n << " " << p;
      EXPECT_GE(upto - below, c - 1e-12);
      // And the ranks are the tightest: one step inward breaks a tail.
      if (r.lower >= 1 && r.lower < n) {
        EXPECT_GT(boost::math::cdf(b, static_cast<double>(r.lower)), 0.5 * (1.0 - c));
      }
      if (r.upper >= 2 && r.upper <= n) {
        EXPECT_LT(boost::math::cdf(b, static_cast<double>(r.upper - 2)), 1.0 - 0.5 * (1.0 - c));
      }
    }
}

// Clopper-Pearson bounds against Boost.Math's own exact interval (find_upper/lower_bound_on_p),
// and the ellipse scale against the chi-square quantile with 2 degrees of freedom.
TEST(Footprint, ClopperPearsonAndChiSquareAgreeWithBoostMath) {
  using boost::math::binomial_distribution;
  for (std::uint64_t n : {10u, 300u, 20000u})
    for (std::uint64_t x : {0u, 1u, 7u}) {
      const double c = 0.95;
      EXPECT_NEAR(clopper_pearson_upper(x, n, c),
                  binomial_distribution<double>::find_upper_bound_on_p(
                      static_cast<double>(n), static_cast<double>(x), 1.0 - c,
                      binomial_distribution<double>::clopper_pearson_exact_interval),
                  1e-12);
      EXPECT_NEAR(clopper_pearson_lower(x, n, c),
                  binomial_distribution<double>::find_lower_bound_on_p(
                      static_cast<double>(n), static_cast<double>(x), 1.0 - c,
                      binomial_distribution<double>::clopper_pearson_exact_interval),
                  1e-12);
    }
  // With no event in n trials the upper bound is 1 - (1 - c)^(1/n) ("rule of three", common
  // practice: about 3 / n at 95 %).
  EXPECT_NEAR(clopper_pearson_upper(0, 3000, 0.95), 1.0 - std::pow(0.05, 1.0 / 3000.0), 1e-12);

  OwnedTable t;
  for (int i = 0; i < 50; ++i)
    t.add(0, std::cos(i * 0.7) * (1 + i % 5), std::sin(i * 1.3) * (2 + i % 3));
  const Footprint f = compute_footprint(t.view(), one_body(50));
  const boost::math::chi_squared_distribution<double> chi2(2.0);
  for (const auto& e : f.groups[0].ellipses)
    EXPECT_NEAR(e.scale, std::sqrt(boost::math::quantile(chi2, e.level)), 1e-9);
}

// The Gaussian circle radius: Rayleigh median for equal variances; the normal quartile
// 0.6745 sigma when one variance vanishes (Boost.Math normal quantile); and within 3 % of
// Grubbs' approximation 0.5887 (s1 + s2) for axis ratios above 0.3 (common practice).
TEST(Footprint, GaussianCepAgainstClosedFormsAndApproximation) {
  EXPECT_NEAR(gaussian_circle_radius({4.0, 0.0, 4.0}, 0.5), 2.0 * std::sqrt(2.0 * std::log(2.0)),
              1e-8);
  const boost::math::normal_distribution<double> unit;
  EXPECT_NEAR(gaussian_circle_radius({9.0, 0.0, 0.0}, 0.5), 3.0 * boost::math::quantile(unit, 0.75),
              1e-8);
  for (double ratio : {0.3, 0.5, 0.8}) {
    const double s1 = 10.0, s2 = ratio * s1;
    // Rotated by 30 degrees: the radius does not depend on the orientation.
    const double a = 0.5236, ca = std::cos(a), sa = std::sin(a);
    const std::array<double, 3> cov{s1 * s1 * ca * ca + s2 * s2 * sa * sa,
                                    (s1 * s1 - s2 * s2) * ca * sa,
                                    s1 * s1 * sa * sa + s2 * s2 * ca * ca};
    EXPECT_NEAR(gaussian_circle_radius(cov, 0.5), 0.5887 * (s1 + s2), 0.03 * 0.5887 * (s1 + s2));
  }
}

// Spearman's rank correlation of a bivariate normal with correlation rho is
// (6 / pi) asin(rho / 2) (Pearson 1907; e.g. Kruskal 1958); ties take mid-ranks.
TEST(Footprint, SpearmanOfABivariateNormal) {
  boost::random::mt19937 engine(5);
  boost::random::normal_distribution<double> normal;
  const int n = 20000;
  for (double rho : {-0.8, 0.3, 0.9}) {
    std::vector<double> x(n), y(n);
    for (int i = 0; i < n; ++i) {
      x[i] = normal(engine);
      y[i] = rho * x[i] + std::sqrt(1 - rho * rho) * normal(engine);
    }
    const double exact = 6.0 / std::numbers::pi * std::asin(rho / 2.0);
    EXPECT_NEAR(spearman(x, y), exact, 4.0 / std::sqrt(n)) << rho;
  }
  // Mid-ranks by definition: 1, 2.5, 2.5, 4.
  RankScratch scratch;
  std::vector<double> ranks(4);
  const std::vector<double> values{1.0, 2.0, 2.0, 3.0};
  mid_ranks(values, ranks, scratch);
  EXPECT_EQ(ranks, (std::vector<double>{1.0, 2.5, 2.5, 4.0}));
  EXPECT_TRUE(std::isnan(spearman(std::vector<double>{1, 1, 1}, std::vector<double>{1, 2, 3})));
}

// A category's effect is its correlation ratio (Pearson 1903) of the impact's ranks; with two
// categories that is exactly the size of Spearman's correlation with the category's two codes (a
// point-biserial correlation on ranks: the ratio of the between-group to the total sum of
// squares is the squared correlation with the group indicator). Sensitivities are ranked
// strongest first, energy included.
TEST(Footprint, CorrelationRatioOfTwoCategoriesIsTheSizeOfSpearmans) {
  OwnedTable t;
  boost::random::mt19937 engine(21);
  boost::random::normal_distribution<double> normal;
  std::vector<double> member, weak;
  for (int i = 0; i < 3000; ++i) {
    const double m = i % 3 == 0 ? 1.0 : 0.0;  // two ensemble members, unequal shares
    member.push_back(m);
    weak.push_back(normal(engine));
    t.add(0, 30.0 * m + normal(engine) + 0.1 * weak.back(), normal(engine), true,
          5.0 + m + 0.3 * normal(engine));
  }
  t.names = {"weak", "wind.member", "member_as_number"};
  t.inputs = {weak, member, member};
  ImpactTable table = t.view();
  table.categorical = {false, true, false};
  FootprintSettings s = one_body(3000);
  s.downrange_bearing = 90.0;  // east: the member's shift is downrange
  const Footprint f = compute_footprint(table, s);
  const auto& list = f.groups[0].sensitivity;
  ASSERT_EQ(list.size(), 3u);
  const InputSensitivity *category = nullptr, *number = nullptr;
  for (const auto& x : list) {
    if (x.input == "wind.member") category = &x;
    if (x.input == "member_as_number") number = &x;
  }
  ASSERT_TRUE(category && number);
  EXPECT_TRUE(category->categorical);
  EXPECT_NEAR(category->downrange, std::abs(number->downrange), 1e-9);
  EXPECT_NEAR(category->energy, std::abs(number->energy), 1e-9);
  EXPECT_GT(category->downrange, 0.5);
  // Strongest first: the weak input last.
  EXPECT_EQ(list.back().input, "weak");
  for (std::size_t k = 1; k < list.size(); ++k)
    EXPECT_GE(list[k - 1].strength(), list[k].strength());
}

// Ray casting, written independently of the footprint code, to count points in a polygon.
bool inside_by_ray(const std::vector<PlanePoint>& ring, double x, double y) {
  bool inside = false;
  for (std::size_t i = 0, j = ring.size() - 1; i < ring.size(); j = i++) {
    const auto& a = ring[i];
    const auto& b = ring[j];
    if ((a.north > y) != (b.north > y) &&
        x < (b.east - a.east) * (y - a.north) / (b.north - a.north) + a.east)
      inside = !inside;
  }
  return inside;
}

// Hazard polygons: counter-clockwise and convex, and the coverage they report is the count of
// impacts inside (checked here by ray casting), at least the level.
TEST(Footprint, HazardPolygonCoverageIsCounted) {
  OwnedTable t;
  boost::random::mt19937 engine(11);
  boost::random::normal_distribution<double> normal;
  for (int i = 0; i < 5000; ++i) {
    // A skewed, correlated cloud with a far second cluster (2 %): not Gaussian.
    const bool far = i % 50 == 0;
    const double u = normal(engine), v = normal(engine);
    t.add(0, far ? 400.0 + 10 * u : 60.0 * u + 20.0 * v * v,
          far ? 300.0 + 10 * v : 25.0 * v + 0.3 * 60.0 * u);
  }
  FootprintSettings s = one_body(5000);
  s.levels = {0.5, 0.9, 0.99};
  const Footprint f = compute_footprint(t.view(), s);
  for (const auto& p : f.groups[0].polygons) {
    ASSERT_TRUE(p.determined) << p.level;
    EXPECT_GT(polygon_area(p.ring), 0.0);              // counter-clockwise
    for (std::size_t i = 0; i < p.ring.size(); ++i) {  // convex: every turn to the left
      const auto& a = p.ring[i];
      const auto& b = p.ring[(i + 1) % p.ring.size()];
      const auto& c = p.ring[(i + 2) % p.ring.size()];
      EXPECT_GT((b.east - a.east) * (c.north - a.north) - (b.north - a.north) * (c.east - a.east),
                0.0);
    }
    std::size_t inside = 0;
    for (std::size_t i = 0; i < t.east.size(); ++i)
      inside += inside_by_ray(p.ring, t.east[i], t.north[i]);
    EXPECT_NEAR(p.coverage, static_cast<double>(inside) / 5000.0, 2.0 / 5000.0)
        << p.level;  // boundary points
    EXPECT_GE(p.coverage, p.level);
    EXPECT_NEAR(p.area, polygon_area(p.ring), 1e-6 * p.area);
  }
}

// Impacts on a curve (a footprint driven by one ballistic coefficient) are all hull vertices: the
// polygon keeps at most 128 + 4 vertices by its outer approximation, its coverage is still the
// count of impacts inside (ray casting), and its area exceeds the exact hull's by at most the
// bound of the circumscribed 128-gon, (1 / cos(pi / 128))^2 - 1 = 6e-4 of it, plus the margin.
TEST(Footprint, PolygonOfImpactsOnACurveIsBoundedAndStillHoldsThem) {
  OwnedTable t;
  const int count = 20000;
  for (int i = 0; i < count; ++i) {
    const double a = 2.0 * std::numbers::pi * i / count;
    t.add(0, 300.0 * std::cos(a), 120.0 * std::sin(a));
  }
  FootprintSettings s = one_body(count);
  s.levels = {0.99};
  s.polygon_margin = 1e-3;
  const Footprint f = compute_footprint(t.view(), s);
  const HazardPolygon& p = f.groups[0].polygons[0];
  ASSERT_TRUE(p.determined);
  EXPECT_LE(p.ring.size(), 132u);
  std::size_t inside = 0;
  for (int i = 0; i < count; ++i) inside += inside_by_ray(p.ring, t.east[i], t.north[i]);
  EXPECT_NEAR(p.coverage, static_cast<double>(inside) / count, 2.0 / count);
  EXPECT_GE(p.coverage, 0.99);
  const double ellipse = std::numbers::pi * 300.0 * 120.0;
  EXPECT_GT(p.area, 0.99 * ellipse);
  EXPECT_LT(p.area, ellipse * (std::pow(1.0 / std::cos(std::numbers::pi / 128.0), 2) + 1e-4));
}

// Failed flights count as landing infinitely far: they widen the containment, reach the bound
// when they are too many, and stand at both ends of downrange and crossrange.
TEST(Footprint, FailedFlightsCountAsInfinitelyFar) {
  OwnedTable t;
  for (int i = 0; i < 1000; ++i)
    t.add(0, i % 40 - 20.0, i % 30 - 15.0, i % 100 != 0, i % 7 ? 5.0 : 50.0);
  FootprintSettings s = one_body(1000);
  s.levels = {0.5, 0.995};
  s.energy_threshold = 20.0;
  const Footprint f = compute_footprint(t.view(), s);
  const GroupFootprint& g = f.groups[0];
  EXPECT_EQ(g.failed, 10u);
  EXPECT_TRUE(std::isinf(g.containment[1].radius));  // 1 % failed reaches the 0.995 quantile
  EXPECT_FALSE(g.polygons[1].determined);
  EXPECT_TRUE(std::isfinite(g.containment[0].radius));
  EXPECT_TRUE(std::isinf(g.downrange.front().value) && g.downrange.front().value < 0);
  EXPECT_TRUE(std::isinf(g.downrange.back().value) && g.downrange.back().value > 0);
  // Energy above 20 J: every 7th landed row plus the failed ones, counted exactly.
  std::uint64_t above = 0;
  for (int i = 0; i < 1000; ++i) above += (i % 100 == 0 || i % 7 == 0) ? 1 : 0;
  EXPECT_EQ(g.energy_exceedance.count, above);
}

// Grid: counts add up to the landed rows, and densities integrate to the objects per release
// that landed (each body's count included); the merged grid of all bodies adds both.
TEST(Footprint, ImpactGridConservesObjects) {
  OwnedTable t;
  for (int i = 0; i < 400; ++i) {
    t.add(0, 3.3 * (i % 17) - 20.0, 2.1 * (i % 13), i != 5);
    t.add(1, 5.0 * (i % 11) - 2.0, -4.0 * (i % 9));
  }
  FootprintSettings s;
  s.body_names = {"crate", "fragment"};
  s.body_counts = {2.0, 12.0};
  s.releases = 400;
  s.grid_cell = 5.0;
  const Footprint f = compute_footprint(t.view(), s);
  ASSERT_EQ(f.groups.size(), 3u);
  for (const auto& g : f.groups) {
    std::uint64_t hits = 0;
    double objects = 0.0;
    for (std::size_t k = 0; k < g.grid.count.size(); ++k) {
      hits += g.grid.count[k];
      objects += g.grid.density[k] * 25.0 * 400.0;
    }
    EXPECT_EQ(hits, g.landed) << g.name;
    const double expected = g.name == "crate"      ? 2.0 * 399
                            : g.name == "fragment" ? 12.0 * 400
                                                   : 2.0 * 399 + 12.0 * 400;
    EXPECT_NEAR(objects, expected, 1e-9 * expected) << g.name;
  }
  // Cells are sorted and unique.
  const auto& grid = f.groups.back().grid;
  for (std::size_t k = 1; k < grid.count.size(); ++k)
    EXPECT_LT(std::make_pair(grid.east_index[k - 1], grid.north_index[k - 1]),
              std::make_pair(grid.east_index[k], grid.north_index[k]));
}

// Rules: within when the Clopper-Pearson upper bound is at or below the accepted probability,
// exceeds when the lower bound is above it, undetermined otherwise, with the samples that would
// decide it.
TEST(Footprint, RuleStatuses) {
  auto check = [](int outside, int rows, double accepted) {
    OwnedTable t;
    for (int i = 0; i < rows; ++i) t.add(0, i < outside ? 1000.0 : 1.0, 0.0);
    FootprintSettings s = one_body(static_cast<std::uint64_t>(rows));
    s.centre = CentreRule::point;
    s.rules.zone_radius = 100.0;
    s.rules.max_outside = accepted;
    const Footprint f = compute_footprint(t.view(), s);
    EXPECT_EQ(f.rules.size(), 1u);  // one body: reported once, for all
    return f.rules.at(0);
  };
  const RuleCheck within = check(0, 4000, 1e-3);  // upper 1 - 0.05^(1/4000) = 7.5e-4
  EXPECT_EQ(within.status, RuleStatus::within);
  EXPECT_EQ(within.group, "all");
  const RuleCheck exceeds = check(40, 4000, 1e-3);
  EXPECT_EQ(exceeds.status, RuleStatus::exceeds);
  EXPECT_NEAR(exceeds.value, 0.01, 1e-15);
  const RuleCheck open = check(0, 1000, 1e-3);  // 2995 samples would show it (Wilks)
  EXPECT_EQ(open.status, RuleStatus::undetermined);
  EXPECT_EQ(open.samples_needed, 2995u);
}

// The figures do not depend on the thread count (the sections run as tasks; each writes its own).
TEST(Footprint, SameFiguresOnOneAndTwoThreads) {
  OwnedTable t;
  boost::random::mt19937 engine(3);
  boost::random::normal_distribution<double> normal;
  t.names = {"x.a", "x.b", "x.c"};
  t.inputs.assign(3, {});
  for (int i = 0; i < 30000; ++i) {
    const double a = normal(engine), b = normal(engine), c = normal(engine);
    t.add(static_cast<std::uint16_t>(i % 3), 40 * a + 5 * c, 15 * b + 3 * a * a, i % 501 != 0,
          10 + a);
    t.inputs[0].push_back(a);
    t.inputs[1].push_back(b);
    t.inputs[2].push_back(std::round(c * 4));  // ties
  }
  FootprintSettings s;
  s.body_names = {"p", "q", "r"};
  s.body_counts = {1, 2, 3};
  s.releases = 10000;
  auto figures = [&](std::size_t threads) {
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, threads);
    StudyRecord record;
    record.footprint = compute_footprint(t.view(), s);
    return record_json(record, false).dump();
  };
  EXPECT_EQ(figures(1), figures(2));
}

// The footprint of a study is the same read back from its results file.
TEST(Footprint, ResultsFileRoundTrip) {
  OwnedTable t;
  for (int i = 0; i < 600; ++i)
    t.add(static_cast<std::uint16_t>(i % 2), std::sin(i) * 30, std::cos(i * 0.3) * 10, i % 97 != 3,
          i * 0.1);
  t.names = {"a.mass"};
  t.inputs = {std::vector<double>(600)};
  for (int i = 0; i < 600; ++i) t.inputs[0][i] = std::sin(i * 0.1);
  FootprintSettings s;
  s.body_names = {"a", "b"};
  s.body_counts = {1.0, 3.0};
  s.releases = 300;
  s.rules.zone_radius = 25.0;
  s.rules.max_outside = 0.01;
  StudyRecord record;
  record.title = "round trip";
  record.sampling = "random";
  record.latitude = -35.0;
  record.longitude = -20.0;
  record.body_names = s.body_names;
  record.footprint = compute_footprint(t.view(), s);
  // Through the results file written by the study path.
  const std::string scenario_text =
      "[release]\naltitude = 100.0\n[[body]]\nname = \"a\"\nmass = 1.0\n[body.drag]\nmodel = "
      "\"area\"\ncd = 1.0\narea = 0.1\n[[body]]\nname = \"b\"\nmass = 1.0\n[body.drag]\nmodel = "
      "\"area\"\ncd = 1.0\narea = 0.1\n";
  const Scenario scenario = parse_scenario(scenario_text, "rt.toml");
  StudyResult result;
  result.samples = 300;
  const test::ScratchFolder dir("footprint-rt");
  const auto path = (dir / "rt.h5").string();
  write_results(path, scenario, result, record, false);
  const ResultsFile back = read_results(path);
  EXPECT_FALSE(back.has_samples);
  EXPECT_EQ(record_json(back.record, false), record_json(record, false));
}

}  // namespace
}  // namespace strewn
