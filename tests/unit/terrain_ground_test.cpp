// Flights that land on terrain ([site] terrain = "FILE"): on an inclined plane where the closed
// form of a settling body's path meets the plane; on a flat raster where the level ground of the
// same height puts them; alike whether the raster is geographic or projected; ending off the
// terrain where it has no height; and rasters that cannot serve refused at loading with the key.
#include <gtest/gtest.h>
#include <sys/stat.h>

#include <GeographicLib/LocalCartesian.hpp>
#include <array>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <memory>
#include <string>
#include <vector>

#include "command_line.hpp"
#include "core/constants.hpp"
#include "core/errors.hpp"
#include "flight/flight.hpp"
#include "rasters.hpp"
#include "sampling/input_sampler.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"
#include "store/results_file.hpp"
#include "study/study.hpp"
#include "support.hpp"
#include "terrain/elevation_raster.hpp"

namespace strewn {
namespace {

// The ridge supply drop's invented place (tests/places/invented-places.tsv).
constexpr double kLatitude = 41.30, kLongitude = -33.70;

// A surface given in the site's frame: posts `spacing` m apart over [-half, half] east and north,
// heights from `height(east, north)`, the lattice the identity (post coordinates are metres over
// the spacing).
TerrainSurface frame_surface(double half, double spacing,
                             const std::function<double(double, double)>& height) {
  PostHeights posts;
  posts.columns = posts.rows = static_cast<std::size_t>(std::lround(2.0 * half / spacing)) + 1;
  posts.heights.resize(posts.columns * posts.rows);
  for (std::size_t j = 0; j < posts.rows; ++j)
    for (std::size_t i = 0; i < posts.columns; ++i)
      posts.heights[j * posts.columns + i] = static_cast<float>(height(
          -half + spacing * static_cast<double>(i), -half + spacing * static_cast<double>(j)));
  FrameToPosts frame;
  frame.half_width = half;
  frame.spacing = spacing;
  frame.nodes = posts.columns;
  for (std::size_t j = 0; j < frame.nodes; ++j)
    for (std::size_t i = 0; i < frame.nodes; ++i) {
      frame.column.push_back(static_cast<double>(i));
      frame.row.push_back(static_cast<double>(j));
    }
  return TerrainSurface(std::move(posts), std::move(frame));
}

Grounds terrain_of(TerrainSurface surface) {
  const std::array<double, 2> values{std::nan(""), 0.0};
  return TerrainGround(values, std::make_shared<const TerrainSurface>(std::move(surface)));
}

// A body settling at its terminal speed in a uniform medium and a wind the same at every height
// moves on a known path; released at that speed it meets an inclined plane where the path does.
// Closed form: with the inverse-square gravity of US76 (NOAA-S/T 76-1562, eq. 17) the quadratic-
// drag terminal speed is v(z) = K r0 / (r0 + z), K = sqrt(2 m g0 / (rho cd A)), so
// (r0 + z)^2 = (r0 + z0)^2 - 2 K r0 t, while the body drifts with the wind; the plane is met
// where z(t) = a x(t) + b y(t) + c (solved by bisection to 1e-12 s).
TEST(TerrainGround, ASettlingBodyMeetsAnInclinedPlaneWhereItsPathDoes) {
  const double a = 0.2, b = -0.1, c = 100.0;  // the plane z = a east + b north + c
  const Grounds ground = terrain_of(
      frame_surface(1000.0, 10.0, [&](double e, double n) { return a * e + b * n + c; }));
  const double rho = 1.2, mass = 10.0, cd = 1.0, area = 0.5;
  const Medium medium = Medium::uniform(rho, 1.8e-5, std::numeric_limits<double>::infinity());
  const WindProfile wind({{-100.0, 6.0, 250.0}, {5000.0, 6.0, 250.0}}, -100.0);
  const Environment environment{&medium, {}, &wind, ground};
  const Body body = test::area_body(mass, cd, area);
  const double r0 = constants::earth_radius, z0 = 200.0;
  const double k = std::sqrt(2.0 * mass * constants::g0 / (rho * cd * area));
  const Eigen::Vector2d w = wind.at(z0);
  const ReleaseState release = test::release_at(0.0, 0.0, z0, w.x(), w.y(), -k * r0 / (r0 + z0));
  FlightOptions options;
  options.tolerance = 1e-5;
  const FlightResult r = fly(body, environment, release, options);
  ASSERT_EQ(r.status, FlightStatus::landed);

  auto z_at = [&](double t) { return std::sqrt((r0 + z0) * (r0 + z0) - 2.0 * k * r0 * t) - r0; };
  auto above_plane = [&](double t) { return z_at(t) - (a * w.x() * t + b * w.y() * t + c); };
  double low = 0.0, high = 100.0;
  while (high - low > 1e-12) {
    const double mid = 0.5 * (low + high);
    (above_plane(mid) > 0.0 ? low : high) = mid;
  }
  const double t = 0.5 * (low + high);
  EXPECT_NEAR(r.time, t, 1e-4);
  EXPECT_NEAR(r.position.x(), w.x() * t, 1e-3);
  EXPECT_NEAR(r.position.y(), w.y() * t, 1e-3);
  EXPECT_NEAR(r.position.z(), z_at(t), 1e-3);
  // The plane's steepest slope, atan |grad h|, and the angle of the velocity with the plane,
  // asin(-v . n / |v|) for its upward normal n = (-a, -b, 1) / |(-a, -b, 1)| (closed form).
  EXPECT_NEAR(r.slope, std::atan(std::hypot(a, b)) / constants::degree, 1e-6);
  const Vec3 normal = Vec3(-a, -b, 1.0).normalized();
  const Vec3 v(w.x(), w.y(), -k * r0 / (r0 + z_at(t)));
  EXPECT_NEAR(r.surface_angle, std::asin(-v.dot(normal) / v.norm()) / constants::degree, 1e-4);
}

// Beyond the terrain read (or on posts without data) no landing can be located: the flight ends
// with the status off_terrain where it comes down there, not at the time cap.
TEST(TerrainGround, AFlightThatComesDownBeyondTheTerrainEndsOffTheTerrain) {
  const Grounds ground = terrain_of(frame_surface(200.0, 10.0, [](double, double) { return 0.0; }));
  const Medium medium = Medium::us1976();
  const WindProfile wind({{0.0, 10.0, 270.0}, {3000.0, 10.0, 270.0}}, 0.0);
  const Environment environment{&medium, {}, &wind, ground};
  const Body body = test::area_body(10.0, 1.0, 0.5);
  // Drifting 10 m/s east for well over 20 s: it passes the terrain's east edge at 200 m.
  const FlightResult r = fly(body, environment, test::release_at(0.0, 0.0, 1000.0, 10.0, 0.0, 0.0));
  EXPECT_EQ(r.status, FlightStatus::off_terrain);
  EXPECT_GT(r.position.x(), 200.0);
  EXPECT_LT(r.time, 1000.0);
  // Released beyond it with a height above the ground: off the terrain at once.
  const FlightResult outside =
      fly(body, environment, test::release_at(500.0, 0.0, std::nan(""), 0.0, 0.0, 0.0));
  EXPECT_EQ(outside.status, FlightStatus::off_terrain);
}

// A scenario of the ridge drop's kind over a raster written here through GDAL.
std::string scenario_over(const std::string& site_keys, const std::string& release_keys) {
  return R"(
title = "terrain test"
[site]
latitude = 41.30
longitude = -33.70
)" + site_keys +
         R"(
[medium]
model = "us1976"
[wind]
layers = [ { altitude = 0.0, speed = 3.0, from = 240.0 }, { altitude = 3000.0, speed = 12.0, from = 270.0 } ]
[wind.uncertainty]
model = "bias"
speed_sd = 1.5
[release]
)" + release_keys +
         R"(
speed = 62.0
track = 90.0
along_error = { dist = "normal", mean = 0.0, sd = 25.0 }
[[body]]
name = "bundle"
mass = { dist = "normal", mean = 95.0, sd = 4.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.2 }
area = 0.55
[study]
samples = 64
seed = 11
tolerance = 0.001
)";
}

