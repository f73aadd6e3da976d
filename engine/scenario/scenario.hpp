#pragma once
// The scenario: everything a study or a trace needs, parsed and validated once into an immutable
// model (see docs/scenario.md for every key, unit, default and range). Uncertain inputs are kept
// as `Uncertain` values; `sampled_inputs` names every one that is a distribution by its key path,
// and each such value carries its place in that list (Uncertain::sampled_index), the handle by
// which samples give it a value.
#include <array>
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/enum_names.hpp"
#include "core/uncertain.hpp"
#include "flight/body.hpp"
#include "flight/drag.hpp"
#include "medium/medium.hpp"
#include "medium/wind.hpp"
#include "scenario/wind_source.hpp"

namespace strewn {

struct SiteSpec {
  std::optional<double> latitude;   ///< WGS84 degrees of the local origin
  std::optional<double> longitude;  ///< WGS84 degrees
  /// The ground flights end on, of the kind its [site] keys choose (flight/ground.hpp).
  Grounds ground = LevelGround{};
  /// A terrain ground's raster: as the scenario gives it (`terrain`), and resolved.
  std::string terrain, terrain_path;
  /// The ground's lowest altitude, m above mean sea level (for a level ground its one altitude):
  /// what still takes the ground as one number (DEVELOPERS.md, "A ground").
  [[nodiscard]] double ground_level() const { return lowest_ground(ground); }
  /// The height (m above the WGS 84 ellipsoid) of the local frame's origin, where GeographicLib's
  /// LocalCartesian turns east/north into latitudes and longitudes: a level ground's altitude,
  /// and 0 on terrain (where the raster's posts were placed on the frame: terrain/).
  [[nodiscard]] double frame_height() const {
    return std::holds_alternative<LevelGround>(ground) ? ground_level() : 0.0;
  }
};

struct MediumSpec {
  Medium::Kind model = Medium::Kind::us1976;
  Uncertain temperature_offset = 0.0;  ///< K (gases)
  Uncertain density_factor = 1.0;
  std::string profile_file;            ///< "profile": the sounding, as written in the scenario
  std::vector<SoundingLevel> profile;  ///< "profile": its levels
  double density = 0.0;                ///< "uniform", kg/m^3
  double viscosity = 0.0;              ///< "uniform", Pa s
  double sound_speed = std::numeric_limits<double>::infinity();  ///< "uniform", m/s
};

struct WindSpec {
  std::vector<WindLayer> layers;
  std::string file;  ///< when the layers came from a CSV file
  /// The [wind.uncertainty] model, its source's settings (scenario/wind_source.hpp).
  WindSettings uncertainty;
};

struct ReleaseSpec {
  /// m above mean sea level (`altitude`), or, when `above_ground`, m above the ground under the
  /// release point (`height_above_ground`).
  Uncertain altitude = 0.0;
  bool above_ground = false;
  Uncertain east = 0.0, north = 0.0;
  Uncertain speed = 0.0;                           ///< carrier ground speed, m/s
  Uncertain track = 0.0;                           ///< degrees clockwise from north
  Uncertain climb = 0.0;                           ///< m/s, up positive
  Uncertain along_error = 0.0, cross_error = 0.0;  ///< m
  Uncertain delay = 0.0;                           ///< s
  bool has_burst = false;
  Uncertain burst_speed = 0.0;  ///< m/s, isotropic direction
};

struct ParachuteSpec {
  Canopy::Trigger trigger = Canopy::Trigger::time;
  Uncertain deploy_after = 0.0;   ///< s
  Uncertain deploy_height = 0.0;  ///< m above ground
  Uncertain fill_time = 0.0;      ///< s
  Uncertain drag_area = 0.0;      ///< m^2
  double partial_probability = 0.0;
  Uncertain partial_drag_area = 0.0;  ///< m^2
  double failure_probability = 0.0;
};

struct BodySpec {
  std::string name;
  long count = 1;
  Uncertain mass = 1.0;                              ///< kg
  DragModel drag_model = drag_model_of<AreaDrag>();  ///< the law of [body.drag]
  /// The law's inputs, in the order of its `inputs` (the rest unused).
  std::array<Uncertain, kMaxDragInputs> drag_inputs{};
  std::shared_ptr<const MachTable> mach_table;  ///< null: none (shared, immutable)
  std::optional<ParachuteSpec> parachute;
};

struct CorrelationSpec {
  std::string first, second;
  double rho = 0.0;
  std::string key_path;  ///< e.g. "correlation[2].between", for messages
  long line = 0;         ///< where it stands in the scenario file, for messages
};

enum class SamplingPlan { random, latin, sobol };
template <>
struct EnumNames<SamplingPlan> {
  static constexpr std::array names{std::pair{SamplingPlan::random, "random"},
                                    std::pair{SamplingPlan::latin, "latin"},
                                    std::pair{SamplingPlan::sobol, "sobol"}};
};
inline const char* to_string(SamplingPlan plan) {
  return name_of(plan);
}

struct StudySpec {
  long samples = 10000;
  std::uint64_t seed = 1;
  SamplingPlan sampling = SamplingPlan::random;
  std::vector<double> levels{0.5, 0.9, 0.99, 0.999};
  double confidence = 0.95;
  std::string centre = "mean";  ///< "mean" | "nominal" | "point"
  double centre_east = 0.0, centre_north = 0.0;
  double tolerance = 0.05;         ///< m
  double energy_threshold = 15.0;  ///< J
  double grid = 10.0;              ///< m
  std::optional<double> target_width;
  long max_samples = 2000000;
  long samples_line = 0, max_samples_line = 0;  ///< where they stand in the scenario, for messages
  double max_failed = 0.001;
};

struct RulesSpec {
  std::optional<double> zone_radius;   ///< m
  std::optional<double> max_outside;   ///< probability
  std::optional<double> energy_limit;  ///< J
  std::optional<double> max_exceed;    ///< probability
};

struct OutputSpec {
  std::string file;
  bool samples = true;
  bool compress = false;  ///< deflate the per-sample columns (smaller files, slower writes)
  long file_line = 0;     ///< where `file` stands in the scenario, for messages
};

/// A sampled input: its key path (e.g. "bundle.mass") and distribution.
struct SampledInput {
  std::string name;
  Uncertain distribution;
};

struct Scenario {
  std::string path;  ///< the file as given
  std::string text;  ///< exactly as read
  std::string title;
  SiteSpec site;
  MediumSpec medium;
  WindSpec wind;
  ReleaseSpec release;
  std::vector<BodySpec> bodies;
  std::vector<CorrelationSpec> correlations;
  StudySpec study;
  RulesSpec rules;
  OutputSpec output;
  std::vector<SampledInput> sampled_inputs;
  /// Every file the scenario reads, resolved: itself, then its tables (sounding, wind files), so
  /// that no output may be written over one of them.
  std::vector<std::string> files_read;
  /// What `check` says of the scenario without refusing it (a terrain raster that the nominal
  /// footprint reaches the edge of).
  std::vector<std::string> warnings;

  /// Index of the body with this name, or -1.
  [[nodiscard]] int body_index(const std::string& name) const;
};

/// Reads and validates a scenario file. Throws ScenarioError with every problem found (file, key
/// path, line, what was expected), IoError when the file cannot be read.
Scenario load_scenario(const std::string& path);
/// The same from text already in memory; `path` names it in messages and anchors relative files.
Scenario parse_scenario(const std::string& text, const std::string& path);

}  // namespace strewn
