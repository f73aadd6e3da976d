#pragma once
// Rasters made through GDAL for the tests (at invented places at sea, tests/places), and points
// carried between reference systems by GDAL.
#include <gtest/gtest.h>

#include <cpl_conv.h>
#include <gdal.h>
#include <ogr_srs_api.h>

#include <array>
#include <functional>
#include <optional>
#include <string>
#include <vector>

namespace strewn::test {

// A GeoTIFF of `columns` × `rows` posts: heights(column, row), its geotransform and its reference
// system (any definition OSRSetFromUserInput reads; empty: none); `unit` for the band.
struct RasterSpec {
  int columns = 0, rows = 0;
  std::array<double, 6> transform{};
  std::string reference;
  std::function<double(int, int)> heights;
  std::optional<double> no_data;
  std::string unit;
};

inline void write_geotiff(const std::string& path, const RasterSpec& spec) {
  GDALAllRegister();
  GDALDriverH driver = GDALGetDriverByName("GTiff");
  ASSERT_NE(driver, nullptr);
  GDALDatasetH dataset =
      GDALCreate(driver, path.c_str(), spec.columns, spec.rows, 1, GDT_Float32, nullptr);
  ASSERT_NE(dataset, nullptr);
  std::array<double, 6> transform = spec.transform;
  if (transform[1] != 0.0) GDALSetGeoTransform(dataset, transform.data());
  if (!spec.reference.empty()) {
    OGRSpatialReferenceH reference = OSRNewSpatialReference(nullptr);
    ASSERT_EQ(OSRSetFromUserInput(reference, spec.reference.c_str()), OGRERR_NONE);
    GDALSetSpatialRef(dataset, reference);
    OSRDestroySpatialReference(reference);
  }
  GDALRasterBandH band = GDALGetRasterBand(dataset, 1);
  if (spec.no_data) GDALSetRasterNoDataValue(band, *spec.no_data);
  if (!spec.unit.empty()) GDALSetRasterUnitType(band, spec.unit.c_str());
  std::vector<float> values(static_cast<std::size_t>(spec.columns * spec.rows));
  for (int j = 0; j < spec.rows; ++j)
    for (int i = 0; i < spec.columns; ++i)
      values[static_cast<std::size_t>(j * spec.columns + i)] =
          static_cast<float>(spec.heights(i, j));
  ASSERT_EQ(GDALRasterIO(band, GF_Write, 0, 0, spec.columns, spec.rows, values.data(), spec.columns,
                         spec.rows, GDT_Float32, 0, 0),
            CE_None);
  GDALClose(dataset);
}

// Points (x, y in traditional GIS order: longitude first) carried from one reference system to
// another ("WGS84" or any definition OSRSetFromUserInput reads) by GDAL, in place.
inline void carry_all(const std::string& from, const std::string& to, std::vector<double>& x,
                      std::vector<double>& y) {
  const auto reference = [](const std::string& definition) {
    OGRSpatialReferenceH r = OSRNewSpatialReference(nullptr);
    if (definition == "WGS84")
      OSRSetWellKnownGeogCS(r, "WGS84");
    else
      OSRSetFromUserInput(r, definition.c_str());
    OSRSetAxisMappingStrategy(r, OAMS_TRADITIONAL_GIS_ORDER);
    return r;
  };
  OGRSpatialReferenceH source = reference(from), target = reference(to);
  OGRCoordinateTransformationH transformation = OCTNewCoordinateTransformation(source, target);
  OCTTransform(transformation, static_cast<int>(x.size()), x.data(), y.data(), nullptr);
  OCTDestroyCoordinateTransformation(transformation);
  OSRDestroySpatialReference(source);
  OSRDestroySpatialReference(target);
}

// One point carried so.
inline std::array<double, 2> carried(const std::string& from, const std::string& to, double x,
                                     double y) {
  std::vector<double> xs{x}, ys{y};
  carry_all(from, to, xs, ys);
  return {xs[0], ys[0]};
}

}  // namespace strewn::test
