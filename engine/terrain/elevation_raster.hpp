#pragma once
// Terrain from an elevation raster: any raster GDAL opens (GeoTIFF and the common elevation
// formats), in any coordinate reference system GDAL knows, read into the surface a flight lands on
// (flight/grounds/terrain_surface.hpp). Only the window of posts the flights can reach is read.
#include <string>

#include "flight/grounds/terrain_surface.hpp"

namespace strewn {

/// What to read: the raster, the site's origin (the frame's east/north are metres from it, on
/// GeographicLib's LocalCartesian at that point), and how far from the origin flights can reach.
struct TerrainRequest {
  std::string path;
  double latitude = 0.0, longitude = 0.0;  ///< degrees, WGS 84
  double reach = 0.0;                      ///< m from the origin, east and north
};

/// Reads the raster's heights (band 1, in metres above mean sea level; its no-data value and NaN
/// read as no data; its scale and offset applied) over the window the flights can reach. Throws
/// InputFileError naming the file and the reason: missing or unreadable, not a raster, without
/// georeferencing or a coordinate reference system, heights in another unit than metres, or not
/// covering the site's origin.
[[nodiscard]] TerrainSurface read_terrain(const TerrainRequest& request);

}  // namespace strewn
