#include "sampling/correlation.hpp"

#include <algorithm>
#include <boost/math/distributions/normal.hpp>
#include <cmath>

#include "core/constants.hpp"

namespace strewn {

RankCorrelation::RankCorrelation(std::size_t dimensions, const std::vector<Pair>& pairs) {
  for (const auto& p : pairs)
    for (std::size_t d : {p.first, p.second})
      if (d < dimensions && std::find(members_.begin(), members_.end(), d) == members_.end())
        members_.push_back(d);
  std::sort(members_.begin(), members_.end());
  const auto index = [&](std::size_t d) {
    return static_cast<Eigen::Index>(std::lower_bound(members_.begin(), members_.end(), d) -
                                     members_.begin());
  };
  const auto m = static_cast<Eigen::Index>(members_.size());
  Eigen::MatrixXd matrix = Eigen::MatrixXd::Identity(m, m);
  for (const auto& p : pairs) {
    const double r = 2.0 * std::sin(constants::pi * p.rho / 6.0);
    matrix(index(p.first), index(p.second)) = r;
    matrix(index(p.second), index(p.first)) = r;
  }
  // The first leading block that is not positive definite names the culprits: the pairs that
  // join its last input to the inputs before it.
  for (Eigen::Index k = 1; k <= m; ++k) {
    Eigen::LLT<Eigen::MatrixXd> block(matrix.topLeftCorner(k, k));
    if (block.info() == Eigen::Success &&
        block.matrixL().toDenseMatrix().diagonal().minCoeff() > 1e-9)
      continue;
    NotPositiveDefinite error;
    for (std::size_t i = 0; i < pairs.size(); ++i) {
      const auto a = index(pairs[i].first), b = index(pairs[i].second);
      if (std::max(a, b) == k - 1) error.pairs.push_back(i);
    }
    throw error;
  }
  factor_ = Eigen::LLT<Eigen::MatrixXd>(matrix).matrixL();
}

void RankCorrelation::apply(std::span<double> uniforms, std::span<double> scratch) const {
  if (members_.empty()) return;
  const boost::math::normal_distribution<double> normal;
  const auto m = members_.size();
  Eigen::Map<Eigen::VectorXd> scores(scratch.data(), static_cast<Eigen::Index>(m));
  Eigen::Map<Eigen::VectorXd> mixed(scratch.data() + m, static_cast<Eigen::Index>(m));
  for (std::size_t j = 0; j < m; ++j)
    scores[static_cast<Eigen::Index>(j)] = boost::math::quantile(normal, uniforms[members_[j]]);
  mixed.noalias() = factor_.triangularView<Eigen::Lower>() * scores;
  for (std::size_t j = 0; j < m; ++j) {
    const double u = boost::math::cdf(normal, mixed[static_cast<Eigen::Index>(j)]);
    uniforms[members_[j]] = std::clamp(u, 0x1p-60, 1.0 - 0x1p-53);  // stays in the open interval
  }
}

}  // namespace strewn
