#include "footprint/ranks.hpp"

#include <boost/sort/spreadsort/float_sort.hpp>
#include <cmath>
#include <limits>

namespace strewn {

namespace {
using Keyed = std::pair<double, std::uint32_t>;
struct KeyBits {  // float_sort's radix key: the double's bits, shifted as asked
  std::int64_t operator()(const Keyed& k, unsigned offset) const {
    return boost::sort::spreadsort::float_mem_cast<double, std::int64_t>(k.first) >> offset;
  }
};
struct KeyLess {
  bool operator()(const Keyed& a, const Keyed& b) const { return a.first < b.first; }
};
}  // namespace

void mid_ranks(std::span<const double> values, std::span<double> ranks, RankScratch& scratch) {
  auto& k = scratch.keyed;
  k.resize(values.size());
  for (std::size_t i = 0; i < values.size(); ++i)
    k[i] = {values[i] + 0.0, static_cast<std::uint32_t>(i)};  // + 0.0: -0 sorts as 0
  boost::sort::spreadsort::float_sort(k.begin(), k.end(), KeyBits{}, KeyLess{});
  for (std::size_t i = 0; i < k.size();) {
    std::size_t j = i + 1;
    while (j < k.size() && k[j].first == k[i].first) ++j;
    const double rank = 0.5 * static_cast<double>(i + 1 + j);  // mean of ranks i+1 .. j
    for (std::size_t t = i; t < j; ++t) ranks[k[t].second] = rank;
    i = j;
  }
}

double pearson(std::span<const double> x, std::span<const double> y) {
  const std::size_t n = x.size();
  if (n < 2 || y.size() != n) return std::numeric_limits<double>::quiet_NaN();
  double mx = 0.0, my = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    mx += x[i];
    my += y[i];
  }
  mx /= static_cast<double>(n);
  my /= static_cast<double>(n);
  double sxy = 0.0, sxx = 0.0, syy = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double dx = x[i] - mx, dy = y[i] - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  if (!(sxx > 0.0) || !(syy > 0.0)) return std::numeric_limits<double>::quiet_NaN();
  return sxy / std::sqrt(sxx * syy);
}

double spearman(std::span<const double> x, std::span<const double> y) {
  RankScratch scratch;
  std::vector<double> rx(x.size()), ry(y.size());
  mid_ranks(x, rx, scratch);
  mid_ranks(y, ry, scratch);
  return pearson(rx, ry);
}

}  // namespace strewn
