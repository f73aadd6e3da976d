// `strewn report` end to end: the summary read back equals the one `run` printed; the GeoJSON is
// RFC 7946 (closed, counter-clockwise rings in longitude/latitude) and places the containment
// circles at their radius on the ellipsoid (GeographicLib's geodesic as the reference); results
// files that are missing, empty, truncated, of another format version or not HDF5 are refused
// with status 2; a study grown to a target width equals a straight run of the same samples.
#include <gtest/gtest.h>

#include <H5Cpp.h>
#include <unistd.h>

#include <GeographicLib/Geodesic.hpp>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "app/commands.hpp"
#include "command_line.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;

using test::slurp;

class Report : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    // One folder per process: ctest runs each test of this suite in its own process, in parallel.
    dir_ = std::filesystem::temp_directory_path() /
           ("strewn-report-test-" + std::to_string(::getpid()));
    std::filesystem::remove_all(dir_);
    std::filesystem::create_directories(dir_);
    file_ = (dir_ / "ridge.h5").string();
    const CommandResult r = run({"run", STREWN_SOURCE_DIR "/inputs/ridge-drop.toml", "-n", "3000",
                                 "-o", file_, "--quiet", "--json"});
    ASSERT_EQ(r.status, 0) << r.err;
    run_json_ = nlohmann::json::parse(r.out);
  }
  static void TearDownTestSuite() { std::filesystem::remove_all(dir_); }
  static inline std::filesystem::path dir_;
  static inline std::string file_;
  static inline nlohmann::json run_json_;
};

TEST_F(Report, JsonReadBackEqualsTheRunSummary) {
  const CommandResult r = run({"report", file_, "--json"});
  ASSERT_EQ(r.status, 0) << r.err;
  auto back = nlohmann::json::parse(r.out);
  ASSERT_TRUE(back.contains("provenance"));
  EXPECT_EQ(back["provenance"]["file"], file_);
  back.erase("provenance");
  EXPECT_EQ(back, run_json_);
  // The interface's names.
  const auto& c = back["footprint"]["bundle"]["containment"][2];
  EXPECT_EQ(c["level"], 0.99);
  EXPECT_TRUE(c.contains("radius") && c.contains("radius_upper") && c.contains("confidence"));
  EXPECT_TRUE(back["footprint"]["all"]["energy"].contains("exceed_upper"));
  ASSERT_EQ(back["rules"].size(), 1u);
  for (const char* key : {"rule", "value", "upper", "limit", "status"})
    EXPECT_TRUE(back["rules"][0].contains(key)) << key;
  EXPECT_FALSE(back["cautions"].empty());
  // The terminal summary carries the table, the rules and the cautions.
  const CommandResult text = run({"report", file_});
  EXPECT_NE(text.out.find("upper bound m"), std::string::npos);
  EXPECT_NE(text.out.find("reported, not decided"), std::string::npos);
  EXPECT_NE(text.out.find("caution"), std::string::npos);
}

// Signed area of a lon/lat ring (shoelace): positive when counter-clockwise.
double signed_area(const nlohmann::json& ring) {
  double twice = 0.0;
  for (std::size_t i = 0; i + 1 < ring.size(); ++i)
    twice += ring[i][0].get<double>() * ring[i + 1][1].get<double>() -
             ring[i + 1][0].get<double>() * ring[i][1].get<double>();
  return 0.5 * twice;
}

TEST_F(Report, GeoJsonRingsAreClosedCounterClockwiseAndOnTheEllipsoid) {
  const auto geojson = dir_ / "ridge.geojson";
  const CommandResult r = run({"report", file_, "--geojson", geojson.string(), "--impacts"});
  ASSERT_EQ(r.status, 0) << r.err;
  const auto j = nlohmann::json::parse(slurp(geojson));
  EXPECT_EQ(j["type"], "FeatureCollection");
  int polygons = 0, circles = 0;
  std::size_t impacts = 0;
  nlohmann::json centre;
  for (const auto& f : j["features"])
    if (f["properties"]["kind"] == "centre" && f["properties"]["group"] == "all")
      centre = f["geometry"]["coordinates"];
  ASSERT_FALSE(centre.is_null());
  const auto& geodesic = GeographicLib::Geodesic::WGS84();
  for (const auto& f : j["features"]) {
    const auto& g = f["geometry"];
    if (g["type"] == "Polygon") {
      ++polygons;
      const auto& ring = g["coordinates"][0];
      ASSERT_GE(ring.size(), 4u);
      EXPECT_EQ(ring.front(), ring.back());                         // closed (RFC 7946, 3.1.6)
      EXPECT_GT(signed_area(ring), 0.0) << f["properties"].dump();  // counter-clockwise
      if (f["properties"]["kind"] == "containment_circle" && f["properties"]["group"] == "all") {
        ++circles;
        // Every vertex lies at the radius from the centre along the ellipsoid (GeographicLib's
        // geodesic), within 0.1 % (the local tangent plane departs from it by far less at a
        // few kilometres) plus the 1e-7 degree rounding.
        const double radius = f["properties"]["radius_m"].get<double>();
        for (std::size_t k = 0; k < ring.size(); k += 16) {
          double distance = 0.0;
          geodesic.Inverse(centre[1].get<double>(), centre[0].get<double>(),
                           ring[k][1].get<double>(), ring[k][0].get<double>(), distance);
          EXPECT_NEAR(distance, radius, 1e-3 * radius + 0.03);
        }
      }
    }
    if (g["type"] == "MultiPoint") impacts += g["coordinates"].size();
  }
  EXPECT_GE(polygons, 12);  // polygons, circles and ellipses of bundle and all
  EXPECT_EQ(circles, 4);
  EXPECT_EQ(impacts, run_json_["completed"].get<std::size_t>());
}

