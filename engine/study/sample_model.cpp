#include "sample_model.hpp"

#include <cmath>

#include "core/constants.hpp"
#include "core/random_stream.hpp"

namespace strewn {

namespace {
// Separate streams per body for the sample's own random choices.
std::uint32_t body_purpose(std::uint32_t base, std::size_t body) {
  return base + static_cast<std::uint32_t>(body) * 16u;
}
}  // namespace

SampleModel::SampleModel(const Scenario& s, const World& world, std::uint64_t samples)
    : scenario_(s),
      world_(world),
      sampler_(s, samples),
      wind_source_(make_wind_source(s.wind.uncertainty,
                                    {&world.wind, s.site.ground_level(), s.study.seed})) {
  // The wind's choices first, then the burst's.
  std::visit(
      [&](const auto& source) {
        for (const char* name : source.choices) choice_names_.emplace_back(name);
      },
      wind_source_);
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
      wind_scratch_(std::visit([](const auto& source) { return WindScratch(source.scratch()); },
                               model.wind_source_)) {}

void SampleModel::prepare(std::uint64_t sample, Workspace& w) const {
  sampler_.draw(sample, w.values_, w.sampler_);
  const InputValues values = InputValues::of_sample(w.values_);
  w.wind_ = std::visit(
      [&](const auto& source) {
        using Source = std::decay_t<decltype(source)>;
        return &source.wind(sample, values, std::get<typename Source::Scratch>(w.wind_scratch_));
      },
      wind_source_);
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
  if (!choices.empty())
    std::visit(
        [&](const auto& source) {
          using Source = std::decay_t<decltype(source)>;
          source.choices_of(std::get<typename Source::Scratch>(w.wind_scratch_), choices);
        },
        wind_source_);
  return in;
}

}  // namespace strewn
