// GeoJSON near the antimeridian and the poles: every ring closed and counter-clockwise (RFC 7946
// 3.1.6), cut at +180 / -180 rather than wrapping the globe (RFC 7946 3.1.9), a ring about a pole
// drawn as a polar cap to the pole along the antimeridian; the pieces' areas on the WGS84
// ellipsoid (GeographicLib's PolygonArea) add up to the uncut figure's; rings far from both
// written exactly as GeographicLib's LocalCartesian places their vertices. The sites are invented
// points in open sea (tests/places/invented-places.tsv).
#include <gtest/gtest.h>

#include <GeographicLib/Geodesic.hpp>
#include <GeographicLib/LocalCartesian.hpp>
#include <GeographicLib/PolygonArea.hpp>
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <new>
#include <nlohmann/json.hpp>
#include <numbers>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "core/errors.hpp"
#include "report/geojson_rings.hpp"
#include "report/json_text.hpp"
#include "report/report_files.hpp"
#include "support.hpp"

namespace strewn {
namespace {

constexpr int kVertices = 128;  // the rings' vertices (report_files.cpp)

// The polygons of a geometry (each a list of rings); none for a point.
std::vector<nlohmann::json> polygons_of(const nlohmann::json& geometry) {
  if (geometry["type"] == "Polygon") return {geometry["coordinates"]};
  if (geometry["type"] == "MultiPolygon")
    return std::vector<nlohmann::json>(geometry["coordinates"].begin(),
                                       geometry["coordinates"].end());
  return {};
}

// Every position of a geometry.
std::vector<nlohmann::json> positions_of(const nlohmann::json& geometry) {
  const auto& c = geometry["coordinates"];
  if (geometry["type"] == "Point") return {c};
  if (geometry["type"] == "MultiPoint") return std::vector<nlohmann::json>(c.begin(), c.end());
  std::vector<nlohmann::json> out;
  for (const auto& polygon : polygons_of(geometry))
    for (const auto& ring : polygon) out.insert(out.end(), ring.begin(), ring.end());
  return out;
}

// Twice the signed area of a closed lon/lat ring (shoelace): positive when counter-clockwise.
double shoelace(const nlohmann::json& ring) {
  double twice = 0.0;
  for (std::size_t i = 0; i + 1 < ring.size(); ++i)
    twice += ring[i][0].get<double>() * ring[i + 1][1].get<double>() -
             ring[i + 1][0].get<double>() * ring[i][1].get<double>();
  return twice;
}

// Signed area on WGS84 (m^2, counter-clockwise positive) of a closed ring by GeographicLib's
// PolygonArea, the closing position not repeated. A polar cap's positions at the pole are left
// out: PolygonArea tells a ring about a pole by its longitude turning once round, which the
// cap's edge along the pole would undo; the edges up and down the antimeridian cancel.
double ellipsoid_area(const nlohmann::json& ring) {
  GeographicLib::PolygonArea polygon(GeographicLib::Geodesic::WGS84());
  for (std::size_t i = 0; i + 1 < ring.size(); ++i)
    if (std::abs(ring[i][1].get<double>()) != 90.0)
      polygon.AddPoint(ring[i][1].get<double>(), ring[i][0].get<double>());
  double perimeter = 0.0, area = 0.0;
  polygon.Compute(false, true, perimeter, area);
  return area;
}

// The same of a ring of points given in the site frame, placed by LocalCartesian: the uncut
// figure, for reference.
double ellipsoid_area(const GeographicLib::LocalCartesian& frame,
                      const std::vector<PlanePoint>& ring) {
  GeographicLib::PolygonArea polygon(GeographicLib::Geodesic::WGS84());
  for (const auto& p : ring) {
    double lat = 0.0, lon = 0.0, h = 0.0;
    frame.Reverse(p.east, p.north, 0.0, lat, lon, h);
    polygon.AddPoint(lat, lon);
  }
  double perimeter = 0.0, area = 0.0;
  polygon.Compute(false, true, perimeter, area);
  return area;
}

std::vector<PlanePoint> circle(PlanePoint c, double r) {
  std::vector<PlanePoint> ring;
  for (int k = 0; k < kVertices; ++k) {
    const double t = 2.0 * std::numbers::pi * k / kVertices;
    ring.push_back({c.east + r * std::cos(t), c.north + r * std::sin(t)});
  }
  return ring;
}

// The area of the 128-gon inscribed in a circle of radius r, (n / 2) r^2 sin(2 pi / n): the
// figure drawn falls short of pi r^2 by 4.0e-4 of it.
double inscribed_area(double r) {
  return 0.5 * kVertices * r * r * std::sin(2.0 * std::numbers::pi / kVertices);
}

// The RFC 7946 checks every polygon of a collection must pass; returns each feature's total area
// on the ellipsoid, by its kind and group.
struct Checked {
  std::string kind, group, type;
  double area = 0.0;       // m^2, the pieces added
  std::size_t pieces = 0;  // polygons
  bool reaches_pole = false;
};

std::vector<Checked> check_collection(const nlohmann::json& collection) {
  std::vector<Checked> out;
  for (const auto& f : collection["features"]) {
    const auto& g = f["geometry"];
    for (const auto& p : positions_of(g)) {
      // RFC 7946 3.1.9 (and 4: WGS84 longitude, latitude): longitudes in [-180, 180].
      EXPECT_GE(p[0].get<double>(), -180.0) << f["properties"].dump();
      EXPECT_LE(p[0].get<double>(), 180.0) << f["properties"].dump();
      EXPECT_LE(std::abs(p[1].get<double>()), 90.0) << f["properties"].dump();
    }
    Checked c{f["properties"].value("kind", ""), f["properties"].value("group", ""),
              g["type"].get<std::string>()};
    std::vector<double> east_cuts, west_cuts;  // latitudes of the vertices at +180 and -180
    for (const auto& polygon : polygons_of(g)) {
      ++c.pieces;
      EXPECT_EQ(polygon.size(), 1u);  // no holes: one exterior ring
      const auto& ring = polygon[0];
      EXPECT_GE(ring.size(), 4u);
      EXPECT_EQ(ring.front(), ring.back());  // closed (RFC 7946 3.1.6)
      // Counter-clockwise, the right-hand rule (RFC 7946 3.1.6), by the shoelace sign.
      EXPECT_GT(shoelace(ring), 0.0) << f["properties"].dump();
      for (std::size_t i = 0; i + 1 < ring.size(); ++i) {
        // No edge the long way round: RFC 7946 3.1.9 cuts such a ring at the antimeridian.
        EXPECT_LE(std::abs(ring[i + 1][0].get<double>() - ring[i][0].get<double>()), 180.0)
            << f["properties"].dump() << " edge " << i;
        const double lon = ring[i][0].get<double>(), lat = ring[i][1].get<double>();
        if (std::abs(lat) == 90.0) c.reaches_pole = true;
        if (std::abs(lat) != 90.0 && lon == 180.0) east_cuts.push_back(lat);
        if (std::abs(lat) != 90.0 && lon == -180.0) west_cuts.push_back(lat);
      }
      c.area += ellipsoid_area(ring);  // GeographicLib PolygonArea, WGS84
    }
    // The cut vertices at +180 and -180 are the same points: the same latitudes (RFC 7946 3.1.9).
    std::sort(east_cuts.begin(), east_cuts.end());
    std::sort(west_cuts.begin(), west_cuts.end());
    EXPECT_EQ(east_cuts, west_cuts) << f["properties"].dump();
    out.push_back(c);
  }
  return out;
}

const Checked& find(const std::vector<Checked>& all, const std::string& kind,
                    const std::string& group) {
  const auto it = std::find_if(
      all.begin(), all.end(), [&](const Checked& c) { return c.kind == kind && c.group == group; });
  if (it == all.end()) throw std::runtime_error("no feature " + kind + " of " + group);
  return *it;
}

GroupFootprint group(const std::string& name, PlanePoint centre) {
  GroupFootprint g;
  g.name = name;
  g.centre = centre;
  g.mean = centre;
  return g;
}

Containment containment(double level, double radius, std::optional<double> upper = std::nullopt) {
  Containment c;
  c.level = level;
  c.radius = radius;
  c.radius_upper = upper;
  c.confidence = 0.95;
  return c;
}

// A comb across the antimeridian, counter-clockwise: a base west of it and three teeth that cross
// it, 8e6 m^2; cut, it falls into four pieces.
std::vector<PlanePoint> comb() {
  return {{-2000, 0},   {2000, 0}, {2000, 500}, {0, 500},     {0, 1000},    {2000, 1000},
          {2000, 1500}, {0, 1500}, {0, 2000},   {2000, 2000}, {2000, 2500}, {-2000, 2500}};
}

TEST(GeoJson, RingsAcrossTheAntimeridianAreCutIntoClosedCounterClockwisePieces) {
  // Invented, in the open North Pacific; the antimeridian passes about 850 m east of the site.
  StudyRecord record;
  record.title = "antimeridian";
  record.latitude = 40.0;
  record.longitude = 179.99;
  record.release = {2000.0, 0.0};  // east of the antimeridian
  GroupFootprint all = group("all", {0.0, 0.0});
  all.containment.push_back(containment(0.9, 5000.0, 6000.0));
  all.ellipses.push_back(
      {.level = 0.9, .semi_major = 4000.0, .semi_minor = 1500.0, .bearing = 120.0});
  HazardPolygon hazard;
  hazard.level = 0.9;
  hazard.determined = true;
  hazard.ring = comb();
  all.polygons.push_back(hazard);
  GroupFootprint far = group("far", {-30000.0, 0.0});  // 30 km west: wholly west of it
  far.containment.push_back(containment(0.5, 2000.0));
  record.footprint.groups = {far, all};
  record.footprint.rules.push_back({.rule = "zone_radius", .group = "all", .threshold = 3000.0});
  record.body_names = {"crate"};
  StudyColumns impacts;
  impacts.resize(4, 0);
  impacts.east = {-1000.0, 1000.0, 5000.0, -5000.0};
  const auto j = nlohmann::json::parse(geojson_text(record, &impacts));
  const auto checked = check_collection(j);

  const GeographicLib::LocalCartesian frame(40.0, 179.99, 0.0);
  const double r = 5000.0;
  const Checked& circle90 = find(checked, "containment_circle", "all");
  EXPECT_EQ(circle90.type, "MultiPolygon");  // RFC 7946 3.1.9
  EXPECT_EQ(circle90.pieces, 2u);
  // The pieces' areas (GeographicLib PolygonArea, WGS84) add up to the circle's, pi r^2, within
  // 1e-3 (the 128-gon falls short of it by 4.0e-4), and to the uncut ring's within 1e-5 (the
  // 1e-7 degree rounding moves its 31 km of edge by under a centimetre: 4e-6 of the area).
  EXPECT_NEAR(circle90.area, std::numbers::pi * r * r, 1e-3 * std::numbers::pi * r * r);
  EXPECT_NEAR(circle90.area, inscribed_area(r), 1e-5 * inscribed_area(r));
  EXPECT_NEAR(circle90.area, ellipsoid_area(frame, circle({0.0, 0.0}, r)),
              1e-5 * inscribed_area(r));
  const Checked& upper = find(checked, "containment_upper_bound_circle", "all");
  EXPECT_EQ(upper.type, "MultiPolygon");
  EXPECT_NEAR(upper.area, std::numbers::pi * 36e6, 1e-3 * std::numbers::pi * 36e6);
  const Checked& zone = find(checked, "rule_zone", "all");
  EXPECT_EQ(zone.type, "MultiPolygon");
  EXPECT_NEAR(zone.area, std::numbers::pi * 9e6, 1e-3 * std::numbers::pi * 9e6);
  const Checked& ellipse = find(checked, "dispersion_ellipse", "all");
  EXPECT_EQ(ellipse.type, "MultiPolygon");
  EXPECT_NEAR(ellipse.area, std::numbers::pi * 4000.0 * 1500.0, 1e-3 * std::numbers::pi * 6e6);
  // The comb's teeth: four pieces, the same area as the uncut comb (GeographicLib) within 1e-5.
  const Checked& teeth = find(checked, "hazard_polygon", "all");
  EXPECT_EQ(teeth.type, "MultiPolygon");
  EXPECT_EQ(teeth.pieces, 4u);
  EXPECT_NEAR(teeth.area, 8e6, 1e-3 * 8e6);
  EXPECT_NEAR(teeth.area, ellipsoid_area(frame, comb()), 1e-5 * 8e6);

  // A ring far from the antimeridian is written as before: one Polygon, each vertex where
  // LocalCartesian places it, rounded to 1e-7 degrees (RFC 7946 11.2).
  for (const auto& f : j["features"]) {
    if (f["properties"].value("group", "") != "far" ||
        f["properties"].value("kind", "") != "containment_circle")
      continue;
    ASSERT_EQ(f["geometry"]["type"], "Polygon");
    const auto& ring = f["geometry"]["coordinates"][0];
    const auto expected = circle({-30000.0, 0.0}, 2000.0);
    ASSERT_EQ(ring.size(), expected.size() + 1);
    for (std::size_t k = 0; k < ring.size(); ++k) {
      double lat = 0.0, lon = 0.0, h = 0.0;
      frame.Reverse(expected[k % expected.size()].east, expected[k % expected.size()].north, 0.0,
                    lat, lon, h);
      EXPECT_EQ(ring[k][0].get<double>(), std::round(lon * 1e7) / 1e7) << k;
      EXPECT_EQ(ring[k][1].get<double>(), std::round(lat * 1e7) / 1e7) << k;
    }
  }
  // Points east of the antimeridian have negative longitudes, west of it positive.
  for (const auto& f : j["features"]) {
    if (f["properties"].value("kind", "") == "release_point") {
      EXPECT_LT(f["geometry"]["coordinates"][0].get<double>(), -179.9);
    }
    if (f["properties"].value("kind", "") == "impacts") {
      const auto& points = f["geometry"]["coordinates"];
      ASSERT_EQ(points.size(), 4u);
      EXPECT_GT(points[0][0].get<double>(), 179.9);
      EXPECT_LT(points[1][0].get<double>(), -179.9);
    }
  }
}

TEST(GeoJson, RingAboutTheNorthPoleIsAPolarCap) {
  // Invented, in the ice-covered Arctic Ocean: the site 1.1 km from the pole.
  StudyRecord record;
  record.title = "pole";
  record.latitude = 89.99;
  record.longitude = 179.99;
  GroupFootprint all = group("all", {0.0, 0.0});
  // 5 km about the site encloses the pole; 500 m does not, but crosses the antimeridian, which
  // passes 0.2 m from the site.
  all.containment.push_back(containment(0.9, 5000.0));
  all.containment.push_back(containment(0.5, 500.0));
  record.footprint.groups = {all};
  const auto j = nlohmann::json::parse(geojson_text(record, nullptr));
  const auto checked = check_collection(j);
  const GeographicLib::LocalCartesian frame(89.99, 179.99, 0.0);
  std::size_t caps = 0, cuts = 0;
  for (const auto& c : checked) {
    if (c.kind != "containment_circle") continue;
    const bool cap = c.reaches_pole;
    const double r = cap ? 5000.0 : 500.0;
    caps += cap ? 1 : 0;
    cuts += cap ? 0 : 1;
    // A cap is one Polygon that reaches the pole (a vertex at latitude 90, as GIS tools draw it
    // in plate carree); the small ring is cut in two (RFC 7946 3.1.9).
    EXPECT_EQ(c.type, cap ? "Polygon" : "MultiPolygon");
    EXPECT_EQ(c.pieces, cap ? 1u : 2u);
    // The area (GeographicLib PolygonArea, WGS84; the cap's ring vertices, without the pole's)
    // is the circle's within 1e-3 (the 128-gon falls short of it by 4.0e-4) and the uncut 128
    // ring points' within 1e-5: a cut latitude interpolated linearly in longitude lies off the
    // geodesic of its edge (s = 2 pi r / 128) by about s^2 / (8 d) at a distance d from the
    // pole, about a metre here, a few hundred square metres at most beside 7.9e7.
    EXPECT_NEAR(c.area, std::numbers::pi * r * r, 1e-3 * std::numbers::pi * r * r);
    EXPECT_NEAR(c.area, ellipsoid_area(frame, circle({0.0, 0.0}, r)), 1e-5 * inscribed_area(r));
  }
  EXPECT_EQ(caps, 1u);
  EXPECT_EQ(cuts, 1u);
}

// A ring about the south pole (a ring of longitudes only, not a site): westward, which is
// counter-clockwise seen from above that pole, with one vertex exactly on -180.
TEST(GeoJson, RingAboutTheSouthPoleIsAPolarCapToMinusNinety) {
  std::vector<LonLat> ring;
  for (int k = 0; k < kVertices; ++k)
    ring.push_back({std::remainder(-360.0 * k / kVertices, 360.0), -89.97});
  const nlohmann::json geometry = ring_geometry(ring);
  ASSERT_EQ(geometry["type"], "Polygon");
  const nlohmann::json collection{
      {"features", {{{"geometry", geometry}, {"properties", {{"kind", "cap"}}}}}}};
  const auto checked = check_collection(collection);
  ASSERT_EQ(checked.size(), 1u);
  EXPECT_TRUE(checked[0].reaches_pole);
  bool south = false;
  for (const auto& p : geometry["coordinates"][0]) south = south || p[1] == -90.0;
  EXPECT_TRUE(south);
  // The area of the ring's own points (GeographicLib PolygonArea, which handles a ring about a
  // pole) within 1e-9: the ring runs along a parallel, so no cut latitude is interpolated.
  GeographicLib::PolygonArea reference(GeographicLib::Geodesic::WGS84());
  for (const auto& v : ring) reference.AddPoint(v.lat, v.lon);
  double perimeter = 0.0, area = 0.0;
  reference.Compute(false, true, perimeter, area);
  EXPECT_GT(area, 0.0);
  EXPECT_NEAR(checked[0].area, area, 1e-9 * area + 1.0);
}

// The GeoJSON is written feature by feature and impact by impact (so that the impacts of a large
// study never stand whole in memory), and must be the bytes the JSON library writes for the whole
// document at once, as it was written before: parsed and dumped again by nlohmann::json, it is
// unchanged. Names that hold the very text the writer cuts at ("coordinates":[] and
// "features":[]) and bytes that are not UTF-8 (written as U+FFFD) are among them, one body has no
// landed impact, and the impacts take several of the writer's 64 KiB blocks.
TEST(GeoJson, WrittenPieceByPieceAsTheWholeDocumentIsWritten) {
  StudyRecord record;
  record.title = "\"features\":[] and \xff";  // a byte that is not UTF-8
  record.latitude = 41.3;                     // invented, open North Atlantic
  record.longitude = -33.7;
  record.release = {100.0, -50.0};
  record.samples = 20000;
  record.body_names = {"\"coordinates\":[]", "crate", "none landed"};
  GroupFootprint all = group("all", {10.0, 20.0});
  all.containment.push_back(containment(0.9, 800.0, 900.0));
  record.footprint.groups = {all};
  StudyColumns impacts;
  impacts.resize(20000, 0);
  for (std::size_t i = 0; i < impacts.rows(); ++i) {
    impacts.body[i] = static_cast<std::uint16_t>(i % 3);
    impacts.status[i] = i % 3 == 2 || i % 7 == 0 ? 4 : 0;  // body 2 never lands
    impacts.east[i] = 0.37 * static_cast<double>(i) - 1000.0;
    impacts.north[i] = 1e-3 * static_cast<double>(i * i % 9973);
  }
  const std::string text = geojson_text(record, &impacts);
  ASSERT_GT(text.size(), std::size_t{3} << 16);
  const auto whole = nlohmann::json::parse(text);
  EXPECT_EQ(json_text(whole, -1) + "\n", text);  // nlohmann::json's own dump of the document
  std::size_t points = 0;
  for (const auto& f : whole["features"])
    if (f["properties"].value("kind", "") == "impacts") {
      EXPECT_EQ(f["geometry"]["type"], "MultiPoint");
      points += f["geometry"]["coordinates"].size();
    }
  std::size_t landed = 0;
  for (std::size_t i = 0; i < impacts.rows(); ++i) landed += impacts.status[i] == 0 ? 1 : 0;
  EXPECT_EQ(points, landed);
  // Written to a file, in blocks: the same bytes.
  const test::ScratchFolder dir("geojson-test");
  const auto path = dir / "impacts.geojson";
  stream_report_file(path.string(),
                     [&](const TextSink& out) { write_geojson(record, &impacts, out); });
  std::ifstream in(path, std::ios::binary);
  EXPECT_EQ(std::string(std::istreambuf_iterator<char>(in), {}), text);
}

// A file written piece by piece that fails half-way (memory runs out, or the writer refuses)
// leaves nothing under its name nor its temporary name, and the failure goes on to the caller
// (app/commands.cpp turns std::bad_alloc into status 3, "ran out of memory").
TEST(GeoJson, AFileThatFailsWhileWrittenLeavesNothing) {
  const test::ScratchFolder dir("geojson-test");
  const auto path = (dir / "out.geojson").string();
  const auto half_then = [](auto failure) {
    return [failure](const TextSink& out) {
      const std::string block(50000, 'x');
      for (int k = 0; k < 4; ++k) out(block);  // past the first 64 KiB block: on disk
      throw failure;
    };
  };
  EXPECT_THROW(stream_report_file(path, half_then(std::bad_alloc())), std::bad_alloc);
  EXPECT_TRUE(std::filesystem::is_empty(dir.path()));
  EXPECT_THROW(stream_report_file(path, half_then(UsageError("refused"))), UsageError);
  EXPECT_TRUE(std::filesystem::is_empty(dir.path()));
}

}  // namespace
}  // namespace strewn