StudyColumns study_of(const Scenario& s, std::uint64_t samples) {
  const World world = build_world(s);
  const SampleModel model(s, world, samples);
  StudyOptions options;
  options.samples = samples;
  return run_study(model, options).columns;
}

// A flat raster at height h lands every sample where the level ground at h does (the same
// physics on the general path for a ground that is not level: a check of the seam, common
// practice), to well under the study tolerance.
TEST(TerrainGround, AFlatRasterLandsWhereTheLevelGroundOfItsHeightDoes) {
  const test::ScratchFolder dir("terrain-flat");
  const std::string raster = (dir / "flat.tif").string();
  test::write_geotiff(raster, {400,
                               400,
                               {kLongitude - 0.12, 0.0006, 0.0, kLatitude + 0.09, 0.0, -0.00045},
                               "EPSG:4326",
                               [](int, int) { return 540.0; },
                               {},
                               "m"});
  const std::string release = "altitude = 1500.0\n";
  const Scenario level =
      parse_scenario(scenario_over("ground = 540.0\n", release), (dir / "level.toml").string());
  const Scenario terrain = parse_scenario(scenario_over("terrain = \"flat.tif\"\n", release),
                                          (dir / "terrain.toml").string());
  ASSERT_TRUE(std::holds_alternative<TerrainGround>(terrain.site.ground));
  const StudyColumns a = study_of(level, 64), b = study_of(terrain, 64);
  ASSERT_EQ(a.rows(), b.rows());
  for (std::size_t i = 0; i < a.rows(); ++i) {
    ASSERT_EQ(b.status[i], static_cast<std::uint8_t>(FlightStatus::landed));
    EXPECT_NEAR(b.east[i], a.east[i], 1e-6) << i;
    EXPECT_NEAR(b.north[i], a.north[i], 1e-6) << i;
    EXPECT_NEAR(b.time[i], a.time[i], 1e-7) << i;
    EXPECT_FLOAT_EQ(b.ground[i], 540.0f);
    EXPECT_FLOAT_EQ(b.slope[i], 0.0f);
    EXPECT_NEAR(b.surface_angle[i], a.surface_angle[i], 1e-4);
  }
}

