// Sampling: draws against Boost.Math's distributions (Kolmogorov-Smirnov statistic and moments on
// 10^5 draws), rank correlations achieved, and the independence of each sample's numbers from
// the order, thread or block in which they are drawn.
#include <gtest/gtest.h>

#include <algorithm>
#include <boost/math/distributions/lognormal.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/triangular.hpp>
#include <boost/math/distributions/uniform.hpp>
#include <cmath>
#include <cstring>
#include <functional>
#include <numeric>

#include "core/errors.hpp"
#include "core/random_stream.hpp"
#include "sampling/input_sampler.hpp"
#include "sampling/plan.hpp"

namespace strewn {
namespace {

constexpr std::size_t kDraws = 100000;

std::vector<double> draws(const Uncertain& u, std::uint64_t seed) {
  SamplePlan plan(SamplingPlan::random, seed, 1, kDraws);
  SamplePlan::Cursor cursor(plan);
  std::vector<double> x(kDraws);
  double uniform = 0.0;
  for (std::size_t i = 0; i < kDraws; ++i) {
    cursor.uniforms(i, std::span<double>(&uniform, 1));
    x[i] = u.quantile(uniform);
  }
  return x;
}

// Kolmogorov-Smirnov statistic sup |F_n(x) - F(x)| of the sample against the reference CDF.
double ks_statistic(std::vector<double> x, const std::function<double(double)>& cdf) {
  std::sort(x.begin(), x.end());
  double d = 0.0;
  const double n = static_cast<double>(x.size());
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double f = cdf(x[i]);
    d = std::max({d, std::abs(f - static_cast<double>(i) / n),
                  std::abs(static_cast<double>(i + 1) / n - f)});
  }
  return d;
}

// Kolmogorov's limiting distribution: P(sqrt(n) D_n > 1.949) = 0.001 (the usual 0.1 percent
// critical value of the KS test, common practice).
constexpr double kKsCritical = 1.949;

void check_moments(const std::vector<double>& x, double mean, double variance) {
  const double n = static_cast<double>(x.size());
  const double m = std::accumulate(x.begin(), x.end(), 0.0) / n;
  double v = 0.0;
  for (double xi : x) v += (xi - m) * (xi - m);
  v /= n - 1.0;
  EXPECT_NEAR(m, mean, 5.0 * std::sqrt(variance / n));  // five standard errors
  EXPECT_NEAR(v / variance, 1.0, 0.03);
}

TEST(Sampling, NormalAgainstBoostMath) {
  const boost::math::normal_distribution<double> ref(10.0, 2.0);
  const auto x = draws(Uncertain::normal(10.0, 2.0), 11);
  EXPECT_LT(ks_statistic(x, [&](double v) { return boost::math::cdf(ref, v); }) * std::sqrt(kDraws),
            kKsCritical);
  check_moments(x, 10.0, 4.0);
}

TEST(Sampling, TruncatedNormalAgainstBoostMath) {
  // Reference: the truncated CDF (F(x) - F(a)) / (F(b) - F(a)) from Boost.Math's normal.
  const boost::math::normal_distribution<double> ref(10.0, 2.0);
  const double fa = boost::math::cdf(ref, 9.0), fb = boost::math::cdf(ref, 14.0);
  const auto x = draws(Uncertain::normal(10.0, 2.0, 9.0, 14.0), 12);
  EXPECT_GE(*std::min_element(x.begin(), x.end()), 9.0);
  EXPECT_LE(*std::max_element(x.begin(), x.end()), 14.0);
  EXPECT_LT(ks_statistic(x, [&](double v) { return (boost::math::cdf(ref, v) - fa) / (fb - fa); }) *
                std::sqrt(kDraws),
            kKsCritical);
}

TEST(Sampling, LognormalAgainstBoostMath) {
  const boost::math::lognormal_distribution<double> ref(std::log(3.0), 0.5);
  const auto x = draws(Uncertain::lognormal(3.0, 0.5), 13);
  EXPECT_LT(ks_statistic(x, [&](double v) { return boost::math::cdf(ref, v); }) * std::sqrt(kDraws),
            kKsCritical);
  check_moments(x, boost::math::mean(ref), boost::math::variance(ref));
}

TEST(Sampling, UniformAndTriangularAgainstBoostMath) {
  const boost::math::uniform_distribution<double> uniform(-1.0, 4.0);
  const auto x = draws(Uncertain::uniform(-1.0, 4.0), 14);
  EXPECT_LT(
      ks_statistic(x, [&](double v) { return boost::math::cdf(uniform, v); }) * std::sqrt(kDraws),
      kKsCritical);
  check_moments(x, boost::math::mean(uniform), boost::math::variance(uniform));
  const boost::math::triangular_distribution<double> triangle(0.0, 2.0, 10.0);
  const auto y = draws(Uncertain::triangular(0.0, 2.0, 10.0), 15);
  EXPECT_LT(
      ks_statistic(y, [&](double v) { return boost::math::cdf(triangle, v); }) * std::sqrt(kDraws),
      kKsCritical);
  check_moments(y, boost::math::mean(triangle), boost::math::variance(triangle));
}

// Weighted choice: each value's share within five binomial standard errors of its weight.
TEST(Sampling, ChoiceFrequencies) {
  const auto x = draws(Uncertain::choice({5.0, 1.0, 2.0}, {0.3, 0.2, 0.5}), 16);
  for (const auto& [value, weight] : {std::pair{1.0, 0.2}, {2.0, 0.5}, {5.0, 0.3}}) {
    const double share = static_cast<double>(std::count(x.begin(), x.end(), value)) / kDraws;
    EXPECT_NEAR(share, weight, 5.0 * std::sqrt(weight * (1.0 - weight) / kDraws)) << value;
  }
}

const std::string kCorrelated = R"([release]
altitude = 1000.0
delay = { dist = "uniform", min = 0.0, max = 2.0 }
[[body]]
name = "crate"
mass = { dist = "lognormal", median = 50.0, sigma = 0.2 }
[body.drag]
model = "area"
cd = { dist = "triangular", min = 0.8, mode = 1.0, max = 1.3 }
area = { dist = "normal", mean = 0.5, sd = 0.05 }
[[correlation]]
between = ["crate.mass", "crate.drag.area"]
rho = 0.6
[[correlation]]
between = ["crate.drag.cd", "release.delay"]
rho = -0.4
[study]
seed = 99
)";

