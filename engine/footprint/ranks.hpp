#pragma once
// Rank statistics: mid-ranks (ties share the average of their ranks) and Spearman's (1904) rank
// correlation, the Pearson correlation of the mid-ranks. Sorting uses Boost.Sort's spreadsort
// (float_sort), a radix-hybrid sort several times faster than comparison sorting on doubles.
#include <cstdint>
#include <span>
#include <utility>
#include <vector>

namespace strewn {

/// Reusable buffers, so ranking a column allocates nothing once warm.
struct RankScratch {
  std::vector<std::pair<double, std::uint32_t>> keyed;
};

/// Mid-ranks (1-based) of `values` into `ranks` (same size). Values must not be NaN.
void mid_ranks(std::span<const double> values, std::span<double> ranks, RankScratch& scratch);

/// Pearson correlation of two equally long columns (here: of ranks); NaN when either is constant
/// or they hold fewer than 2 values.
double pearson(std::span<const double> x, std::span<const double> y);

/// Spearman's rank correlation of two columns (NaN when undefined).
double spearman(std::span<const double> x, std::span<const double> y);

}  // namespace strewn
