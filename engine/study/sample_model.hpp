#pragma once
// How one sample becomes flights: the sampled inputs' values and the sample's own random choices
// (canopy state, burst direction, wind perturbation) turned into each body's flight inputs.
// Immutable once built; per-thread state lives in a Workspace, so nothing is allocated per sample.
#include <Eigen/Core>
#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "sampling/input_sampler.hpp"
#include "scenario/wind_source.hpp"
#include "scenario/world.hpp"

namespace strewn {

class SampleModel {
 public:
  /// Throws ScenarioError for correlations that cannot hold together.
  /// The model refers to `scenario` and `world`, which must outlive it (temporaries are refused).
  SampleModel(const Scenario& scenario, const World& world, std::uint64_t samples);
  SampleModel(const Scenario&, World&&, std::uint64_t) = delete;
  SampleModel(Scenario&&, const World&, std::uint64_t) = delete;

  [[nodiscard]] const Scenario& scenario() const { return scenario_; }
  [[nodiscard]] const World& world() const { return world_; }
  [[nodiscard]] const InputSampler& sampler() const { return sampler_; }
  [[nodiscard]] std::size_t bodies() const { return scenario_.bodies.size(); }

  /// The sample's own random choices that flight() records (besides the canopy state, a column of
  /// its own), by name: "wind.member" (the ensemble member drawn, counted from 0),
  /// "wind.perturbation_east" and "wind.perturbation_north" (the layered perturbation's mean over
  /// the layers, m/s), "release.burst.east", "release.burst.north" and "release.burst.up" (the
  /// burst velocity, m/s). Only those the scenario makes random.
  [[nodiscard]] const std::vector<std::string>& choice_names() const { return choice_names_; }
  /// The names of a study's named columns: the sampled inputs, then the choices.
  [[nodiscard]] std::vector<std::string> column_names() const;

  class Workspace {
   public:
    explicit Workspace(const SampleModel& model);
    /// The sampled inputs' values of the sample last prepared, in the sampler's order.
    [[nodiscard]] std::span<const double> values() const { return values_; }
    /// The wind of the sample last prepared.
    [[nodiscard]] const WindProfile& wind() const { return *wind_; }

   private:
    friend class SampleModel;
    InputSampler::Workspace sampler_;
    std::vector<double> values_;
    WindScratch wind_scratch_;
    const WindProfile* wind_ = nullptr;
  };

  /// Draws sample i's inputs and wind into the workspace (call before flight()).
  void prepare(std::uint64_t sample, Workspace& workspace) const;
  /// The flight inputs of body b in the prepared sample, with its canopy state drawn; the
  /// sample's choices for this body go into `choices` (choice_names() order) when it is given.
  [[nodiscard]] FlightInputs flight(std::uint64_t sample, std::size_t body, const Workspace& w,
                                    std::span<double> choices = {}) const;

 private:
  const Scenario& scenario_;
  const World& world_;
  InputSampler sampler_;
  WindSources wind_source_;  // how a sample's wind is made (scenario/wind_source.hpp)
  std::vector<std::string> choice_names_;
};

}  // namespace strewn