// A smooth terrain given in the site's frame, written once on geographic posts (EPSG:4326) and
// once on projected ones (UTM zone 26 north, EPSG:32626), lands the samples alike: the two read
// the same surface up to the bilinear interpolation between different posts, 10 m apart (about
// h'' s^2 / 8 = 4 mm of height here, a few centimetres along the ground at these glide angles).
TEST(TerrainGround, GeographicAndProjectedRastersOfOneTerrainLandAlike) {
  const test::ScratchFolder dir("terrain-systems");
  const GeographicLib::LocalCartesian site(kLatitude, kLongitude, 0.0);
  auto terrain = [](double east, double north) {
    return 700.0 + 300.0 * std::exp(-std::pow((east - 2200.0 - 0.4 * north) / 900.0, 2));
  };
  auto height_at = [&](double longitude, double latitude) {
    double east = 0.0, north = 0.0, up = 0.0;
    site.Forward(latitude, longitude, 0.0, east, north, up);
    return terrain(east, north);
  };
  const auto [x0, y0] = test::carried("WGS84", "EPSG:32626", kLongitude, kLatitude);
  // The projected posts' longitudes and latitudes, carried by GDAL in one call.
  constexpr int kColumns = 900, kRows = 700;
  std::vector<double> xs, ys;
  for (int j = 0; j < kRows; ++j)
    for (int i = 0; i < kColumns; ++i) {
      xs.push_back(x0 - 2000.0 + 10.0 * (i + 0.5));
      ys.push_back(y0 + 3500.0 - 10.0 * (j + 0.5));
    }
  test::carry_all("EPSG:32626", "WGS84", xs, ys);
  const test::RasterSpec projected{kColumns,
                                   kRows,
                                   {x0 - 2000.0, 10.0, 0.0, y0 + 3500.0, 0.0, -10.0},
                                   "EPSG:32626",
                                   [&](int i, int j) {
                                     const std::size_t k =
                                         static_cast<std::size_t>(j * kColumns + i);
                                     return height_at(xs[k], ys[k]);
                                   },
                                   {},
                                   "m"};
  const double dlon = 10.0 / 83900.0, dlat = 10.0 / 111050.0;  // about 10 m
  const test::RasterSpec geographic{
      kColumns,
      kRows,
      {kLongitude - 2000.0 / 83900.0, dlon, 0.0, kLatitude + 3500.0 / 111050.0, 0.0, -dlat},
      "EPSG:4326",
      [&](int i, int j) {
        return height_at(kLongitude - 2000.0 / 83900.0 + dlon * (i + 0.5),
                         kLatitude + 3500.0 / 111050.0 - dlat * (j + 0.5));
      },
      {},
      "m"};
  test::write_geotiff((dir / "utm.tif").string(), projected);
  test::write_geotiff((dir / "geo.tif").string(), geographic);
  // The same geographic raster with longitudes counted 0 .. 360 east, as some global models
  // write them: the site's longitude -33.7 is 326.3 there (common practice).
  test::RasterSpec east_of_greenwich = geographic;
  east_of_greenwich.transform[0] += 360.0;
  test::write_geotiff((dir / "geo360.tif").string(), east_of_greenwich);
  const std::string site_tail = "terrain_reach = 3000.0\n";
  const std::string release = "altitude = 1600.0\n";
  const Scenario utm = parse_scenario(scenario_over("terrain = \"utm.tif\"\n" + site_tail, release),
                                      (dir / "u.toml").string());
  const Scenario geo = parse_scenario(scenario_over("terrain = \"geo.tif\"\n" + site_tail, release),
                                      (dir / "g.toml").string());
  const Scenario geo360 = parse_scenario(
      scenario_over("terrain = \"geo360.tif\"\n" + site_tail, release), (dir / "w.toml").string());
  const StudyColumns a = study_of(utm, 64), b = study_of(geo, 64), c = study_of(geo360, 64);
  int on_slope = 0;
  for (std::size_t i = 0; i < a.rows(); ++i) {
    ASSERT_EQ(a.status[i], static_cast<std::uint8_t>(FlightStatus::landed));
    ASSERT_EQ(b.status[i], static_cast<std::uint8_t>(FlightStatus::landed));
    EXPECT_NEAR(b.east[i], c.east[i], 1e-6) << i;
    EXPECT_NEAR(b.ground[i], c.ground[i], 1e-6) << i;
    EXPECT_NEAR(a.east[i], b.east[i], 0.05) << i;
    EXPECT_NEAR(a.north[i], b.north[i], 0.05) << i;
    EXPECT_NEAR(a.ground[i], b.ground[i], 0.02) << i;
    // Where the terrain is: the ground under the impact is the terrain's height there.
    EXPECT_NEAR(a.ground[i], terrain(a.east[i], a.north[i]), 0.02) << i;
    on_slope += a.slope[i] > 2.0;
  }
  EXPECT_GT(on_slope, 16) << "the samples should land on the ridge's flank";
}

