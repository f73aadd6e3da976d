#pragma once
// Terrain: the surface of an elevation raster, the [site] key `terrain` (the raster's path). The
// scenario module reads the raster (terrain/elevation_raster.hpp, GDAL) over the window the
// flights can reach; a flight sees the bilinear surface between its posts (terrain_surface.hpp).
// Where the surface has no height (outside the window read, or a post without data) a flight
// cannot land: it ends with the status `off_terrain` when it comes down there.
#include <array>
#include <cmath>
#include <limits>
#include <memory>
#include <span>
#include <utility>

#include "core/bounds.hpp"
#include "flight/grounds/key.hpp"
#include "flight/grounds/terrain_surface.hpp"

namespace strewn {

struct TerrainGround {
  static constexpr const char* name = "terrain";
  /// Its keys of [site]: `terrain`, the raster's path (required: it chooses this ground), and
  /// `terrain_reach`, how far from the site's origin (m, east and north) the raster is read (0 or
  /// absent: worked out from the nominal flights when the scenario is read).
  static constexpr std::array<GroundKey, 2> keys{
      {{"terrain", kAny, true, 0.0, true},
       {"terrain_reach",
        Bounds{0.0, 1.0e5, false, false, "a distance in [0, 100000] m (0: worked out)"}, false,
        0.0}}};
  static constexpr bool level = false;

  /// Shared: every flight's environment holds the one surface read.
  std::shared_ptr<const TerrainSurface> surface;
  double reach = 0.0;  ///< m from the origin, east and north, over which the raster was read

  TerrainGround() = default;
  /// From the values of its keys (none is a number) and the surface the scenario module read.
  TerrainGround(std::span<const double> values, std::shared_ptr<const TerrainSurface> read)
      : surface(std::move(read)),
        reach(values[1]),
        lowest_(surface ? surface->lowest() : kNaN),
        highest_(surface ? surface->highest() : kNaN) {}
  [[nodiscard]] std::array<double, 2> values() const { return {kNaN, reach}; }

  /// m above mean sea level; NaN where the surface has no height.
  [[nodiscard]] double height(double east, double north) const {
    return surface->height(east, north);
  }
  [[nodiscard]] std::array<double, 2> slope(double east, double north) const {
    return surface->slope(east, north);
  }
  /// The lowest and highest posts read: no flight can meet the surface above `highest`.
  [[nodiscard]] double lowest() const { return lowest_; }
  [[nodiscard]] double highest() const { return highest_; }

 private:
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  double lowest_ = kNaN, highest_ = kNaN;
};

}  // namespace strewn
