#include "footprint/mixture.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace strewn {

namespace {
constexpr double kInfinity = std::numeric_limits<double>::infinity();
}  // namespace

MixtureColumn::MixtureColumn(std::vector<std::vector<double>> landed,
                             const std::vector<std::uint64_t>& failed,
                             const std::vector<double>& weights) {
  double total = 0.0;
  for (std::size_t b = 0; b < landed.size(); ++b) {
    Component c;
    c.sorted = std::move(landed[b]);
    std::sort(c.sorted.begin(), c.sorted.end());
    c.failed = failed.at(b);
    c.rows = c.sorted.size() + c.failed;
    c.weight = weights.at(b);
    if (c.rows == 0 || !(c.weight > 0.0)) continue;
    total += c.weight;
    merged_.insert(merged_.end(), c.sorted.begin(), c.sorted.end());
    components_.push_back(std::move(c));
  }
  for (auto& c : components_) c.weight /= total;
  std::sort(merged_.begin(), merged_.end());
}

std::uint64_t MixtureColumn::below(const Component& c, double x, bool failures_low) {
  const auto landed = static_cast<std::uint64_t>(
      std::lower_bound(c.sorted.begin(), c.sorted.end(), x) - c.sorted.begin());
  return landed + (failures_low ? c.failed : 0);
}

std::uint64_t MixtureColumn::above(const Component& c, double x, bool failures_low) {
  const auto landed = static_cast<std::uint64_t>(
      c.sorted.end() - std::upper_bound(c.sorted.begin(), c.sorted.end(), x));
  return landed + (failures_low ? 0 : c.failed);
}

double MixtureColumn::each(double c) const {
  return 1.0 - (1.0 - c) / static_cast<double>(std::max<std::size_t>(1, components_.size()));
}

double MixtureColumn::quantile(double p, bool failures_low) const {
  if (components_.empty()) return std::numeric_limits<double>::quiet_NaN();
  // F(x) = sum_b w_b #(values_b <= x) / n_b grows with x; the smallest candidate reaching p.
  // quantile_rank's tolerance, ceil(p n - 1e-9): with one body, F >= p - 1e-9 / n is the same
  // rank; with several, the largest n gives the narrowest tolerance.
  std::uint64_t most_rows = 1;
  for (const auto& c : components_) most_rows = std::max(most_rows, c.rows);
  const double tolerance = 1e-9 / static_cast<double>(most_rows);
  auto reaches = [&](double x) {
    double f = 0.0;
    for (const auto& c : components_) {
      const std::uint64_t at_most = c.rows - above(c, x, failures_low);
      f += c.weight * static_cast<double>(at_most) / static_cast<double>(c.rows);
    }
    return f >= p - tolerance;
  };
  if (failures_low && reaches(-kInfinity)) return -kInfinity;
  const auto first =
      std::partition_point(merged_.begin(), merged_.end(), [&](double x) { return !reaches(x); });
  return first == merged_.end() ? kInfinity : *first;
}

double MixtureColumn::upper_bound(double p, double c, bool failures_low) const {
  const double ce = each(c);
  // The bounded share above x falls as x grows: the smallest candidate where it is <= 1 - p.
  auto bounded = [&](double x) {
    double share = 0.0;
    for (const auto& k : components_)
      share += k.weight * clopper_pearson_upper(above(k, x, failures_low), k.rows, ce);
    return share <= 1.0 - p;
  };
  if (components_.empty()) return kInfinity;
  if (failures_low && bounded(-kInfinity)) return -kInfinity;
  const auto first =
      std::partition_point(merged_.begin(), merged_.end(), [&](double x) { return !bounded(x); });
  return first == merged_.end() ? kInfinity : *first;
}