TEST_F(Report, WritesMapPageAndTableFiles) {
  const auto svg = dir_ / "map.svg", html = dir_ / "page.html", csv = dir_ / "figures.csv";
  const CommandResult r =
      run({"report", file_, "--svg", svg.string(), "--html", html.string(), "--csv", csv.string()});
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string map = slurp(svg), page = slurp(html), table = slurp(csv);
  for (const char* part : {"<svg", "id=\"density\"", "hazard-polygon", "containment-bound",
                           "release-track", "north-arrow", "scale-bar", "legend"})
    EXPECT_NE(map.find(part), std::string::npos) << part;
  for (const char* part : {"<svg", "id=\"rules\"", "id=\"containment\"", "id=\"sensitivity\"",
                           "id=\"provenance\"", "id=\"cautions\"", "responsible authority"})
    EXPECT_NE(page.find(part), std::string::npos) << part;
  EXPECT_EQ(page.find("src=\"http"), std::string::npos);  // self-contained
  EXPECT_EQ(table.rfind("group,figure,level,estimate", 0), 0u);
  EXPECT_NE(table.find("\"all\",containment_radius,0.99,"), std::string::npos);
  // GeoJSON needs the site's coordinates: a scenario without them is refused with status 2.
  const auto local = (dir_ / "local.h5").string();
  ASSERT_EQ(run({"run", STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml", "-n", "200", "-o",
                 local, "--quiet"})
                .status,
            0);
  const CommandResult refused = run({"report", local, "--geojson", (dir_ / "x.geojson").string()});
  EXPECT_EQ(refused.status, 2);
  EXPECT_NE(refused.err.find("site.latitude"), std::string::npos) << refused.err;
  EXPECT_FALSE(std::filesystem::exists(dir_ / "x.geojson"));
}

TEST_F(Report, RefusesBadResultsFilesWithStatusTwo) {
  auto refused = [](const std::string& path, const std::string& words) {
    const CommandResult r = run({"report", path, "--json"});
    EXPECT_EQ(r.status, 2) << path;
    EXPECT_NE(r.err.find(words), std::string::npos) << r.err;
    EXPECT_TRUE(r.out.empty());
  };
  refused((dir_ / "missing.h5").string(), "no such results file");
  std::ofstream(dir_ / "text.h5") << "title = \"not a results file\"\n";
  refused((dir_ / "text.h5").string(), "not an HDF5 file");
  std::ofstream(dir_ / "empty.h5").close();
  refused((dir_ / "empty.h5").string(), "not an HDF5 file");
  refused(dir_.string(), "is a folder");
  // Truncated: the first half of a valid file.
  {
    const std::string whole = slurp(file_);
    std::ofstream(dir_ / "truncated.h5", std::ios::binary) << whole.substr(0, whole.size() / 2);
    const CommandResult r = run({"report", (dir_ / "truncated.h5").string()});
    EXPECT_EQ(r.status, 2);
    EXPECT_FALSE(r.err.empty());
  }
  // Another format version.
  {
    std::filesystem::copy_file(file_, dir_ / "old.h5");
    H5::H5File old((dir_ / "old.h5").string(), H5F_ACC_RDWR);
    old.removeAttr("format_version");
    const int version = 1;
    old.createAttribute("format_version", H5::PredType::NATIVE_INT, H5::DataSpace())
        .write(H5::PredType::NATIVE_INT, &version);
  }
  refused((dir_ / "old.h5").string(), "format version 1");
  // An HDF5 file that strewn did not write.
  { H5::H5File other((dir_ / "other.h5").string(), H5F_ACC_TRUNC); }
  refused((dir_ / "other.h5").string(), "not a strewn results file");
}

// study.target_width: parts of samples are added until the widest containment bound is within
// the target; the rows continue the sample indices, so the result is the straight run of the
// same number of samples.
TEST(ReportConvergence, GrownStudyEqualsAStraightRun) {
  const auto dir = std::filesystem::temp_directory_path() / "strewn-grow-test";
  std::filesystem::create_directories(dir);
  std::string text = slurp(STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml");
  const auto grown = (dir / "grown.toml").string(), straight = (dir / "straight.toml").string();
  std::ofstream(straight) << text;
  std::ofstream(grown) << text
                       << "\n[study]\nsamples = 400\ntarget_width = 0.04\nlevels = [0.5, "
                          "0.9]\nmax_samples = 30000\n";
  const CommandResult g = run({"run", grown, "-o", (dir / "g.h5").string(), "--quiet", "--json"});
  ASSERT_EQ(g.status, 0) << g.err;
  const auto gj = nlohmann::json::parse(g.out);
  EXPECT_GT(gj["convergence"]["rounds"].get<int>(), 1);
  const auto samples = gj["samples"].get<std::uint64_t>();
  EXPECT_TRUE(gj["convergence"]["met"].get<bool>() || samples == 30000u);
  if (gj["convergence"]["met"].get<bool>()) {
    EXPECT_LE(gj["convergence"]["widest_relative_width"].get<double>(), 0.04);
  }
  // The same samples in one go (levels given on the command line's scenario copy).
  std::ofstream(straight) << text << "\n[study]\nlevels = [0.5, 0.9]\n";
  const CommandResult s = run({"run", straight, "-n", std::to_string(samples), "-o",
                               (dir / "s.h5").string(), "--quiet", "--json"});
  ASSERT_EQ(s.status, 0) << s.err;
  const auto sj = nlohmann::json::parse(s.out);
  EXPECT_EQ(gj["footprint"], sj["footprint"]);
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace strewn
