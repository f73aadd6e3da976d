#pragma once
// Gaussian perturbations of each layer's east and north components ([wind.uncertainty] model
// "layered"), sd `speed_sd`, correlated in altitude by exp(-|dz| / L) (L the
// `correlation_length`): drawn as sd C n, with C the Cholesky factor of that kernel (factored
// once) and n standard normals from the sample's own wind stream (Boost.Random). Records the
// perturbation's mean over the layers as two choices.
#include <Eigen/Cholesky>
#include <Eigen/Core>
#include <boost/random/normal_distribution.hpp>
#include <cmath>

#include "core/random_stream.hpp"
#include "scenario/wind_sources/source.hpp"

namespace strewn {

class LayeredWind {
 public:
  static constexpr const char* name = "layered";
  static constexpr std::array<const char*, 2> keys{"speed_sd", "correlation_length"};
  struct Settings {
    double speed_sd = 0.0;            ///< m/s, per horizontal component
    double correlation_length = 0.0;  ///< m

    static Settings read(WindSourceKeys& table) {
      Settings s;
      s.speed_sd = table.number("speed_sd", kNonNegative, true, 0.0);
      s.correlation_length = table.number("correlation_length", kPositive, true, 1.0);
      return s;
    }
    void echo(auto& table, auto&& /*as_read*/) const {
      table["speed_sd"] = speed_sd;
      table["correlation_length"] = correlation_length;
    }
    [[nodiscard]] std::span<const std::vector<WindLayer>> own_profiles() const { return {}; }
  };
  static constexpr std::array<const char*, 2> choices{"wind.perturbation_east",
                                                      "wind.perturbation_north"};
  struct Scratch {
    std::vector<double> add_east, add_north, normals;
    WindProfile wind;
    double mean_east = 0.0, mean_north = 0.0;
  };

  LayeredWind(const Settings& settings, const WindBase& base)
      : seed_(base.seed), speed_sd_(settings.speed_sd), base_(perturbable_profile(base)) {
    // Exponential correlation in altitude between the layers' perturbations, factored once.
    const auto& z = base_.layer_altitudes();
    const auto n = static_cast<Eigen::Index>(z.size());
    Eigen::MatrixXd kernel(n, n);
    for (Eigen::Index i = 0; i < n; ++i)
      for (Eigen::Index j = 0; j < n; ++j)
        kernel(i, j) =
            std::exp(-std::abs(z[static_cast<std::size_t>(i)] - z[static_cast<std::size_t>(j)]) /
                     settings.correlation_length);
    factor_ = Eigen::LLT<Eigen::MatrixXd>(kernel).matrixL();
  }
  [[nodiscard]] Scratch scratch() const {
    return {std::vector<double>(base_.layers()), std::vector<double>(base_.layers()),
            std::vector<double>(2 * base_.layers()), base_};
  }
  [[nodiscard]] const WindProfile& wind(std::uint64_t sample, const InputValues& /*values*/,
                                        Scratch& s) const {
    RandomStream stream(seed_, sample, purpose::wind);
    boost::random::normal_distribution<double> normal;
    for (double& v : s.normals) v = normal(stream);
    const auto n = static_cast<Eigen::Index>(s.add_east.size());
    Eigen::Map<const Eigen::VectorXd> ne(s.normals.data(), n), nn(s.normals.data() + n, n);
    Eigen::Map<Eigen::VectorXd> east(s.add_east.data(), n), north(s.add_north.data(), n);
    east.noalias() = factor_.triangularView<Eigen::Lower>() * ne;
    north.noalias() = factor_.triangularView<Eigen::Lower>() * nn;
    east *= speed_sd_;
    north *= speed_sd_;
    s.mean_east = east.mean();
    s.mean_north = north.mean();
    s.wind.assign_perturbed(base_, s.add_east, s.add_north);
    return s.wind;
  }
  void choices_of(const Scratch& s, std::span<double> out) const {
    out[0] = s.mean_east;
    out[1] = s.mean_north;
  }

 private:
  std::uint64_t seed_;
  double speed_sd_;
  WindProfile base_;
  Eigen::MatrixXd factor_;
};

}  // namespace strewn
