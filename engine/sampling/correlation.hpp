#pragma once
// Rank correlation between sampled inputs by a Gaussian copula: the uniforms of the correlated
// inputs are mapped to standard normal scores, mixed by the Cholesky factor L of their normal
// correlation matrix (Eigen), and mapped back. Each input keeps its own distribution; their rank
// (Spearman) correlation becomes the one requested. For normal scores the Spearman correlation
// rho_s and the Pearson correlation r are related by r = 2 sin(pi rho_s / 6) (Pearson 1907,
// Kruskal 1958), so the matrix is built from that r.
#include <Eigen/Cholesky>
#include <Eigen/Core>
#include <span>
#include <string>
#include <vector>

namespace strewn {

class RankCorrelation {
 public:
  struct Pair {
    std::size_t first, second;  ///< dimension indices
    double rho;                 ///< requested rank correlation, [-1, 1]
  };

  /// No correlation.
  RankCorrelation() = default;
  /// Throws NotPositiveDefinite (naming the offending pairs by index into `pairs`) when the
  /// requested correlations cannot hold together.
  RankCorrelation(std::size_t dimensions, const std::vector<Pair>& pairs);

  struct NotPositiveDefinite {
    std::vector<std::size_t> pairs;  ///< indices into the pairs given
  };

  [[nodiscard]] bool empty() const { return members_.empty(); }

  /// Applies the copula in place to the uniforms of one sample. `scratch` holds two vectors of
  /// the correlated inputs' count (see scratch_size()); nothing is allocated.
  void apply(std::span<double> uniforms, std::span<double> scratch) const;
  [[nodiscard]] std::size_t scratch_size() const { return 2 * members_.size(); }

 private:
  std::vector<std::size_t> members_;  // dimensions that take part
  Eigen::MatrixXd factor_;            // lower Cholesky factor over the members
};

}  // namespace strewn