double MixtureColumn::lower_bound(double p, double c, bool failures_low) const {
  const double ce = each(c);
  // The bounded share below x grows with x: the largest candidate where it is still <= p.
  auto bounded = [&](double x) {
    double share = 0.0;
    for (const auto& k : components_)
      share += k.weight * clopper_pearson_upper(below(k, x, failures_low), k.rows, ce);
    return share <= p;
  };
  if (components_.empty()) return -kInfinity;
  const auto past = std::partition_point(merged_.begin(), merged_.end(), bounded);
  // Failures placed high are the largest values: the bound may reach them.
  if (past == merged_.end() && !failures_low && bounded(kInfinity))
    for (const auto& k : components_)
      if (k.failed > 0) return kInfinity;
  if (past == merged_.begin()) return -kInfinity;
  return *(past - 1);
}

bool MixtureColumn::enough_for_bound(double p, double c) const {
  const double ce = each(c);
  double share = 0.0;
  for (const auto& k : components_) share += k.weight * clopper_pearson_upper(0, k.rows, ce);
  return !components_.empty() && share <= 1.0 - p;
}

std::uint64_t MixtureColumn::samples_needed(double p, double c) const {
  // With no failure and every value below the largest, each body's bounded share above the
  // largest is 1 - (1 - ce)^(1/n), whatever its weight: the same n as one body at ce.
  return samples_for_bound(p, each(c));
}

Containment MixtureColumn::containment(double p, double c) const {
  Containment k;
  k.level = p;
  k.confidence = c;
  k.radius = quantile(p, false);
  const double upper = upper_bound(p, c, false);
  // An infinite bound with rows enough for it: failed flights reach it (as one sample's order
  // statistic at a failed row).
  if (std::isfinite(upper) || enough_for_bound(p, c))
    k.radius_upper = upper;
  else
    k.samples_needed = samples_needed(p, c);
  // The two-sided interval: each end at (1 + c) / 2, as containment.hpp's.
  const double end = 0.5 * (1.0 + c);
  k.interval_lower = lower_bound(p, end, false);
  k.interval_upper = upper_bound(p, end, false);
  return k;
}

MixtureColumn::Share MixtureColumn::share_above(double x, double c) const {
  Share s;
  const double ce = each(c);
  for (const auto& k : components_) {
    const std::uint64_t count = above(k, x, false);
    s.value += k.weight * static_cast<double>(count) / static_cast<double>(k.rows);
    s.lower += k.weight * clopper_pearson_lower(count, k.rows, ce);
    s.upper += k.weight * clopper_pearson_upper(count, k.rows, ce);
  }
  if (components_.empty()) s.value = s.lower = s.upper = std::nan("");
  return s;
}

double MixtureColumn::share_at_most(double x) const {
  double f = 0.0;
  for (const auto& k : components_)
    f += k.weight * static_cast<double>(k.rows - above(k, x, false)) / static_cast<double>(k.rows);
  return components_.empty() ? std::nan("") : f;
}

std::uint64_t MixtureColumn::samples_to_decide(double x, double accepted, double c) const {
  const Share now = share_above(x, c);
  if (components_.empty() || now.value == accepted) return 0;
  const double ce = each(c);
  std::vector<double> shares;
  for (const auto& k : components_)
    shares.push_back(static_cast<double>(above(k, x, false)) / static_cast<double>(k.rows));
  auto decides = [&](std::uint64_t n) {
    double bound = 0.0;
    for (std::size_t b = 0; b < components_.size(); ++b) {
      const auto count =
          static_cast<std::uint64_t>(std::llround(shares[b] * static_cast<double>(n)));
      bound += components_[b].weight * (now.value < accepted ? clopper_pearson_upper(count, n, ce)
                                                             : clopper_pearson_lower(count, n, ce));
    }
    return now.value < accepted ? bound <= accepted : bound > accepted;
  };
  std::uint64_t rows = 1;
  for (const auto& k : components_) rows = std::max(rows, k.rows);
  return smallest_count(rows, decides);
}

}  // namespace strewn
