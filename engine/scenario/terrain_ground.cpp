#include "scenario/terrain_ground.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <memory>
#include <vector>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "flight/flight.hpp"
#include "scenario/world.hpp"
#include "terrain/elevation_raster.hpp"

namespace strewn {
namespace {

TerrainSurface read_over(const Scenario& s, double reach) {
  TerrainRequest request;
  request.path = s.site.terrain_path;
  request.latitude = s.site.latitude.value_or(0.0);
  request.longitude = s.site.longitude.value_or(0.0);
  request.reach = reach;
  return read_terrain(request);
}

FlightOptions options_of(const Scenario& s) {
  FlightOptions options;
  options.tolerance = s.study.tolerance;
  return options;
}

// The farthest nominal impact or release point from the site's origin (m), each body's nominal
// flight flown over a level ground at `level`.
double farthest_nominal(const Scenario& s, double level) {
  Scenario over_level = s;
  over_level.site.ground = LevelGround(level);
  const World world = build_world(over_level);
  double farthest = 0.0;
  for (std::size_t b = 0; b < s.bodies.size(); ++b) {
    const FlightInputs in = nominal_flight(over_level, b);
    const Environment environment{&world.medium, in.conditions, &world.wind, world.ground};
    const FlightResult r = fly(in.body, environment, in.release, options_of(s));
    farthest = std::max({farthest, in.release.position.head<2>().norm(),
                         std::isfinite(r.position.x()) ? r.position.head<2>().norm() : 0.0});
  }
  return farthest;
}

// The distance (m) from a point of the frame to the nearest node of the surface's lattice
// without a height (beyond the raster, or no data); infinity when every node has one. The
// lattice's own edge counts as such a node: nothing beyond it was read.
double distance_to_edge(const TerrainSurface& surface, double east, double north) {
  const FrameToPosts& f = surface.frame();
  double nearest = std::numeric_limits<double>::infinity();
  const double half = f.half_width;
  nearest = std::min({half - east, half + east, half - north, half + north});
  for (std::size_t j = 0; j < f.nodes; ++j)
    for (std::size_t i = 0; i < f.nodes; ++i) {
      const double x = -half + f.spacing * static_cast<double>(i);
      const double y = -half + f.spacing * static_cast<double>(j);
      if (std::isnan(surface.height(x, y)))
        nearest = std::min(nearest, std::hypot(x - east, y - north));
    }
  return std::max(nearest, 0.0);
}

// Where each body's nominal flight over the terrain comes near the edge of the terrain read: a
// warning when the distance to the edge is less than the nominal flight's drift from its release
// point (the spread of a study about the nominal impact is of that order), or when the nominal
// flight itself comes down beyond the terrain.
void warn_near_edges(Scenario& s, const TerrainSurface& surface) {
  const World world = build_world(s);
  for (std::size_t b = 0; b < s.bodies.size(); ++b) {
    const FlightInputs in = nominal_flight(s, b);
    const Environment environment{&world.medium, in.conditions, &world.wind, world.ground};
    const FlightResult r = fly(in.body, environment, in.release, options_of(s));
    const std::string who = "body \"" + s.bodies[b].name + "\": ";
    if (r.status == FlightStatus::off_terrain) {
      s.warnings.push_back(who + "its nominal flight comes down beyond the terrain read from " +
                           s.site.terrain + " (reach " +
                           format_number(std::get<TerrainGround>(s.site.ground).reach) +
                           " m); flights that do count as failed");
      continue;
    }
    if (r.status != FlightStatus::landed) continue;  // the study's warnings say why
    const double drift = (r.position - in.release.position).head<2>().norm();
    const double edge = distance_to_edge(surface, r.position.x(), r.position.y());
    if (edge < std::max(drift, 1000.0))
      s.warnings.push_back(
          who + "its nominal impact lies " + format_number(std::round(edge)) +
          " m from the edge of the terrain read from " + s.site.terrain + ", within " +
          (drift > 1000.0 ? "its drift of " + format_number(std::round(drift)) + " m"
                          : std::string("1000 m")) +
          ": flights that come down beyond the edge count as failed (status off_terrain); " +
          "widen the raster or site.terrain_reach");
  }
}

}  // namespace

void read_terrain_ground(Scenario& s, double reach) {
  if (!(reach > 0.0)) {
    // The raster's height under the origin, then the nominal flights over that level.
    const TerrainSurface near_origin = read_over(s, 0.0);
    double level = near_origin.height(0.0, 0.0);
    if (std::isnan(level)) level = near_origin.lowest();
    reach = std::max(kLeastTerrainReach, kTerrainReachFactor * farthest_nominal(s, level));
  }
  auto surface = std::make_shared<const TerrainSurface>(read_over(s, reach));
  if (std::isnan(surface->lowest()))
    throw InputFileError(s.site.terrain_path + ": holds no height within " + format_number(reach) +
                         " m of the site's origin (no data only)");
  const std::array<double, 2> values{std::numeric_limits<double>::quiet_NaN(), reach};
  s.site.ground = TerrainGround(values, surface);
  warn_near_edges(s, *surface);
}

}  // namespace strewn