// A release height above the ground is taken above the terrain under each release point.
TEST(TerrainGround, AReleaseHeightIsAboveTheTerrainUnderTheReleasePoint) {
  const test::ScratchFolder dir("terrain-height");
  const std::string reference =
      "+proj=tmerc +lat_0=41.3 +lon_0=-33.7 +k=1 +x_0=0 +y_0=0 +ellps=WGS84";
  // A plane rising 0.1 m per m eastward (the projection is the frame near the origin).
  test::write_geotiff((dir / "plane.tif").string(),
                      {400,
                       400,
                       {-4000.0, 20.0, 0.0, 4000.0, 0.0, -20.0},
                       reference,
                       [](int i, int) { return 500.0 + 0.1 * (-4000.0 + 20.0 * (i + 0.5)); },
                       {},
                       "m"});
  const Scenario s =
      parse_scenario(scenario_over("terrain = \"plane.tif\"\n", "height_above_ground = 800.0\n"),
                     (dir / "h.toml").string());
  EXPECT_TRUE(s.release.above_ground);
  // Each input at its median but the release's error along the track, which moves the release
  // point east over the rising plane.
  std::vector<double> values;
  std::size_t along = values.size();
  for (const auto& input : s.sampled_inputs) {
    if (input.name == "release.along_error") along = values.size();
    values.push_back(input.distribution.nominal());
  }
  ASSERT_LT(along, values.size());
  for (const double error : {-900.0, -300.0, 0.0, 450.0, 1200.0}) {
    values[along] = error;
    const FlightInputs in = build_flight(s, 0, InputValues::of_sample(values));
    const double east = in.release.position.x();
    EXPECT_NEAR(east, error, 1e-9);
    EXPECT_NEAR(in.release.position.z(), 800.0 + 500.0 + 0.1 * east, 5e-3);
  }
  // A height that is within its own range but, above this 500 m ground, puts the release above
  // the top of the U.S. Standard Atmosphere 1976 (86 km) is refused; it used to pass unchecked.
  try {
    (void)parse_scenario(
        scenario_over("terrain = \"plane.tif\"\n", "height_above_ground = 85800.0\n"),
        (dir / "high.toml").string());
    ADD_FAILURE() << "a release at 86 300 m was accepted";
  } catch (const ScenarioError& e) {
    const std::string message = e.what();
    EXPECT_NE(message.find("release.height_above_ground"), std::string::npos) << message;
    EXPECT_NE(message.find("atmosphere ends at 86000 m"), std::string::npos) << message;
  }
}

