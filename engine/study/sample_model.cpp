#include "sample_model.hpp"

#include <Eigen/Cholesky>
#include <boost/random/normal_distribution.hpp>
#include <cmath>

#include "core/constants.hpp"
#include "sampling/random_stream.hpp"

namespace strewn {

namespace {
// Separate streams per body for the sample's own random choices.
std::uint32_t body_purpose(std::uint32_t base, std::size_t body) {
  return base + static_cast<std::uint32_t>(body) * 16u;
}
}  // namespace

SampleModel::SampleModel(const Scenario& s, const World& world, std::uint64_t samples)
    : scenario_(s), world_(world), sampler_(s, samples) {
  // Perturbations need layers to act on: calm air becomes one calm layer at the ground.
  base_wind_ = world.wind;
  if (base_wind_.calm() && (s.wind.uncertainty == WindUncertaintyModel::bias ||
                            s.wind.uncertainty == WindUncertaintyModel::layered))
    base_wind_ = WindProfile({{s.site.ground, 0.0, 0.0}}, s.site.ground);
  if (s.wind.uncertainty == WindUncertaintyModel::layered) {
    // Exponential correlation in altitude between the layers' perturbations, factored once.
    const auto& z = base_wind_.layer_altitudes();
    const auto n = static_cast<Eigen::Index>(z.size());
    Eigen::MatrixXd kernel(n, n);
    for (Eigen::Index i = 0; i < n; ++i)
      for (Eigen::Index j = 0; j < n; ++j)
        kernel(i, j) =
            std::exp(-std::abs(z[static_cast<std::size_t>(i)] - z[static_cast<std::size_t>(j)]) /
                     s.wind.correlation_length);
    layer_factor_ = Eigen::LLT<Eigen::MatrixXd>(kernel).matrixL();
  }
  for (const auto& layers : s.wind.member_layers) members_.emplace_back(layers, s.site.ground);
  if (s.wind.uncertainty == WindUncertaintyModel::ensemble) choice_names_.push_back("wind.member");
  if (s.wind.uncertainty == WindUncertaintyModel::layered) {
    choice_names_.push_back("wind.perturbation_east");
    choice_names_.push_back("wind.perturbation_north");
  }
  if (s.release.has_burst)
    for (const char* axis : {"east", "north", "up"})
      choice_names_.push_back(std::string("release.burst.") + axis);
}

std::vector<std::string> SampleModel::column_names() const {
  std::vector<std::string> names;
  for (const auto& input : sampler_.inputs()) names.push_back(input.name);
  names.insert(names.end(), choice_names_.begin(), choice_names_.end());
  return names;
}

SampleModel::Workspace::Workspace(const SampleModel& model)
    : sampler_(model.sampler_),
      values_(model.sampler_.dimensions()),
      add_east_(model.base_wind_.layers()),
      add_north_(model.base_wind_.layers()),
      normals_(2 * model.base_wind_.layers()),
      perturbed_(model.base_wind_) {}

void SampleModel::prepare(std::uint64_t sample, Workspace& w) const {
  sampler_.draw(sample, w.values_, w.sampler_);
  switch (scenario_.wind.uncertainty) {
    case WindUncertaintyModel::none:
      w.wind_ = &world_.wind;
      return;
    case WindUncertaintyModel::bias: {
      const InputValues value = InputValues::of_sample(w.values_);
      const double de = value(scenario_.wind.bias_east), dn = value(scenario_.wind.bias_north);
      std::fill(w.add_east_.begin(), w.add_east_.end(), de);
      std::fill(w.add_north_.begin(), w.add_north_.end(), dn);
      break;
    }
    case WindUncertaintyModel::layered: {
      // Gaussian perturbations correlated in altitude: sd L n, n standard normals drawn by
      // Boost.Random from the sample's own wind stream.
      RandomStream stream(scenario_.study.seed, sample, purpose::wind);
      boost::random::normal_distribution<double> normal;
      for (double& v : w.normals_) v = normal(stream);
      const auto n = static_cast<Eigen::Index>(w.add_east_.size());
      Eigen::Map<const Eigen::VectorXd> ne(w.normals_.data(), n), nn(w.normals_.data() + n, n);
      Eigen::Map<Eigen::VectorXd> east(w.add_east_.data(), n), north(w.add_north_.data(), n);
      east.noalias() = layer_factor_.triangularView<Eigen::Lower>() * ne;
      north.noalias() = layer_factor_.triangularView<Eigen::Lower>() * nn;
      east *= scenario_.wind.speed_sd;
      north *= scenario_.wind.speed_sd;
      w.perturbation_east_ = east.mean();
      w.perturbation_north_ = north.mean();
      break;
    }
    case WindUncertaintyModel::ensemble: {
      RandomStream stream(scenario_.study.seed, sample, purpose::wind);
      const auto k = std::min(
          static_cast<std::size_t>(stream.uniform() * static_cast<double>(members_.size())),
          members_.size() - 1);
      w.wind_ = &members_[k];
      w.member_ = static_cast<double>(k);
      return;
    }
  }
  w.perturbed_.assign_perturbed(base_wind_, w.add_east_, w.add_north_);
  w.wind_ = &w.perturbed_;
}

FlightInputs SampleModel::flight(std::uint64_t sample, std::size_t b, const Workspace& w,
                                 std::span<double> choices) const {
  const InputValues value = InputValues::of_sample(w.values_);
  const BodySpec& spec = scenario_.bodies[b];
  // Failure, partial opening or full opening, from the sample's own canopy stream.
  CanopyState canopy = CanopyState::full;
  if (spec.parachute) {
    const auto& q = *spec.parachute;
    const double u =
        RandomStream(scenario_.study.seed, sample, body_purpose(purpose::canopy, b)).uniform();
    if (u < q.failure_probability)
      canopy = CanopyState::failed;
    else if (u < q.failure_probability + q.partial_probability)
      canopy = CanopyState::partial;
  }
  FlightInputs in = build_flight(scenario_, b, value, canopy);
  if (scenario_.release.has_burst) {
    // An isotropic direction: uniform height on [-1, 1] and uniform azimuth give uniform points
    // on the sphere (Archimedes' hat-box theorem, common practice).
    RandomStream stream(scenario_.study.seed, sample, body_purpose(purpose::burst, b));
    const double z = 2.0 * stream.uniform() - 1.0;
    const double phi = 2.0 * constants::pi * stream.uniform();
    const double r = std::sqrt(std::max(0.0, 1.0 - z * z));
    const Vec3 burst =
        value(scenario_.release.burst_speed) * Vec3(r * std::cos(phi), r * std::sin(phi), z);
    in.release.velocity += burst;
    if (!choices.empty()) std::copy(burst.data(), burst.data() + 3, choices.end() - 3);
  }
  // The wind's choices come first, in the order of choice_names().
  if (!choices.empty()) {
    if (scenario_.wind.uncertainty == WindUncertaintyModel::ensemble) choices[0] = w.member_;
    if (scenario_.wind.uncertainty == WindUncertaintyModel::layered) {
      choices[0] = w.perturbation_east_;
      choices[1] = w.perturbation_north_;
    }
  }
  return in;
}

}  // namespace strewn
