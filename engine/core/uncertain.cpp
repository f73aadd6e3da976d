#include "core/uncertain.hpp"

#include <algorithm>
#include <boost/math/distributions/lognormal.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/triangular.hpp>
#include <boost/math/distributions/uniform.hpp>
#include <cmath>
#include <numeric>

namespace strewn {

Uncertain Uncertain::normal(double mean, double sd, double lower, double upper) {
  Uncertain u;
  u.kind_ = DistributionKind::normal;
  u.p1_ = mean;
  u.p2_ = sd;
  u.lower_ = lower;
  u.upper_ = upper;
  return u;
}

Uncertain Uncertain::lognormal(double median, double sigma, double lower, double upper) {
  Uncertain u;
  u.kind_ = DistributionKind::lognormal;
  u.p1_ = median;
  u.p2_ = sigma;
  u.lower_ = lower;
  u.upper_ = upper;
  return u;
}

Uncertain Uncertain::uniform(double min, double max) {
  Uncertain u;
  u.kind_ = DistributionKind::uniform;
  u.p1_ = min;
  u.p2_ = max;
  return u;
}

Uncertain Uncertain::triangular(double min, double mode, double max) {
  Uncertain u;
  u.kind_ = DistributionKind::triangular;
  u.p1_ = min;
  u.p2_ = mode;
  u.p3_ = max;
  return u;
}

Uncertain Uncertain::choice(std::vector<double> values, std::vector<double> weights) {
  Uncertain u;
  u.kind_ = DistributionKind::choice;
  u.values_ = std::move(values);
  u.weights_ = std::move(weights);
  if (!u.weights_.empty() && u.weights_.size() != u.values_.size()) return u;  // refused later
  std::vector<std::size_t> order(u.values_.size());
  std::iota(order.begin(), order.end(), 0);
  std::sort(order.begin(), order.end(),
            [&](std::size_t a, std::size_t b) { return u.values_[a] < u.values_[b]; });
  double total = 0.0;
  for (std::size_t i : order) {
    u.sorted_values_.push_back(u.values_[i]);
    total += u.weights_.empty() ? 1.0 : u.weights_[i];
    u.cumulative_.push_back(total);
  }
  if (total > 0.0)
    for (double& c : u.cumulative_) c /= total;
  return u;
}

namespace {
// Boost.Math policy: report domain problems by returning NaN rather than throwing; the
// parameters are validated before any quantile is asked for.
using quiet_policy = boost::math::policies::policy<
    boost::math::policies::domain_error<boost::math::policies::ignore_error>,
    boost::math::policies::overflow_error<boost::math::policies::ignore_error>>;
using Normal = boost::math::normal_distribution<double, quiet_policy>;
using LogNormal = boost::math::lognormal_distribution<double, quiet_policy>;

// The cumulative probabilities F(lower) and F(upper) of a truncation window (0 and 1 where the
// window is open on that side or reaches past the support).
template <class Dist>
std::pair<double, double> window(const Dist& dist, double lower, double upper) {
  const double f_low = std::isfinite(lower) && lower > boost::math::support(dist).first
                           ? boost::math::cdf(dist, lower)
                           : 0.0;
  const double f_high = std::isfinite(upper) ? boost::math::cdf(dist, upper) : 1.0;
  return {f_low, f_high};
}

// Quantile of a continuous distribution truncated to [lower, upper]:
// F^-1(F(lower) + p (F(upper) - F(lower))).
template <class Dist>
double truncated_quantile(const Dist& dist, double p, double lower, double upper) {
  const auto [f_low, f_high] = window(dist, lower, upper);
  const double q = f_low + p * (f_high - f_low);
  if (q <= 0.0) return std::max(lower, boost::math::support(dist).first);
  if (q >= 1.0) return upper;
  return std::clamp(boost::math::quantile(dist, q), lower, upper);
}

template <class Dist>
double window_probability(const Dist& dist, double lower, double upper) {
  const auto [f_low, f_high] = window(dist, lower, upper);
  return f_high - f_low;
}
}  // namespace

std::vector<std::pair<std::string, std::string>> Uncertain::problems() const {
  std::vector<std::pair<std::string, std::string>> out;
  auto finite = [&](const char* name, double v) {
    if (!std::isfinite(v)) out.emplace_back(name, "must be a finite number");
    return std::isfinite(v);
  };
  auto truncation = [&]() {
    if (std::isnan(lower_)) out.emplace_back("min", "must be a number");
    if (std::isnan(upper_)) out.emplace_back("max", "must be a number");
    if (lower_ >= upper_) out.emplace_back("min", "must be below max");
  };
  switch (kind_) {
    case DistributionKind::fixed:
      finite("value", p1_);
      break;
    case DistributionKind::normal:
      finite("mean", p1_);
      if (finite("sd", p2_) && !(p2_ > 0.0)) out.emplace_back("sd", "must be positive");
      truncation();
      if (out.empty() && !(window_probability(Normal(p1_, p2_), lower_, upper_) > 1e-12))
        out.emplace_back("min", "the window [min, max] holds no probability of this normal");
      break;
    case DistributionKind::lognormal:
      if (finite("median", p1_) && !(p1_ > 0.0)) out.emplace_back("median", "must be positive");
      if (finite("sigma", p2_) && !(p2_ > 0.0)) out.emplace_back("sigma", "must be positive");
      truncation();
      if (out.empty() &&
          !(window_probability(LogNormal(std::log(p1_), p2_), lower_, upper_) > 1e-12))
        out.emplace_back("min", "the window [min, max] holds no probability of this lognormal");
      break;
    case DistributionKind::uniform:
      if (finite("min", p1_) && finite("max", p2_) && !(p1_ < p2_))
        out.emplace_back("min", "must be below max");
      break;
    case DistributionKind::triangular:
      if (finite("min", p1_) && finite("mode", p2_) && finite("max", p3_)) {
        if (!(p1_ < p3_))
          out.emplace_back("min", "must be below max");
        else if (!(p1_ <= p2_ && p2_ <= p3_))
          out.emplace_back("mode", "must lie in [min, max]");
      }
      break;
    case DistributionKind::choice: {
      if (values_.empty()) out.emplace_back("values", "must list at least one value");
      for (double v : values_)
        if (!std::isfinite(v)) out.emplace_back("values", "must all be finite numbers");
      if (!weights_.empty()) {
        if (weights_.size() != values_.size())
          out.emplace_back("weights", "must have as many entries as values (" +
                                          std::to_string(values_.size()) + ")");
        double total = 0.0;
        for (double w : weights_) {
          if (!(std::isfinite(w) && w >= 0.0))
            out.emplace_back("weights", "must be finite and non-negative");
          total += w;
        }
        if (!(total > 0.0)) out.emplace_back("weights", "must not all be zero");
      }
      break;
    }
  }
  return out;
}

double Uncertain::quantile(double p) const {
  p = std::clamp(p, 0.0, 1.0);
  switch (kind_) {
    case DistributionKind::fixed:
      return p1_;
    case DistributionKind::normal:
      return truncated_quantile(Normal(p1_, p2_), p, lower_, upper_);
    case DistributionKind::lognormal:
      return truncated_quantile(LogNormal(std::log(p1_), p2_), p, lower_, upper_);
    case DistributionKind::uniform:
      return p1_ + p * (p2_ - p1_);
    case DistributionKind::triangular:
      return boost::math::quantile(boost::math::triangular_distribution<double>(p1_, p2_, p3_), p);
    case DistributionKind::choice: {
      // The smallest value whose cumulative weight reaches p (the usual definition for a
      // discrete distribution).
      const auto at = std::lower_bound(cumulative_.begin(), cumulative_.end(), p * (1.0 - 1e-12));
      return sorted_values_[std::min<std::size_t>(
          static_cast<std::size_t>(at - cumulative_.begin()), sorted_values_.size() - 1)];
    }
  }
  return p1_;
}

namespace {
template <class Dist>
double truncated_cdf(const Dist& dist, double x, double lower, double upper) {
  if (x <= lower) return 0.0;
  if (x >= upper) return 1.0;
  const auto [f_low, f_high] = window(dist, lower, upper);
  const double fx = x <= boost::math::support(dist).first ? 0.0 : boost::math::cdf(dist, x);
  return std::clamp((fx - f_low) / (f_high - f_low), 0.0, 1.0);
}
}  // namespace

double Uncertain::probability_below(double x) const {
  switch (kind_) {
    case DistributionKind::fixed:
      return p1_ < x ? 1.0 : 0.0;
    case DistributionKind::normal:
      return truncated_cdf(Normal(p1_, p2_), x, lower_, upper_);
    case DistributionKind::lognormal:
      return truncated_cdf(LogNormal(std::log(p1_), p2_), x, lower_, upper_);
    case DistributionKind::uniform:
      return std::clamp((x - p1_) / (p2_ - p1_), 0.0, 1.0);
    case DistributionKind::triangular:
      if (x <= p1_) return 0.0;
      if (x >= p3_) return 1.0;
      return boost::math::cdf(boost::math::triangular_distribution<double>(p1_, p2_, p3_), x);
    case DistributionKind::choice: {
      double below = 0.0, total = 0.0;
      for (std::size_t i = 0; i < values_.size(); ++i) {
        const double w = weights_.empty() ? 1.0 : weights_[i];
        total += w;
        if (values_[i] < x) below += w;
      }
      return below / total;
    }
  }
  return 0.0;
}

double Uncertain::probability_above(double x) const {
  switch (kind_) {
    case DistributionKind::fixed:
      return p1_ > x ? 1.0 : 0.0;
    case DistributionKind::choice: {
      double above = 0.0, total = 0.0;
      for (std::size_t i = 0; i < values_.size(); ++i) {
        const double w = weights_.empty() ? 1.0 : weights_[i];
        total += w;
        if (values_[i] > x) above += w;
      }
      return above / total;
    }
    default:
      return 1.0 - probability_below(x);  // continuous: P(X = x) = 0
  }
}

double Uncertain::lowest() const {
  switch (kind_) {
    case DistributionKind::fixed:
      return p1_;
    case DistributionKind::normal:
      return lower_;
    case DistributionKind::lognormal:
      return std::max(lower_, 0.0);
    case DistributionKind::uniform:
    case DistributionKind::triangular:
      return p1_;
    case DistributionKind::choice:
      return *std::min_element(values_.begin(), values_.end());
  }
  return p1_;
}

double Uncertain::highest() const {
  switch (kind_) {
    case DistributionKind::fixed:
      return p1_;
    case DistributionKind::normal:
    case DistributionKind::lognormal:
      return upper_;
    case DistributionKind::uniform:
      return p2_;
    case DistributionKind::triangular:
      return p3_;
    case DistributionKind::choice:
      return *std::max_element(values_.begin(), values_.end());
  }
  return p1_;
}

}  // namespace strewn