std::vector<double> ranks(const std::vector<double>& x) {
  std::vector<std::size_t> order(x.size());
  std::iota(order.begin(), order.end(), 0);
  std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return x[a] < x[b]; });
  std::vector<double> r(x.size());
  for (std::size_t i = 0; i < order.size(); ++i) r[order[i]] = static_cast<double>(i);
  return r;
}

double spearman(const std::vector<double>& a, const std::vector<double>& b) {
  const auto ra = ranks(a), rb = ranks(b);
  const double n = static_cast<double>(a.size()), mean = (n - 1.0) / 2.0;
  double num = 0.0, da = 0.0, db = 0.0;
  for (std::size_t i = 0; i < a.size(); ++i) {
    num += (ra[i] - mean) * (rb[i] - mean);
    da += (ra[i] - mean) * (ra[i] - mean);
    db += (rb[i] - mean) * (rb[i] - mean);
  }
  return num / std::sqrt(da * db);
}

// Achieved rank correlation within 0.02 of the request, with each input keeping its own
// distribution; uncorrelated pairs stay near zero.
TEST(Sampling, RankCorrelationAchieved) {
  const Scenario scenario = parse_scenario(kCorrelated, "correlated.toml");
  const std::uint64_t n = 50000;
  const InputSampler sampler(scenario, n);
  ASSERT_EQ(sampler.dimensions(), 4u);
  InputSampler::Workspace workspace(sampler);
  std::vector<std::vector<double>> columns(4, std::vector<double>(n));
  std::vector<double> values(4);
  for (std::uint64_t i = 0; i < n; ++i) {
    sampler.draw(i, values, workspace);
    for (std::size_t d = 0; d < 4; ++d) columns[d][i] = values[d];
  }
  auto column = [&](const std::string& name) {
    for (std::size_t d = 0; d < 4; ++d)
      if (sampler.inputs()[d].name == name) return columns[d];
    ADD_FAILURE() << name;
    return columns[0];
  };
  EXPECT_NEAR(spearman(column("crate.mass"), column("crate.drag.area")), 0.6, 0.02);
  EXPECT_NEAR(spearman(column("crate.drag.cd"), column("release.delay")), -0.4, 0.02);
  EXPECT_NEAR(spearman(column("crate.mass"), column("release.delay")), 0.0, 0.02);
  // The margins are untouched by the copula: the mass is still lognormal with median 50.
  auto mass = column("crate.mass");
  std::nth_element(mass.begin(), mass.begin() + n / 2, mass.end());
  EXPECT_NEAR(mass[n / 2], 50.0, 0.3);
}

