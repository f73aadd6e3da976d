#include "footprint/ranks.hpp"

#include <array>
#include <bit>
#include <cmath>
#include <limits>

namespace strewn {

namespace {
// Order-preserving image of a double: negative values have every bit flipped, others their sign
// bit set, so unsigned comparison of the images orders the doubles (NaN excluded).
std::uint64_t order_key(double v) {
  const auto bits = std::bit_cast<std::uint64_t>(v + 0.0);  // + 0.0: -0 becomes +0
  return (bits >> 63) != 0 ? ~bits : bits | (std::uint64_t{1} << 63);
}
double from_order_key(std::uint64_t key) {
  return std::bit_cast<double>((key >> 63) != 0 ? key & ~(std::uint64_t{1} << 63) : ~key);
}
}  // namespace

// LSD radix sort of 64-bit keys (and, when given, their rows along): 8 passes of 8 bits, a pass
// skipped when one digit holds every key.
void radix_sort(std::vector<std::uint64_t>& keys, std::vector<std::uint64_t>& keys_swap,
                std::vector<std::uint32_t>* rows, std::vector<std::uint32_t>* rows_swap) {
  const std::size_t n = keys.size();
  keys_swap.resize(n);
  if (rows) rows_swap->resize(n);
  std::array<std::array<std::uint32_t, 256>, 8> counts{};
  for (std::uint64_t key : keys)
    for (int pass = 0; pass < 8; ++pass) ++counts[pass][(key >> (8 * pass)) & 255];
  for (int pass = 0; pass < 8; ++pass) {
    std::array<std::uint32_t, 256> offset;
    std::uint32_t running = 0;
    bool one_digit = false;
    for (int digit = 0; digit < 256; ++digit) {
      one_digit = one_digit || counts[pass][digit] == n;
      offset[digit] = running;
      running += counts[pass][digit];
    }
    if (one_digit) continue;  // every key has the same digit here: the pass would change nothing
    const int shift = 8 * pass;
    if (rows) {
      for (std::size_t i = 0; i < n; ++i) {  // stable scatter by this digit
        const std::uint32_t at = offset[(keys[i] >> shift) & 255]++;
        keys_swap[at] = keys[i];
        (*rows_swap)[at] = (*rows)[i];
      }
      rows->swap(*rows_swap);
    } else {
      for (std::size_t i = 0; i < n; ++i) keys_swap[offset[(keys[i] >> shift) & 255]++] = keys[i];
    }
    keys.swap(keys_swap);
  }
}

void sort_doubles(std::vector<double>& values, RankScratch& scratch) {
  auto& keys = scratch.keys;
  keys.resize(values.size());
  for (std::size_t i = 0; i < values.size(); ++i) keys[i] = order_key(values[i]);
  radix_sort(keys, scratch.keys_swap, nullptr, nullptr);
  for (std::size_t i = 0; i < values.size(); ++i) values[i] = from_order_key(keys[i]);
}

void mid_ranks(std::span<const double> values, std::span<double> ranks, RankScratch& scratch) {
  sort_and_rank(values, nullptr, ranks, scratch);
}

void sort_and_rank(std::span<const double> values, std::vector<double>* sorted,
                   std::span<double> ranks, RankScratch& scratch) {
  const std::size_t n = values.size();
  auto& keys = scratch.keys;
  auto& rows = scratch.rows;
  keys.resize(n);
  rows.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    keys[i] = order_key(values[i]);
    rows[i] = static_cast<std::uint32_t>(i);
  }
  radix_sort(keys, scratch.keys_swap, &rows, &scratch.rows_swap);
  for (std::size_t i = 0; i < n;) {
    std::size_t j = i + 1;
    while (j < n && keys[j] == keys[i]) ++j;
    const double rank = 0.5 * static_cast<double>(i + 1 + j);  // mean of ranks i+1 .. j
    for (std::size_t t = i; t < j; ++t) ranks[rows[t]] = rank;
    i = j;
  }
  if (sorted) {
    sorted->resize(n);
    for (std::size_t i = 0; i < n; ++i) (*sorted)[i] = from_order_key(keys[i]);
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

void rank_correlations(std::span<const double> ranks,
                       std::span<const std::span<const double>> others, std::span<double> out) {
  const std::size_t n = ranks.size();
  const double mean = 0.5 * static_cast<double>(n + 1);
  constexpr std::size_t kMost = 8;
  for (std::size_t first = 0; first < others.size(); first += kMost) {
    const std::size_t count = std::min(kMost, others.size() - first);
    std::array<double, kMost> sxy{}, syy{};
    double sxx = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
      const double dx = ranks[i] - mean;
      sxx += dx * dx;
      for (std::size_t k = 0; k < count; ++k) {
        const double dy = others[first + k][i] - mean;
        sxy[k] += dx * dy;
        syy[k] += dy * dy;
      }
    }
    for (std::size_t k = 0; k < count; ++k)
      out[first + k] = n >= 2 && sxx > 0.0 && syy[k] > 0.0
                           ? sxy[k] / std::sqrt(sxx * syy[k])
                           : std::numeric_limits<double>::quiet_NaN();
  }
}

double spearman(std::span<const double> x, std::span<const double> y) {
  RankScratch scratch;
  std::vector<double> rx(x.size()), ry(y.size());
  mid_ranks(x, rx, scratch);
  mid_ranks(y, ry, scratch);
  return pearson(rx, ry);
}

}  // namespace strewn
