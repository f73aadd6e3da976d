#pragma once
// A scenario's terrain ground ([site] terrain = "FILE"): the raster read (terrain/, GDAL) over the
// window its flights can reach, and what `check` says of it.
#include <string>

#include "scenario/scenario.hpp"

namespace strewn {

/// The least reach worked out (m): a small scenario still reads a few kilometres of terrain.
inline constexpr double kLeastTerrainReach = 5000.0;
/// The reach worked out is this many times the farthest nominal impact or release point from the
/// site's origin (common practice: a margin for the spread about the nominal impacts).
inline constexpr double kTerrainReachFactor = 3.0;

/// Reads the raster `scenario.site.terrain_path` into the scenario's ground. `reach` (m) is the
/// window read around the site's origin; 0 works it out from the nominal flights, flown over a
/// level ground at the raster's height under the origin. Then flies each body's nominal flight
/// over the terrain and adds to `scenario.warnings` where the nominal footprint comes near the
/// edge of the terrain read. Throws InputFileError for a raster that cannot serve.
void read_terrain_ground(Scenario& scenario, double reach);

}  // namespace strewn
