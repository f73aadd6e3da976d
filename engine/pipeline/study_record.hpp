#pragma once
// A finished study as its reports need it: provenance, the site and release for maps, and the
// footprint statistics. `run` builds it from the scenario and the rows; the results file stores it
// under /footprint (docs/results.md); `report` reads it back, so every report shows exactly the
// figures that `run` computed.
#include <cstdint>
#include <optional>
#include <string>
#include <tuple>
#include <utility>
#include <vector>

#include "footprint/footprint.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"
#include "study/study.hpp"

namespace strewn {

/// How many samples of a body left one of its models' ranges, or flew where the models'
/// assumptions stop being plausible (flight/model_range.hpp), with the most extreme value met.
struct RangeWarning {
  std::string group;  ///< the body
  std::string kind;   ///< a ModelRangeFlag's name, or "floats" (lighter than the medium)
  std::uint64_t count = 0, rows = 0;
  double extreme = 0.0;  ///< the most extreme value met, in the limit's unit (frame: the larger)
  double limit = 0.0;    ///< what it was held against (NaN when no single number)
  std::string text;      ///< the warning in words, with the counts
};

/// The ground under a study that is not level, as the map draws it: heights (m above mean sea
/// level; NaN where the terrain read has none) at the nodes of a square grid of the site's frame,
/// `nodes` a side and `spacing` m apart over east, north in [-half_width, half_width], row by row
/// from the south-west corner. Empty on a level ground.
struct Relief {
  std::string source;  ///< the raster, as the scenario names it
  std::size_t nodes = 0;
  double half_width = 0.0, spacing = 0.0;
  std::vector<float> heights;
  [[nodiscard]] bool empty() const { return heights.empty(); }
  /// The height at a point of the frame, bilinear between the nodes; NaN outside or without data.
  [[nodiscard]] double height(double east, double north) const;
};

/// The relief of a scenario's ground (empty for a level ground): its terrain sampled on at most
/// kReliefNodes a side over the window read.
inline constexpr std::size_t kReliefNodes = 601;
Relief relief_of(const Scenario& scenario);

struct StudyRecord {
  std::string title, sampling;
  std::string engine_version, created, scenario_sha256, scenario_text, file;
  std::uint64_t seed = 0, samples = 0, completed = 0, failed = 0;
  int threads = 1;
  int ranks = 1;                              ///< MPI ranks of the run
  std::optional<double> latitude, longitude;  ///< the site's WGS84 origin, degrees
  double ground = 0.0;  ///< m: the frame origin's height (SiteSpec::frame_height)
  PlanePoint release;   ///< nominal release point, m
  double release_altitude = 0.0, release_track = 0.0;  ///< m, degrees from north
  std::optional<double> target_width;
  std::uint64_t max_samples = 0;
  int rounds = 1;  ///< parts the study was run in (more than 1 when grown to target_width)
  std::vector<std::string> body_names;
  std::string case_label;  ///< read from a sweep's file: "case 3 of the sweep: key = value, ..."
  double tolerance = 0.0;  ///< study.tolerance, m
  Footprint footprint;
  std::vector<RangeWarning> range_warnings;  ///< per body, in the order of the flags
  Relief relief;                             ///< the ground under the map (terrain only)
};

/// What identifies a run and what it counted, each with its attribute name in results files: one
/// list for the results file's writer and reader and for a sweep's case groups.
constexpr auto run_identity() {
  return std::make_tuple(std::pair{"engine_version", &StudyRecord::engine_version},
                         std::pair{"created", &StudyRecord::created},
                         std::pair{"scenario_sha256", &StudyRecord::scenario_sha256});
}
constexpr auto run_counters() {
  return std::make_tuple(
      std::pair{"seed", &StudyRecord::seed}, std::pair{"samples", &StudyRecord::samples},
      std::pair{"completed", &StudyRecord::completed}, std::pair{"failed", &StudyRecord::failed},
      std::pair{"threads", &StudyRecord::threads}, std::pair{"rounds", &StudyRecord::rounds},
      std::pair{"ranks", &StudyRecord::ranks});
}

/// The footprint settings of a scenario: levels, confidence, centre (the nominal impacts flown
/// when the centre is "nominal"), downrange axis along the nominal release track, grid, rules.
FootprintSettings footprint_settings(const Scenario& scenario, const World& world,
                                     std::uint64_t releases);

/// A view of a study's rows for the footprint statistics.
ImpactTable impact_table(const StudyColumns& columns);

/// Every body's samples that left its models' ranges or their assumptions, counted from the
/// rows' flags (flight/model_range.hpp) and statuses; the frame's offsets are set beside the
/// body's widest containment radius of `footprint`.
std::vector<RangeWarning> range_warnings(const Scenario& scenario, const World& world,
                                         const StudyColumns& columns, const Footprint& footprint);

/// The record of a study: its scenario, counts, range warnings and footprint.
StudyRecord make_record(const Scenario& scenario, const World& world, const StudyResult& result,
                        Footprint footprint, std::uint64_t seed, int threads);

/// Every warning of a study, in words: a sampling plan the bounds do not assume, failed flights,
/// a target width not met, and each body's samples that left its models' ranges or their
/// assumptions. The terminal, the JSON and the HTML page carry the same list.
std::vector<std::string> record_warnings(const StudyRecord& record);

}  // namespace strewn
