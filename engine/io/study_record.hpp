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

struct StudyRecord {
  std::string title, sampling;
  std::string engine_version, created, scenario_sha256, scenario_text, file;
  std::uint64_t seed = 0, samples = 0, completed = 0, failed = 0;
  int threads = 1;
  int ranks = 1;                                       ///< MPI ranks of the run
  std::optional<double> latitude, longitude;           ///< the site's WGS84 origin, degrees
  double ground = 0.0;                                 ///< m above mean sea level
  PlanePoint release;                                  ///< nominal release point, m
  double release_altitude = 0.0, release_track = 0.0;  ///< m, degrees from north
  std::optional<double> target_width;
  std::uint64_t max_samples = 0;
  int rounds = 1;  ///< parts the study was run in (more than 1 when grown to target_width)
  std::vector<std::string> body_names;
  Footprint footprint;
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

/// The record of a study: its scenario, counts and footprint.
StudyRecord make_record(const Scenario& scenario, const StudyResult& result, Footprint footprint,
                        std::uint64_t seed, int threads);

}  // namespace strewn