// A study on terrain keeps the ground it landed on in its results file (footprint/relief), and
// its map draws it: the hillshade and contour lines under the impacts, the legend naming the
// raster; a study on a level ground draws none.
TEST(TerrainGround, TheResultsKeepTheReliefAndTheMapDrawsIt) {
  const test::ScratchFolder dir("terrain-map");
  test::write_geotiff(
      (dir / "hill.tif").string(),
      {300,
       300,
       {kLongitude - 0.06, 0.0004, 0.0, kLatitude + 0.045, 0.0, -0.0003},
       "EPSG:4326",
       [](int i, int j) {
         return 600.0 +
                250.0 * std::exp(-(std::pow(i - 170.0, 2) + std::pow(j - 150.0, 2)) / 2000.0);
       },
       {},
       "m"});
  const std::string release = "altitude = 1500.0\n";
  for (const bool terrain : {true, false}) {
    const std::string name = terrain ? "hill" : "level";
    const std::string scenario = (dir / (name + ".toml")).string();
    std::ofstream(scenario) << scenario_over(
        terrain ? "terrain = \"hill.tif\"\n" : "ground = 600.0\n", release);
    const std::string h5 = (dir / (name + ".h5")).string(), svg = (dir / (name + ".svg")).string();
    ASSERT_EQ(test::run({"run", scenario, "-n", "200", "-o", h5, "--quiet"}).status, 0);
    const ResultsFile file = read_results(h5, false);
    EXPECT_EQ(file.record.relief.empty(), !terrain);
    ASSERT_EQ(test::run({"report", h5, "--svg", svg}).status, 0);
    std::ifstream in(svg);
    const std::string map((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    EXPECT_EQ(map.find("class=\"relief\"") != std::string::npos, terrain);
    EXPECT_EQ(map.find("data:image/png;base64,") != std::string::npos, terrain);
    EXPECT_EQ(map.find("data-level=") != std::string::npos, terrain);
    EXPECT_EQ(map.find("hillshade of hill.tif") != std::string::npos, terrain);
    if (terrain) {
      // The relief read back is the terrain under the frame: the hill's top is 850 m.
      const Relief& r = file.record.relief;
      float top = 0.0f;
      for (const float h : r.heights)
        if (!std::isnan(h)) top = std::max(top, h);
      EXPECT_NEAR(top, 850.0f, 1.0f);
      EXPECT_EQ(r.source, "hill.tif");
    }
  }
}

// Posts that hold no height a body could meet (infinite, or beyond the altitudes of strewn's
// air: a damaged post) are no height, like no data (found by a tester: flights "landed" on them
// with an infinite ground).
TEST(TerrainGround, PostsOutsideTheAirHaveNoHeight) {
  const test::ScratchFolder dir("terrain-spikes");
  const std::string path = (dir / "spikes.tif").string();
  test::write_geotiff(path, {40,
                             40,
                             {kLongitude - 0.02, 0.001, 0.0, kLatitude + 0.015, 0.0, -0.00075},
                             "EPSG:4326",
                             [](int i, int j) {
                               if (i == 20 && j == 20)
                                 return std::numeric_limits<double>::infinity();
                               if (i == 21 && j == 20) return 1e30;
                               if (i == 22 && j == 20) return -6000.0;
                               return 540.0;
                             },
                             {},
                             "m"});
  const TerrainSurface surface = read_terrain({path, kLatitude, kLongitude, 1000.0});
  EXPECT_EQ(surface.highest(), 540.0);
  EXPECT_EQ(surface.lowest(), 540.0);
}

// Rasters that cannot serve, and terrain keys that do not go together, are refused when the
// scenario is read, each with its key.
TEST(TerrainGround, BadTerrainIsRefusedWithItsKey) {
  const test::ScratchFolder dir("terrain-bad");
  { std::ofstream((dir / "junk.tif").string()) << "not a raster\n"; }
  test::write_geotiff(
      (dir / "nocrs.tif").string(),
      {20, 20, {0.0, 1.0, 0.0, 20.0, 0.0, -1.0}, "", [](int, int) { return 1.0; }, {}, ""});
  test::write_geotiff((dir / "far.tif").string(), {20,
                                                   20,
                                                   {10.0, 0.001, 0.0, 50.0, 0.0, -0.001},
                                                   "EPSG:4326",
                                                   [](int, int) { return 1.0; },
                                                   {},
                                                   ""});
  test::write_geotiff((dir / "feet.tif").string(),
                      {200,
                       200,
                       {kLongitude - 0.05, 0.0005, 0.0, kLatitude + 0.05, 0.0, -0.0005},
                       "EPSG:4326",
                       [](int, int) { return 1000.0; },
                       {},
                       "ft"});
  test::write_geotiff((dir / "empty.tif").string(),
                      {200,
                       200,
                       {kLongitude - 0.05, 0.0005, 0.0, kLatitude + 0.05, 0.0, -0.0005},
                       "EPSG:4326",
                       [](int, int) { return -9999.0; },
                       -9999.0,
                       "m"});
  test::write_geotiff((dir / "local.tif").string(),
                      {200,
                       200,
                       {-5000.0, 50.0, 0.0, 5000.0, 0.0, -50.0},
                       "LOCAL_CS[\"an engineering grid\",UNIT[\"metre\",1]]",
                       [](int, int) { return 100.0; },
                       {},
                       "m"});
  // Found by a tester: a FIFO made the reading wait for ever; a virtual raster may point at
  // memory or any file (refused as a format).
  ASSERT_EQ(::mkfifo((dir / "fifo.tif").string().c_str(), 0600), 0);
  std::ofstream((dir / "far.vrt").string())
      << "<VRTDataset rasterXSize=\"10\" rasterYSize=\"10\"><SRS>EPSG:4326</SRS>"
         "<GeoTransform>-33.8, 0.02, 0, 41.4, 0, -0.02</GeoTransform>"
         "<VRTRasterBand dataType=\"Float32\" band=\"1\"><SimpleSource><SourceFilename>"
      << (dir / "far.tif").string()
      << "</SourceFilename><SourceBand>1</SourceBand></SimpleSource></VRTRasterBand></VRTDataset>";
  const std::string release = "altitude = 2500.0\n";
  struct Case {
    std::string site, release, key, words;
  };
  for (const Case& c : std::vector<Case>{
           {"terrain = \"missing.tif\"\n", release, "site.terrain", "does not exist"},
           {"terrain = \"\"\n", release, "site.terrain", "is empty"},
           {"terrain = \"fifo.tif\"\n", release, "site.terrain", "not a regular file"},
           {"terrain = \".\"\n", release, "site.terrain", "not a regular file"},
           {"terrain = \"far.vrt\"\n", release, "site.terrain", "cannot be read"},
           {"terrain = \"MEM:::DATAPOINTER=0x1000,PIXELS=10,LINES=10\"\n", release, "site.terrain",
            "does not exist"},
           {"terrain = \"junk.tif\"\n", release, "site.terrain", "cannot be read"},
           {"terrain = \"nocrs.tif\"\n", release, "site.terrain", "reference system"},
           {"terrain = \"far.tif\"\n", release, "site.terrain", "does not cover the site"},
           {"terrain = \"feet.tif\"\n", release, "site.terrain", "not in metres"},
           {"terrain = \"empty.tif\"\n", release, "site.terrain", "no data only"},
           {"terrain = \"local.tif\"\n", release, "site.terrain", "not related to WGS 84"},
           {"terrain = \"far.tif\"\nground = 10.0\n", release, "site.ground", "terrain"},
           {"ground = 10.0\n", "altitude = 900.0\nheight_above_ground = 800.0\n",
            "release.altitude", "not both"},
       }) {
    try {
      (void)parse_scenario(scenario_over(c.site, c.release), (dir / "bad.toml").string());
      ADD_FAILURE() << c.site << " was accepted";
    } catch (const ScenarioError& e) {
      const std::string message = e.what();
      EXPECT_NE(message.find(c.key), std::string::npos) << message;
      EXPECT_NE(message.find(c.words), std::string::npos) << message;
    }
  }
  // `run` refuses it too before any flight, with status 2, and writes nothing.
  const std::string scenario = (dir / "missing.toml").string();
  std::ofstream(scenario) << scenario_over("terrain = \"missing.tif\"\n", release);
  const std::string h5 = (dir / "missing.h5").string();
  const test::CommandResult r = test::run({"run", scenario, "-n", "100", "-o", h5, "--quiet"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("site.terrain"), std::string::npos) << r.err;
  EXPECT_FALSE(std::filesystem::exists(h5));
}

// A raster that covers little more than the release: `check` warns that the nominal footprint
// reaches the edge of the terrain, and a study counts the flights that come down beyond it as
// failed (status off_terrain), with their number in the warnings.
TEST(TerrainGround, FlightsBeyondTheTerrainAreCountedAndNamed) {
  const test::ScratchFolder dir("terrain-edge");
  // About 330 m east and west of the origin: the bundles land about 500 m east of it.
  test::write_geotiff((dir / "small.tif").string(),
                      {8,
                       8,
                       {kLongitude - 0.004, 0.001, 0.0, kLatitude + 0.003, 0.0, -0.00075},
                       "EPSG:4326",
                       [](int, int) { return 540.0; },
                       {},
                       "m"});
  const std::string text = scenario_over("terrain = \"small.tif\"\n", "altitude = 1500.0\n");
  const Scenario s = parse_scenario(text, (dir / "edge.toml").string());
  ASSERT_FALSE(s.warnings.empty());
  EXPECT_NE(s.warnings[0].find("beyond the terrain"), std::string::npos) << s.warnings[0];
  const std::string scenario = (dir / "edge.toml").string();
  std::ofstream(scenario) << text;
  const std::string h5 = (dir / "edge.h5").string();
  const test::CommandResult r =
      test::run({"run", scenario, "-n", "200", "-o", h5, "--quiet", "--json"});
  ASSERT_EQ(r.status, 0) << r.err;
  const ResultsFile file = read_results(h5, true);
  std::uint64_t off = 0;
  for (const auto status : file.columns.status)
    off += status == static_cast<std::uint8_t>(FlightStatus::off_terrain);
  EXPECT_GT(off, 150u);
  EXPECT_EQ(file.record.failed, off);
  bool named = false;
  for (const auto& w : file.record.range_warnings)
    named = named || (w.kind == "off_terrain" && w.count == off);
  EXPECT_TRUE(named);
  EXPECT_NE(r.out.find("status off_terrain; counted as failed"), std::string::npos);
}

}  // namespace
}  // namespace strewn
