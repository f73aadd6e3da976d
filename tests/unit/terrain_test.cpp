// Terrain from elevation rasters: heights where GDAL's own gdallocationinfo puts them, in a
// projected and in a geographic reference system; a plane read as the plane (closed form); no
// data and the raster's edge as no height; rasters that cannot serve refused with the reason.
// The rasters are made here through GDAL, at an invented place at sea (tests/places).
#include <gtest/gtest.h>

#include <cpl_conv.h>
#include <gdal.h>
#include <ogr_srs_api.h>

#include <GeographicLib/LocalCartesian.hpp>
#include <array>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <functional>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/errors.hpp"
#include "rasters.hpp"
#include "support.hpp"
#include "terrain/elevation_raster.hpp"

namespace strewn {
namespace {

using test::carried;
using test::RasterSpec;
using test::write_geotiff;

// The ridge supply drop's invented place (tests/places/invented-places.tsv).
constexpr double kLatitude = 41.30, kLongitude = -33.70;

// The value gdallocationinfo reports at a longitude and latitude (WGS 84).
double gdallocationinfo(const std::string& path, double longitude, double latitude) {
  char command[1024];
  std::snprintf(command, sizeof command, "gdallocationinfo -valonly -wgs84 '%s' %.10f %.10f",
                path.c_str(), longitude, latitude);
  FILE* pipe = ::popen(command, "r");
  if (pipe == nullptr) return std::nan("");
  double value = std::nan("");
  if (std::fscanf(pipe, "%lf", &value) != 1) value = std::nan("");
  ::pclose(pipe);
  return value;
}

// The WGS 84 longitude and latitude of the centre of pixel (i, j) of a raster.
std::array<double, 2> pixel_centre(const RasterSpec& spec, int i, int j) {
  const auto& t = spec.transform;
  return carried(spec.reference, "WGS84", t[0] + (i + 0.5) * t[1] + (j + 0.5) * t[2],
                 t[3] + (i + 0.5) * t[4] + (j + 0.5) * t[5]);
}

// A smooth invented ridge with valleys, m (for tests only).
double ridge(double u, double v) {
  return 600.0 + 250.0 * std::exp(-std::pow((u - 0.4 * v) / 900.0, 2)) +
         40.0 * std::sin(u / 700.0) * std::cos(v / 500.0);
}

// Heights at posts equal gdallocationinfo's at each post's centre (GDAL's own reading of the
// same file: the reference), in a projected system (UTM zone 26 north, EPSG:32626) and in a
// geographic one (EPSG:4326).
TEST(Terrain, HeightsAtPostsAreThoseGdalReports) {
  const test::ScratchFolder dir("terrain-posts");
  const GeographicLib::LocalCartesian site(kLatitude, kLongitude, 0.0);
  // The site's origin in UTM 26N, from GDAL itself.
  const auto [x0, y0] = carried("WGS84", "EPSG:32626", kLongitude, kLatitude);
  RasterSpec projected{120,
                       100,
                       {x0 - 1800.0, 30.0, 0.0, y0 + 1500.0, 0.0, -30.0},
                       "EPSG:32626",
                       [](int i, int j) { return ridge(30.0 * i, 30.0 * j); },
                       {},
                       ""};
  RasterSpec geographic{120,
                        100,
                        {kLongitude - 0.02, 0.0003, 0.0, kLatitude + 0.015, 0.0, -0.0003},
                        "EPSG:4326",
                        [](int i, int j) { return ridge(25.0 * i, 33.0 * j); },
                        {},
                        ""};
  for (const auto& [name, spec] :
       {std::pair{"utm.tif", projected}, std::pair{"geo.tif", geographic}}) {
    const std::string path = (dir / name).string();
    write_geotiff(path, spec);
    const TerrainSurface surface = read_terrain({path, kLatitude, kLongitude, 1200.0});
    int compared = 0;
    for (int k = 0; k < 12; ++k) {
      const int i = 35 + 5 * k, j = 25 + 4 * k;
      const auto [longitude, latitude] = pixel_centre(spec, i, j);
      double east = 0.0, north = 0.0, up = 0.0;
      site.Forward(latitude, longitude, 0.0, east, north, up);
      if (std::abs(east) > 1100.0 || std::abs(north) > 1100.0) continue;
      const double reference = gdallocationinfo(path, longitude, latitude);
      ASSERT_FALSE(std::isnan(reference)) << "gdallocationinfo gave no value";
      // 2 mm: the lattice's interpolation of the transformation (under 1 mm) times slopes
      // below 1 (terrain_surface.hpp).
      EXPECT_NEAR(surface.height(east, north), reference, 2e-3)
          << name << " post " << i << ", " << j;
      ++compared;
    }
    EXPECT_GE(compared, 8) << name;
  }
}

// A plane in a transverse Mercator system centred on the site (so that its x and y are east and
// north to a few parts in 10^8 near the origin): read back as the plane, height and slope (closed
// form; bilinear interpolation is exact on a plane).
TEST(Terrain, APlaneIsReadAsThePlane) {
  const test::ScratchFolder dir("terrain-plane");
  const std::string reference =
      "+proj=tmerc +lat_0=41.3 +lon_0=-33.7 +k=1 +x_0=0 +y_0=0 +ellps=WGS84";
  const double slope_east = 0.12, slope_north = -0.05;
  RasterSpec plane{200,
                   200,
                   {-2000.0, 20.0, 0.0, 2000.0, 0.0, -20.0},
                   reference,
                   [&](int i, int j) {
                     const double x = -2000.0 + 20.0 * (i + 0.5), y = 2000.0 - 20.0 * (j + 0.5);
                     return 500.0 + slope_east * x + slope_north * y;
                   },
                   {},
                   "m"};
  const std::string path = (dir / "plane.tif").string();
  write_geotiff(path, plane);
  const TerrainSurface surface = read_terrain({path, kLatitude, kLongitude, 1500.0});
  for (const auto& [east, north] : std::vector<std::array<double, 2>>{
           {0.0, 0.0}, {733.3, -512.9}, {-1203.4, 988.1}, {64.2, 1311.7}}) {
    // 5 mm: float32 heights (about 0.03 mm at 500 m) and the projection's departure from the
    // local frame, under a part in 10^6 at 1.5 km.
    EXPECT_NEAR(surface.height(east, north), 500.0 + slope_east * east + slope_north * north, 5e-3);
    const auto slope = surface.slope(east, north);
    EXPECT_NEAR(slope[0], slope_east, 1e-5);
    EXPECT_NEAR(slope[1], slope_north, 1e-5);
  }
}

// No data (the raster's no-data value) and points beyond the raster have no height.
TEST(Terrain, NoDataAndTheEdgeHaveNoHeight) {
  const test::ScratchFolder dir("terrain-gaps");
  const std::string reference =
      "+proj=tmerc +lat_0=41.3 +lon_0=-33.7 +k=1 +x_0=0 +y_0=0 +ellps=WGS84";
  RasterSpec spec{50,
                  50,
                  {-500.0, 20.0, 0.0, 500.0, 0.0, -20.0},
                  reference,
                  [](int i, int j) { return (i == 30 && j == 20) ? -9999.0 : 100.0; },
                  -9999.0,
                  ""};
  const std::string path = (dir / "gaps.tif").string();
  write_geotiff(path, spec);
  const TerrainSurface surface = read_terrain({path, kLatitude, kLongitude, 800.0});
  EXPECT_NEAR(surface.height(0.0, 0.0), 100.0, 1e-6);
  // Post (30, 20) is at x = 110, y = 90: every point among its neighbours has no height.
  EXPECT_TRUE(std::isnan(surface.height(110.0, 90.0)));
  EXPECT_TRUE(std::isnan(surface.height(120.0, 80.0)));
  EXPECT_NEAR(surface.height(160.0, 90.0), 100.0, 1e-6);
  // Beyond the raster (it reaches 500 m) but within the reach.
  EXPECT_TRUE(std::isnan(surface.height(700.0, 0.0)));
  EXPECT_TRUE(std::isnan(surface.height(0.0, -650.0)));
  EXPECT_NEAR(surface.lowest(), 100.0, 1e-6);
}

// Rasters that cannot serve are refused, naming the file and the reason.
TEST(Terrain, RastersThatCannotServeAreRefusedWithTheReason) {
  const test::ScratchFolder dir("terrain-refused");
  const std::string reference =
      "+proj=tmerc +lat_0=41.3 +lon_0=-33.7 +k=1 +x_0=0 +y_0=0 +ellps=WGS84";
  const auto refusal = [&](const std::string& path) {
    try {
      (void)read_terrain({path, kLatitude, kLongitude, 500.0});
    } catch (const InputFileError& e) {
      return std::string(e.what());
    }
    return std::string("accepted");
  };
  const auto flat = [](int, int) { return 10.0; };
  EXPECT_NE(refusal((dir / "missing.tif").string()).find("does not exist"), std::string::npos);
  std::ofstream(dir / "text.tif") << "not a raster\n";
  EXPECT_NE(refusal((dir / "text.tif").string()).find("cannot be read as an elevation raster"),
            std::string::npos);
  write_geotiff((dir / "no-crs.tif").string(),
                {20, 20, {-200.0, 20.0, 0.0, 200.0, 0.0, -20.0}, "", flat, {}, ""});
  EXPECT_NE(refusal((dir / "no-crs.tif").string()).find("has no coordinate reference system"),
            std::string::npos);
  write_geotiff((dir / "no-place.tif").string(), {20, 20, {}, reference, flat, {}, ""});
  EXPECT_NE(refusal((dir / "no-place.tif").string()).find("is not georeferenced"),
            std::string::npos);
  write_geotiff((dir / "feet.tif").string(),
                {20, 20, {-200.0, 20.0, 0.0, 200.0, 0.0, -20.0}, reference, flat, {}, "ft"});
  EXPECT_NE(refusal((dir / "feet.tif").string()).find("holds heights in \"ft\", not in metres"),
            std::string::npos);
  write_geotiff((dir / "elsewhere.tif").string(),
                {20, 20, {5000.0, 20.0, 0.0, 5400.0, 0.0, -20.0}, reference, flat, {}, ""});
  EXPECT_NE(refusal((dir / "elsewhere.tif").string()).find("does not cover the site's origin"),
            std::string::npos);
}

}  // namespace
}  // namespace strewn
