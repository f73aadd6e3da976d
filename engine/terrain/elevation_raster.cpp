#include "terrain/elevation_raster.hpp"

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <ogr_srs_api.h>
#include <sys/stat.h>

#include <GeographicLib/LocalCartesian.hpp>
#include <algorithm>
#include <cctype>
#include <cmath>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

#include "core/errors.hpp"

namespace strewn {
namespace {

// The lattice of FrameToPosts: 100 m between nodes (the interpolation of the transformation
// between them errs by well under a millimetre, terrain_surface.hpp).
constexpr double kLatticeSpacing = 100.0;
// The most posts a window may hold (4 bytes each): 400 MB.
constexpr double kMostPosts = 1e8;

struct DatasetClose {
  void operator()(void* dataset) const { GDALClose(dataset); }
};
struct ReferenceRelease {
  void operator()(void* reference) const { OSRDestroySpatialReference(reference); }
};
struct TransformationRelease {
  void operator()(void* transformation) const {
    OCTDestroyCoordinateTransformation(transformation);
  }
};

// GDAL's messages come back as refusals, never printed: quiet while a raster is read.
class QuietGdal {
 public:
  QuietGdal() {
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
  }
  ~QuietGdal() { CPLPopErrorHandler(); }
  QuietGdal(const QuietGdal&) = delete;
  QuietGdal& operator=(const QuietGdal&) = delete;
};

// GDAL's own reason is kept for the curious, cut to its first line and 200 characters: some
// drivers return a whole reference-system definition.
[[noreturn]] void refuse(const std::string& path, const std::string& reason) {
  std::string gdal = CPLGetLastErrorMsg();
  gdal = gdal.substr(0, gdal.find_first_of("\r\n"));
  if (gdal.size() > 200) gdal = gdal.substr(0, 197) + "...";
  throw InputFileError(path + ": " + reason + (gdal.empty() ? "" : " (GDAL: " + gdal + ")"));
}

bool in_metres(std::string unit) {
  for (char& c : unit) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return unit.empty() || unit == "m" || unit == "metre" || unit == "meter" || unit == "metres" ||
         unit == "meters";
}

// The lattice over the reach: each node's place in the raster, as post coordinates of the whole
// raster (the centre of pixel (i, j) is post (i, j); GDAL's geotransform maps pixel corners).
// A geographic raster may count longitudes -180 .. 180 or 0 .. 360 east (as some global models
// write them): each node's longitude is taken in the turn nearest the raster's middle column.
FrameToPosts lattice_in_raster(const TerrainRequest& r, OGRCoordinateTransformationH to_raster,
                               const double (&inverse)[6], std::optional<double> middle_longitude) {
  FrameToPosts frame;
  frame.spacing = kLatticeSpacing;
  const auto half_cells = static_cast<std::size_t>(std::ceil(r.reach / kLatticeSpacing));
  frame.nodes = 2 * std::max<std::size_t>(half_cells, 1) + 1;
  frame.half_width = kLatticeSpacing * static_cast<double>(frame.nodes - 1) / 2.0;
  const std::size_t count = frame.nodes * frame.nodes;
  std::vector<double> x(count), y(count);
  const GeographicLib::LocalCartesian site(r.latitude, r.longitude, 0.0);
  for (std::size_t j = 0; j < frame.nodes; ++j)
    for (std::size_t i = 0; i < frame.nodes; ++i) {
      const double east = -frame.half_width + kLatticeSpacing * static_cast<double>(i);
      const double north = -frame.half_width + kLatticeSpacing * static_cast<double>(j);
      double latitude = 0.0, longitude = 0.0, height = 0.0;
      site.Reverse(east, north, 0.0, latitude, longitude, height);
      x[j * frame.nodes + i] = longitude;  // traditional GIS order: longitude, latitude
      y[j * frame.nodes + i] = latitude;
    }
  std::vector<int> ok(count, 0);
  OCTTransformEx(to_raster, static_cast<int>(count), x.data(), y.data(), nullptr, ok.data());
  if (middle_longitude)
    for (double& longitude : x)
      longitude += 360.0 * std::round((*middle_longitude - longitude) / 360.0);
  frame.column.resize(count);
  frame.row.resize(count);
  for (std::size_t k = 0; k < count; ++k) {
    const double nan = std::nan("");
    frame.column[k] = ok[k] ? inverse[0] + inverse[1] * x[k] + inverse[2] * y[k] - 0.5 : nan;
    frame.row[k] = ok[k] ? inverse[3] + inverse[4] * x[k] + inverse[5] * y[k] - 0.5 : nan;
  }
  return frame;
}

// The heights of band 1 over the window of posts the lattice's nodes fall among, one post more
// on each side, within the raster; the lattice moved to the window's post coordinates.
PostHeights read_window(const std::string& path, GDALDatasetH dataset, GDALRasterBandH band,
                        FrameToPosts& frame, double origin_column, double origin_row) {
  int has_scale = 0, has_offset = 0, has_no_data = 0;
  double scale = GDALGetRasterScale(band, &has_scale);
  double offset = GDALGetRasterOffset(band, &has_offset);
  if (!has_scale) scale = 1.0;
  if (!has_offset) offset = 0.0;
  const double no_data = GDALGetRasterNoDataValue(band, &has_no_data);
  const double columns = GDALGetRasterXSize(dataset), rows = GDALGetRasterYSize(dataset);
  double low_column = origin_column, high_column = origin_column, low_row = origin_row,
         high_row = origin_row;
  for (std::size_t k = 0; k < frame.column.size(); ++k) {
    if (std::isnan(frame.column[k]) || std::isnan(frame.row[k])) continue;
    low_column = std::min(low_column, frame.column[k]);
    high_column = std::max(high_column, frame.column[k]);
    low_row = std::min(low_row, frame.row[k]);
    high_row = std::max(high_row, frame.row[k]);
  }
  const double first_column = std::max(0.0, std::floor(low_column) - 1.0);
  const double last_column = std::min(columns - 1.0, std::ceil(high_column) + 1.0);
  const double first_row = std::max(0.0, std::floor(low_row) - 1.0);
  const double last_row = std::min(rows - 1.0, std::ceil(high_row) + 1.0);
  const double posts = (last_column - first_column + 1.0) * (last_row - first_row + 1.0);
  if (posts > kMostPosts)
    refuse(path, "would need " + std::to_string(static_cast<long long>(posts)) +
                     " posts within the reach of the flights, more than the 100 000 000 read "
                     "at most; use a coarser raster");
  PostHeights heights;
  heights.columns = static_cast<std::size_t>(last_column - first_column + 1.0);
  heights.rows = static_cast<std::size_t>(last_row - first_row + 1.0);
  heights.heights.resize(heights.columns * heights.rows);
  std::vector<double> line(heights.columns);
  for (std::size_t j = 0; j < heights.rows; ++j) {
    if (GDALRasterIO(band, GF_Read, static_cast<int>(first_column),
                     static_cast<int>(first_row) + static_cast<int>(j),
                     static_cast<int>(heights.columns), 1, line.data(),
                     static_cast<int>(heights.columns), 1, GDT_Float64, 0, 0) != CE_None)
      refuse(path,
             "cannot be read (row " +
                 std::to_string(static_cast<long long>(first_row) + static_cast<long long>(j)) +
                 ")");
    for (std::size_t i = 0; i < heights.columns; ++i) {
      const double v = line[i];
      // No data, and heights no air of strewn's covers (not finite, or outside -5000 .. 86000
      // m: a damaged post), are no height: a flight that comes down there is off the terrain.
      const double h = v * scale + offset;
      heights.heights[j * heights.columns + i] =
          (has_no_data && v == no_data) || !std::isfinite(h) || h < -5000.0 || h > 86000.0
              ? std::nanf("")
              : static_cast<float>(h);
    }
  }
  for (std::size_t k = 0; k < frame.column.size(); ++k) {
    frame.column[k] -= first_column;
    frame.row[k] -= first_row;
  }
  return heights;
}

}  // namespace

namespace {

// The drivers a scenario's raster may be opened with: every raster driver GDAL has but those
// that read other files or memory by name (a virtual raster may point at any file, at memory
// through MEM:::, or at a URL): a shared scenario must not make strewn read those.
const std::vector<std::string>& allowed_drivers() {
  static const std::vector<std::string> names = [] {
    std::vector<std::string> out;
    for (int k = 0; k < GDALGetDriverCount(); ++k) {
      GDALDriverH driver = GDALGetDriver(k);
      const std::string name = GDALGetDriverShortName(driver);
      if (GDALGetMetadataItem(driver, GDAL_DCAP_RASTER, nullptr) == nullptr) continue;
      if (name == "VRT" || name == "MEM" || name == "DERIVED" || name == "GTI") continue;
      out.push_back(name);
    }
    return out;
  }();
  return names;
}

// A raster is a regular file that exists: not a FIFO (whose open would wait for a writer), a
// device, a folder or one of GDAL's special names (/vsi..., MEM:::, a URL).
void check_regular_file(const std::string& path) {
  if (path.empty()) throw InputFileError("(empty): names no elevation raster");
  struct stat status {};
  if (::stat(path.c_str(), &status) != 0)
    throw InputFileError(path + ": does not exist or cannot be reached");
  if (!S_ISREG(status.st_mode))
    throw InputFileError(path +
                         ": is not a regular file (a folder, device or pipe cannot be "
                         "an elevation raster)");
}

}  // namespace

TerrainSurface read_terrain(const TerrainRequest& r) {
  static std::once_flag registered;
  std::call_once(registered, [] { GDALAllRegister(); });
  check_regular_file(r.path);
  const QuietGdal quiet;
  std::vector<const char*> drivers;
  for (const auto& name : allowed_drivers()) drivers.push_back(name.c_str());
  drivers.push_back(nullptr);
  const std::unique_ptr<void, DatasetClose> dataset(GDALOpenEx(
      r.path.c_str(), GDAL_OF_RASTER | GDAL_OF_READONLY, drivers.data(), nullptr, nullptr));
  if (!dataset) refuse(r.path, "cannot be read as an elevation raster");
  if (GDALGetRasterCount(dataset.get()) < 1) refuse(r.path, "holds no band of heights");
  double transform[6] = {}, inverse[6] = {};
  if (GDALGetGeoTransform(dataset.get(), transform) != CE_None)
    refuse(r.path, "is not georeferenced (it has no geotransform)");
  if (!GDALInvGeoTransform(transform, inverse))
    refuse(r.path, "has a geotransform that cannot be inverted");
  const OGRSpatialReferenceH own = GDALGetSpatialRef(dataset.get());
  if (own == nullptr) refuse(r.path, "has no coordinate reference system");
  const std::unique_ptr<void, ReferenceRelease> raster_reference(OSRClone(own));
  const std::unique_ptr<void, ReferenceRelease> wgs84(OSRNewSpatialReference(nullptr));
  OSRSetWellKnownGeogCS(wgs84.get(), "WGS84");
  OSRSetAxisMappingStrategy(wgs84.get(), OAMS_TRADITIONAL_GIS_ORDER);
  OSRSetAxisMappingStrategy(raster_reference.get(), OAMS_TRADITIONAL_GIS_ORDER);
  const std::unique_ptr<void, TransformationRelease> to_raster(
      OCTNewCoordinateTransformation(wgs84.get(), raster_reference.get()));
  if (!to_raster) refuse(r.path, "has a coordinate reference system not related to WGS 84");

  GDALRasterBandH band = GDALGetRasterBand(dataset.get(), 1);
  if (const char* unit = GDALGetRasterUnitType(band); unit != nullptr && !in_metres(unit))
    refuse(r.path, std::string("holds heights in \"") + unit + "\", not in metres");
  const double columns = GDALGetRasterXSize(dataset.get()),
               rows = GDALGetRasterYSize(dataset.get());
  std::optional<double> middle_longitude;
  if (OSRIsGeographic(raster_reference.get()))
    middle_longitude = transform[0] + transform[1] * columns / 2.0 + transform[2] * rows / 2.0;
  FrameToPosts frame = lattice_in_raster(r, to_raster.get(), inverse, middle_longitude);
  // The origin is the lattice's middle node.
  const std::size_t middle = (frame.nodes / 2) * frame.nodes + frame.nodes / 2;
  const double origin_column = frame.column[middle], origin_row = frame.row[middle];
  if (!(origin_column >= -0.5 && origin_column <= columns - 0.5 && origin_row >= -0.5 &&
        origin_row <= rows - 0.5))
    refuse(r.path, "does not cover the site's origin");
  PostHeights heights = read_window(r.path, dataset.get(), band, frame, origin_column, origin_row);
  return TerrainSurface(std::move(heights), std::move(frame));
}

}  // namespace strewn
