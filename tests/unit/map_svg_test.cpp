// The SVG map's graticule near the antimeridian and a pole: every longitude label in
// [-180, 180], every label placed where GeographicLib's LocalCartesian puts its meridian or
// parallel, labels on both sides of the antimeridian when the map spans it, and every graticule
// line on a true meridian or parallel (they converge toward a pole). The map is read as SVG
// text; its scale is that of the containment bound it draws, whose radius the test gives. The
// sites are invented points in open sea (tests/places/invented-places.tsv).
#include <gtest/gtest.h>

#include <GeographicLib/LocalCartesian.hpp>
#include <algorithm>
#include <cmath>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "report/report_files.hpp"

namespace strewn {
namespace {

constexpr double kBound = 6000.0;  // m, the containment bound drawn (its radius gives the scale)
// The panel (map_svg.cpp): x in [92, 732], y in [64, 704].
constexpr double kLeft = 92.0, kRight = 732.0, kTop = 64.0, kBottom = 704.0;
// Positions are written to 0.1 px: a point is off by at most 0.07 px, the scale read from the
// circle's radius (301.9 px) by 2e-4 of the distance from the centre.
constexpr double kTolerancePx = 0.2;

// A study record of one body about the site: the centre and mean impact at the site, a 90 %
// containment radius of 5 km with its bound at kBound, the release at the site.
StudyRecord record_at(double latitude, double longitude) {
  StudyRecord r;
  r.title = "graticule";
  r.latitude = latitude;
  r.longitude = longitude;
  r.samples = 1000;
  GroupFootprint all;
  all.name = "all";
  all.centre = {0.0, 0.0};
  all.mean = {0.0, 0.0};
  Containment c;
  c.level = 0.9;
  c.radius = 5000.0;
  c.radius_upper = kBound;
  all.containment.push_back(c);
  GroupFootprint body = all;
  body.name = "crate";
  r.footprint.groups = {body, all};
  r.body_names = {"crate"};
  return r;
}

// The number of an attribute of an element's opening tag.
std::optional<double> number_in(const std::string& tag, const std::string& attribute) {
  const std::size_t at = tag.find(" " + attribute + "=\"");
  if (at == std::string::npos) return std::nullopt;
  return std::stod(tag.substr(at + attribute.size() + 3));
}

// The map's own frame: the site's point (east, north) = (0, 0) drawn at the mean impact's
// circle, and the pixels per metre of the containment bound's circle.
struct MapFrame {
  double x0 = 0.0, y0 = 0.0, scale = 0.0;
  [[nodiscard]] PlanePoint local(double x, double y) const {
    return {(x - x0) / scale, (y0 - y) / scale};
  }
  [[nodiscard]] double tolerance_m() const { return kTolerancePx / scale; }
};

MapFrame frame_of(const std::string& svg) {
  const std::string mean = svg.substr(svg.find("<circle class=\"mean-impact\""));
  const std::string bound = svg.substr(svg.find("class=\"containment-bound\""));
  return {*number_in(mean, "cx"), *number_in(mean, "cy"), *number_in(bound, "r") / kBound};
}

// A tick label: where its text stands, the point it marks (data-point) and what it says.
struct Label {
  double x = 0.0, y = 0.0, px = 0.0, py = 0.0;
  bool meridian = false;
  double degrees = 0.0;  // east and north positive
  std::string text;
};

std::vector<Label> labels_of(const std::string& svg) {
  std::string ticks = svg.substr(svg.find("<g class=\"ticks\""));
  ticks = ticks.substr(0, ticks.find("</g>"));
  std::vector<Label> out;
  for (std::size_t at = ticks.find("<text"); at != std::string::npos;
       at = ticks.find("<text", at + 1)) {
    const std::size_t end = ticks.find('>', at);
    const std::string tag = ticks.substr(at, end - at);
    Label l;
    l.text = ticks.substr(end + 1, ticks.find('<', end) - end - 1);
    l.x = *number_in(tag, "x");
    l.y = *number_in(tag, "y");
    const std::size_t point = tag.find("data-point=\"");
    if (point == std::string::npos) {
      ADD_FAILURE() << "a label without the point it marks: " << l.text;
      continue;
    }
    std::istringstream(tag.substr(point + 12)) >> l.px >> l.py;
    const std::size_t degree = l.text.find("\u00b0");
    const std::string side = l.text.substr(degree + 2);
    l.meridian = side != "N" && side != "S";
    l.degrees = std::stod(l.text) * (side == "W" || side == "S" ? -1.0 : 1.0);
    out.push_back(l);
  }
  return out;
}

// Each graticule line's points (px): a path's, or a straight line's two ends.
std::vector<std::vector<std::pair<double, double>>> lines_of(const std::string& svg) {
  std::string grid = svg.substr(svg.find("<g class=\"graticule\""));
  grid = grid.substr(0, grid.find("</g>"));
  std::vector<std::vector<std::pair<double, double>>> out;
  for (std::size_t at = grid.find(" d=\""); at != std::string::npos;
       at = grid.find(" d=\"", at + 1)) {
    std::string d = grid.substr(at + 4, grid.find('"', at + 4) - at - 4);
    std::replace(d.begin(), d.end(), 'M', ' ');
    std::replace(d.begin(), d.end(), 'L', ' ');
    std::istringstream in(d);
    std::vector<std::pair<double, double>> line;
    for (double x = 0.0, y = 0.0; in >> x >> y;) line.emplace_back(x, y);
    out.push_back(line);
  }
  for (std::size_t at = grid.find("<line "); at != std::string::npos;
       at = grid.find("<line ", at + 1)) {
    const std::string tag = grid.substr(at, grid.find('>', at) - at);
    out.push_back({{*number_in(tag, "x1"), *number_in(tag, "y1")},
                   {*number_in(tag, "x2"), *number_in(tag, "y2")}});
  }
  return out;
}

bool in_panel(double x, double y) {
  return x >= kLeft && x <= kRight && y >= kTop && y <= kBottom;
}

// How far (m) a local point lies from the meridian (or parallel) of `degrees`: from the point of
// that line at its own latitude (or longitude), both placed by GeographicLib's LocalCartesian
// (its height dropped: within d^3 / (2 R^2) of the map's plane point at a distance d, 3 mm at the
// 6 km of these maps, far below the tolerance).
double off_line(const GeographicLib::LocalCartesian& frame, PlanePoint p, bool meridian,
                double degrees) {
  double lat = 0.0, lon = 0.0, h = 0.0;
  frame.Reverse(p.east, p.north, 0.0, lat, lon, h);
  double x = 0.0, y = 0.0, z = 0.0;
  frame.Forward(meridian ? lat : degrees, meridian ? degrees : lon, 0.0, x, y, z);
  return std::hypot(x - p.east, y - p.north);
}

// The checks every map of a site with coordinates must pass; returns its labels.
std::vector<Label> check_map(const std::string& svg, double latitude, double longitude) {
  const GeographicLib::LocalCartesian frame(latitude, longitude, 0.0);  // GeographicLib
  const MapFrame map = frame_of(svg);
  EXPECT_GT(map.scale, 0.0);
  const std::vector<Label> labels = labels_of(svg);
  for (const Label& l : labels) {
    if (l.meridian) {
      EXPECT_GE(l.degrees, -180.0) << l.text;
      EXPECT_LE(l.degrees, 180.0) << l.text;
    }
    // The point a label marks lies on its meridian or parallel, as LocalCartesian places it.
    EXPECT_LT(off_line(frame, map.local(l.px, l.py), l.meridian, l.degrees), map.tolerance_m())
        << l.text << " at " << l.px << " " << l.py;
    // And the label stands by it.
    EXPECT_LT(std::hypot(l.x - l.px, l.y - l.py), 25.0) << l.text;
  }
  // Every line is a true meridian or parallel: its points inside the panel all lie on the
  // meridian of the one farthest from a pole, or all on the parallel of the first.
  const auto lines = lines_of(svg);
  EXPECT_GE(lines.size(), 4u);
  for (const auto& line : lines) {
    std::vector<PlanePoint> inside;
    for (const auto& [x, y] : line)
      if (in_panel(x, y)) inside.push_back(map.local(x, y));
    if (inside.empty()) continue;
    double lat0 = 90.0, lon0 = 0.0, first_lat = 0.0;
    for (std::size_t k = 0; k < inside.size(); ++k) {
      double lat = 0.0, lon = 0.0, h = 0.0;
      frame.Reverse(inside[k].east, inside[k].north, 0.0, lat, lon, h);
      if (k == 0) first_lat = lat;
      if (std::abs(lat) < std::abs(lat0)) lat0 = lat, lon0 = lon;
    }
    double worst_meridian = 0.0, worst_parallel = 0.0;
    for (const PlanePoint& p : inside) {
      worst_meridian = std::max(worst_meridian, off_line(frame, p, true, lon0));
      worst_parallel = std::max(worst_parallel, off_line(frame, p, false, first_lat));
    }
    EXPECT_LT(std::min(worst_meridian, worst_parallel), map.tolerance_m())
        << "a graticule line on neither a meridian nor a parallel: " << worst_meridian << " m, "
        << worst_parallel << " m off";
  }
  return labels;
}

TEST(MapSvg, LongitudeLabelsAcrossTheAntimeridianAreOnTheirMeridians) {
  // Invented, in the open North Pacific; the antimeridian passes about 850 m east of the site,
  // inside the map (12.7 km across).
  const std::string svg = map_svg(record_at(40.00, 179.99));
  const std::vector<Label> labels = check_map(svg, 40.00, 179.99);
  std::vector<const Label*> below;  // the longitudes below the panel, left to right
  for (const Label& l : labels)
    if (l.meridian && l.py == kBottom) below.push_back(&l);
  ASSERT_GE(below.size(), 3u);
  std::sort(below.begin(), below.end(),
            [](const Label* a, const Label* b) { return a->px < b->px; });
  // Labels on both sides of the antimeridian, and eastward they run on across it: each the one
  // before plus the step, once taken the short way round.
  EXPECT_GT(below.front()->degrees, 179.0);
  EXPECT_LT(below.back()->degrees, -179.0);
  for (std::size_t k = 1; k < below.size(); ++k)
    EXPECT_GT(std::remainder(below[k]->degrees - below[k - 1]->degrees, 360.0), 0.0)
        << below[k - 1]->text << " then " << below[k]->text;
}

TEST(MapSvg, GraticuleAboutThePoleFollowsTheConvergingMeridians) {
  // Invented, in the ice-covered Arctic Ocean: the site 1.1 km from the pole, which lies in the
  // map.
  const std::string svg = map_svg(record_at(89.99, 179.99));
  const std::vector<Label> labels = check_map(svg, 89.99, 179.99);
  bool east = false, west = false, latitude = false;
  for (const Label& l : labels) {
    east = east || (l.meridian && l.degrees > 0.0 && l.degrees < 180.0);
    west = west || (l.meridian && l.degrees < 0.0);
    latitude = latitude || !l.meridian;
  }
  EXPECT_TRUE(east);
  EXPECT_TRUE(west);
  EXPECT_TRUE(latitude);
  // The meridians meet at the pole, where LocalCartesian puts it (GeographicLib).
  const GeographicLib::LocalCartesian frame(89.99, 179.99, 0.0);
  double pole_e = 0.0, pole_n = 0.0, z = 0.0;
  frame.Forward(90.0, 0.0, 0.0, pole_e, pole_n, z);
  const MapFrame map = frame_of(svg);
  const double pole_x = map.x0 + pole_e * map.scale, pole_y = map.y0 - pole_n * map.scale;
  ASSERT_TRUE(in_panel(pole_x, pole_y));
  std::size_t meeting = 0;
  for (const auto& line : lines_of(svg))
    for (const auto& [x, y] : line)
      if (std::hypot(x - pole_x, y - pole_y) < kTolerancePx) {
        ++meeting;
        break;
      }
  EXPECT_GE(meeting, 8u);
}

}  // namespace
}  // namespace strewn
