// The relief the map draws under a study on terrain (report/relief.hpp): contour lines where the
// closed form of a plane puts its levels, and a hillshade whose brightness is the Lambertian
// illumination of the plane by the sun the map names (north-west, 45 degrees up).
#include <cpl_string.h>
#include <cpl_vsi.h>
#include <gdal.h>
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <sstream>
#include <string>
#include <vector>

#include "report/relief.hpp"

namespace strewn {
namespace {

// A plane h = c + a east + b north on the relief's grid (bilinear interpolation is exact on it).
Relief plane_relief(double c, double a, double b) {
  Relief relief;
  relief.source = "plane.tif";
  relief.nodes = 401;
  relief.half_width = 2000.0;
  relief.spacing = 10.0;
  for (std::size_t j = 0; j < relief.nodes; ++j)
    for (std::size_t i = 0; i < relief.nodes; ++i)
      relief.heights.push_back(static_cast<float>(c +
                                                  a * (-2000.0 + 10.0 * static_cast<double>(i)) +
                                                  b * (-2000.0 + 10.0 * static_cast<double>(j))));
  return relief;
}

constexpr double kC = 500.0, kA = 0.1, kB = 0.05;
// The view: 2 km about (100, -50), drawn at 0.32 px per metre from (60, 70).
const ReliefView kView{100.0, -50.0, 1000.0, 60.0, 70.0, 0.32};

// Every point of every contour line lies on the plane's level (closed form: a level L of the plane
// is the line c + a e + b n = L). GDAL's contour generator interpolates linearly between the
// grid's nodes, exact on a plane; the SVG keeps 0.01 px, here 3 cm.
TEST(Relief, ContourLinesOfAPlaneLieOnItsLevels) {
  const ReliefDrawing d = relief_svg(plane_relief(kC, kA, kB), kView);
  // Heights under the view run from 500 + 0.1 (-900) + 0.05 (-1050) to 500 + 0.1 1100 +
  // 0.05 950, a range of 300 m: 20 m apart (about fifteen lines).
  EXPECT_EQ(d.interval, 20.0);
  // Each line is <path data-level="L" ... d="M x y L x y ...">.
  int lines = 0, points = 0;
  const std::string level_mark = "<path data-level=\"", shape_mark = " d=\"";
  for (auto at = d.ground.find(level_mark); at != std::string::npos;
       at = d.ground.find(level_mark, at + 1)) {
    const double level = std::stod(d.ground.substr(at + level_mark.size()));
    EXPECT_EQ(std::fmod(level, 20.0), 0.0) << level;
    ++lines;
    const auto shape_at = d.ground.find(shape_mark, at) + shape_mark.size();
    std::istringstream shape(d.ground.substr(shape_at, d.ground.find('"', shape_at) - shape_at));
    char command = 0;
    double x = 0.0, y = 0.0;
    while (shape >> command >> x >> y) {
      ASSERT_TRUE(command == 'M' || command == 'L') << command;
      const double east = kView.centre_east - kView.half + (x - kView.left) / kView.scale;
      const double north = kView.centre_north + kView.half - (y - kView.top) / kView.scale;
      // GDAL carries each line on to the raster's border, half a node beyond the view, with
      // the heights of the nearest nodes: those ends lie under the panel's frame, unseen.
      if (std::abs(east - kView.centre_east) > kView.half ||
          std::abs(north - kView.centre_north) > kView.half)
        continue;
      EXPECT_NEAR(kC + kA * east + kB * north, level, 0.01) << east << ", " << north;
      ++points;
    }
  }
  EXPECT_GE(lines, 14);
  EXPECT_GE(points, 100);
  // Index lines (every 100 m) are labelled with their heights.
  EXPECT_NE(d.labels.find(">500 m<"), std::string::npos) << d.labels;
}

// The hillshade of a plane: one brightness, that of a Lambertian surface lit by the sun from
// azimuth 315 degrees, 45 degrees above the horizon: the cosine between the surface's normal and
// the direction of the sun (common practice, the basis of the usual hillshade; e.g. Burrough and
// McDonnell, Principles of GIS, 1998, from memory), written by GDAL's hillshade as 1 + 254 cos
// (0 is no data; GDAL's gdaldem documentation, from memory).
TEST(Relief, TheHillshadeOfAPlaneIsItsIlluminationByTheSun) {
  for (const auto& [a, b] :
       std::vector<std::pair<double, double>>{{kA, kB}, {-0.4, 0.2}, {0.0, 0.0}, {0.3, -0.6}}) {
    const ReliefDrawing d = relief_svg(plane_relief(kC, a, b), kView);
    const std::string prefix = "href=\"data:image/png;base64,";
    const auto start = d.ground.find(prefix);
    ASSERT_NE(start, std::string::npos);
    const auto end = d.ground.find('"', start + prefix.size());
    std::string base64 = d.ground.substr(start + prefix.size(), end - start - prefix.size());
    const int bytes = CPLBase64DecodeInPlace(reinterpret_cast<GByte*>(base64.data()));
    const std::string name = "/vsimem/relief-test.png";
    VSIFCloseL(VSIFileFromMemBuffer(name.c_str(), reinterpret_cast<GByte*>(base64.data()),
                                    static_cast<vsi_l_offset>(bytes), FALSE));
    GDALAllRegister();
    GDALDatasetH png = GDALOpen(name.c_str(), GA_ReadOnly);
    ASSERT_NE(png, nullptr);
    const int width = GDALGetRasterXSize(png);
    unsigned char centre = 0;
    ASSERT_EQ(GDALRasterIO(GDALGetRasterBand(png, 1), GF_Read, width / 2, width / 2, 1, 1, &centre,
                           1, 1, GDT_Byte, 0, 0),
              CE_None);
    GDALClose(png);
    VSIUnlink(name.c_str());
    const double azimuth = 315.0 * std::numbers::pi / 180.0, altitude = std::numbers::pi / 4.0;
    const double sun[3] = {std::sin(azimuth) * std::cos(altitude),
                           std::cos(azimuth) * std::cos(altitude), std::sin(altitude)};
    const double norm = std::sqrt(a * a + b * b + 1.0);
    const double cosine = (-a * sun[0] - b * sun[1] + sun[2]) / norm;
    EXPECT_NEAR(centre, 1.0 + 254.0 * std::max(cosine, 0.0), 1.0) << a << ", " << b;
  }
}

// No relief, nothing drawn: a level ground's map is as it was.
TEST(Relief, AnEmptyReliefDrawsNothing) {
  const ReliefDrawing d = relief_svg(Relief{}, kView);
  EXPECT_TRUE(d.ground.empty());
  EXPECT_TRUE(d.labels.empty());
  EXPECT_EQ(d.interval, 0.0);
}

}  // namespace
}  // namespace strewn