TEST(Sampling, ImpossibleCorrelationsAreRefusedByName) {
  std::string text = kCorrelated;
  text.replace(text.find("rho = 0.6"), 9, "rho = 0.9");
  text += R"([[correlation]]
between = ["crate.drag.area", "crate.drag.cd"]
rho = 0.9
[[correlation]]
between = ["crate.mass", "crate.drag.cd"]
rho = -0.9
)";
  const Scenario scenario = parse_scenario(text, "impossible.toml");
  try {
    InputSampler sampler(scenario, 100);
    FAIL() << "accepted";
  } catch (const ScenarioError& e) {
    ASSERT_FALSE(e.problems().empty());
    EXPECT_NE(e.problems()[0].message.find("not positive definite"), std::string::npos);
    EXPECT_NE(e.problems()[0].key_path.find("correlation["), std::string::npos);
  }
}

// Sample i gets the same numbers, to the bit, whatever order or workspace draws it (threads and
// blocks are just other orders).
TEST(Sampling, SamplesDoNotDependOnDrawingOrder) {
  for (SamplingPlan kind : {SamplingPlan::random, SamplingPlan::latin, SamplingPlan::sobol}) {
    Scenario scenario = parse_scenario(kCorrelated, "correlated.toml");
    scenario.study.sampling = kind;
    const std::uint64_t n = 512;
    const InputSampler sampler(scenario, n);
    std::vector<double> forward(n * 4), backward(n * 4);
    InputSampler::Workspace a(sampler), b(sampler);
    for (std::uint64_t i = 0; i < n; ++i) sampler.draw(i, std::span(forward).subspan(i * 4, 4), a);
    for (std::uint64_t i = n; i-- > 0;) {
      InputSampler::Workspace fresh(sampler);
      sampler.draw(i, std::span(backward).subspan(i * 4, 4), i % 2 ? fresh : b);
    }
    EXPECT_EQ(std::memcmp(forward.data(), backward.data(), forward.size() * sizeof(double)), 0)
        << to_string(kind);
  }
}

// Latin hypercube (McKay, Beckman and Conover 1979): in every dimension each of the n strata
// holds exactly one sample.
TEST(Sampling, LatinHypercubeFillsEveryStratumOnce) {
  const std::uint64_t n = 1000;
  const SamplePlan plan(SamplingPlan::latin, 5, 3, n);
  SamplePlan::Cursor cursor(plan);
  std::vector<std::vector<int>> hits(3, std::vector<int>(n, 0));
  double u[3];
  for (std::uint64_t i = 0; i < n; ++i) {
    cursor.uniforms(i, u);
    for (int d = 0; d < 3; ++d) ++hits[d][static_cast<std::size_t>(u[d] * n)];
  }
  for (const auto& h : hits)
    EXPECT_TRUE(std::all_of(h.begin(), h.end(), [](int c) { return c == 1; }));
}

// Sobol points fill the unit cube far more evenly than random ones: the mean of 4096 shifted
// points is within 1e-3 of 1/2 in each dimension (random points: standard error 4.5e-3).
TEST(Sampling, SobolIsEvenAndInsideTheOpenInterval) {
  const std::uint64_t n = 4096;
  const SamplePlan plan(SamplingPlan::sobol, 7, 5, n);
  SamplePlan::Cursor cursor(plan);
  double u[5], sum[5] = {0, 0, 0, 0, 0};
  for (std::uint64_t i = 0; i < n; ++i) {
    cursor.uniforms(i, u);
    for (int d = 0; d < 5; ++d) {
      ASSERT_GT(u[d], 0.0);
      ASSERT_LT(u[d], 1.0);
      sum[d] += u[d];
    }
  }
  for (double s : sum) EXPECT_NEAR(s / n, 0.5, 1e-3);
}

// A found defect: a Sobol study whose inputs are all fixed numbers crashed on its first sample
// (the plan had no engine for no dimension). Every plan draws nothing for it.
TEST(Sampling, PlansWithNoSampledInputDrawNothing) {
  for (SamplingPlan kind : {SamplingPlan::random, SamplingPlan::latin, SamplingPlan::sobol}) {
    const SamplePlan plan(kind, 7, 0, 100);
    SamplePlan::Cursor cursor(plan);
    for (std::uint64_t i : {0u, 5u, 1u, 99u}) cursor.uniforms(i, std::span<double>());
    EXPECT_EQ(plan.dimensions(), 0u);
  }
}

TEST(Sampling, StreamsAreSeparateAndReplayable) {
  RandomStream a(1, 42, 0), b(1, 42, 0), c(1, 43, 0), d(2, 42, 0), e(1, 42, 1);
  const double ua = a.uniform();
  EXPECT_EQ(ua, b.uniform());
  EXPECT_NE(ua, c.uniform());
  EXPECT_NE(ua, d.uniform());
  EXPECT_NE(ua, e.uniform());
}

}  // namespace
}  // namespace strewn
