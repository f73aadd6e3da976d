// Reading terrain: a 3601 × 3601 tile of 1 arc-second posts (the size of the common 1° elevation
// tiles), written once through GDAL as an uncompressed Int16 GeoTIFF, read over the window a study
// reaches: 15 km and 30 km about the site, and 60 km (the whole tile). The target: well under a
// second (scripts/bench).
#include <benchmark/benchmark.h>
#include <gdal.h>
#include <ogr_srs_api.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

#include "terrain/elevation_raster.hpp"

namespace strewn {
namespace {

// The ridge supply drop's invented place (tests/places/invented-places.tsv), inside the tile.
constexpr double kLatitude = 41.30, kLongitude = -33.70;

class Tile {
 public:
  Tile() {
    std::string name = (std::filesystem::temp_directory_path() / "strewn-tile-XXXXXX").string();
    if (::mkdtemp(name.data()) == nullptr) std::abort();
    folder_ = name;
    path_ = (std::filesystem::path(folder_) / "tile.tif").string();
    GDALAllRegister();
    constexpr int kPosts = 3601;
    GDALDatasetH dataset = GDALCreate(GDALGetDriverByName("GTiff"), path_.c_str(), kPosts, kPosts,
                                      1, GDT_Int16, nullptr);
    const double post = 1.0 / 3600.0;
    double transform[6] = {-34.0 - post / 2, post, 0.0, 42.0 + post / 2, 0.0, -post};
    GDALSetGeoTransform(dataset, transform);
    OGRSpatialReferenceH wgs84 = OSRNewSpatialReference(nullptr);
    OSRSetWellKnownGeogCS(wgs84, "WGS84");
    GDALSetSpatialRef(dataset, wgs84);
    OSRDestroySpatialReference(wgs84);
    GDALRasterBandH band = GDALGetRasterBand(dataset, 1);
    GDALSetRasterNoDataValue(band, -32768);
    std::vector<short> row(kPosts);
    for (int j = 0; j < kPosts; ++j) {
      for (int i = 0; i < kPosts; ++i)
        row[static_cast<std::size_t>(i)] =
            static_cast<short>(600.0 + 300.0 * std::sin(i / 170.0) * std::cos(j / 230.0));
      if (GDALRasterIO(band, GF_Write, 0, j, kPosts, 1, row.data(), kPosts, 1, GDT_Int16, 0, 0) !=
          CE_None)
        std::abort();
    }
    GDALClose(dataset);
  }
  ~Tile() { std::filesystem::remove_all(folder_); }
  Tile(const Tile&) = delete;
  Tile& operator=(const Tile&) = delete;
  [[nodiscard]] const std::string& path() const { return path_; }

 private:
  std::string folder_, path_;
};

const Tile& tile() {
  static const Tile t;
  return t;
}

void BM_ReadTerrainTile_3601(benchmark::State& state) {
  const TerrainRequest request{tile().path(), kLatitude, kLongitude,
                               static_cast<double>(state.range(0))};
  std::size_t posts = 0;
  for (auto _ : state) {
    const TerrainSurface surface = read_terrain(request);
    posts = surface.posts().heights.size();
    benchmark::DoNotOptimize(posts);
  }
  state.counters["posts"] = static_cast<double>(posts);
}
BENCHMARK(BM_ReadTerrainTile_3601)
    ->Arg(15000)
    ->Arg(30000)
    ->Arg(60000)
    ->Unit(benchmark::kMillisecond);

}  // namespace
}  // namespace strewn

BENCHMARK_MAIN();
