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
#include <memory>
#include <nlohmann/json.hpp>
#include <sstream>

#include "app/commands.hpp"
#include "command_line.hpp"
#include "report/report_files.hpp"
#include "store/file_seal.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;

using test::slurp;

class Report : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    // A folder of its own: ctest runs each test of this suite in its own process, in parallel.
    folder_ = std::make_unique<test::ScratchFolder>("report-test");
    dir_ = folder_->path();
    file_ = (dir_ / "ridge.h5").string();
    const CommandResult r = run({"run", STREWN_SOURCE_DIR "/inputs/ridge-drop.toml", "-n", "3000",
                                 "-o", file_, "--quiet", "--json"});
    ASSERT_EQ(r.status, 0) << r.err;
    run_json_ = nlohmann::json::parse(r.out);
  }
  static void TearDownTestSuite() { folder_.reset(); }
  static inline std::unique_ptr<test::ScratchFolder> folder_;
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
  int polygons = 0, circles = 0, zones = 0;
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
      // The planned zone of the ridge drop's rule (900 m), drawn for a GIS like the figures.
      if (f["properties"]["kind"] == "rule_zone") {
        ++zones;
        EXPECT_EQ(f["properties"]["radius_m"], 900.0);
        EXPECT_EQ(f["properties"]["status"], "exceeds");
        double distance = 0.0;
        geodesic.Inverse(centre[1].get<double>(), centre[0].get<double>(), ring[0][1].get<double>(),
                         ring[0][0].get<double>(), distance);
        EXPECT_NEAR(distance, 900.0, 0.9 + 0.03);
      }
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
  EXPECT_EQ(zones, 1);
  EXPECT_EQ(impacts, run_json_["completed"].get<std::size_t>());
}

TEST_F(Report, WritesMapPageAndTableFiles) {
  const auto svg = dir_ / "map.svg", html = dir_ / "page.html", csv = dir_ / "figures.csv";
  const CommandResult r =
      run({"report", file_, "--svg", svg.string(), "--html", html.string(), "--csv", csv.string()});
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string map = slurp(svg), page = slurp(html), table = slurp(csv);
  for (const char* part :
       {"<svg", "class=\"density\"", "hazard-polygon", "containment-bound", "release-track",
        "north-arrow", "scale-bar", "legend", "class=\"ticks\""})
    EXPECT_NE(map.find(part), std::string::npos) << part;
  for (const char* part :
       {"<svg", "id=\"rules\"", "id=\"containment\"", "id=\"sensitivity\"", "id=\"provenance\"",
        "id=\"cautions\"", "id=\"warnings\"", "responsible authority"})
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
  // Another format version, in a file sealed again after the change (else its seal refuses it
  // first, as the next check shows).
  {
    std::filesystem::copy_file(file_, dir_ / "old.h5");
    {
      H5::H5File old((dir_ / "old.h5").string(), H5F_ACC_RDWR);
      old.removeAttr("format_version");
      const int version = 1;
      old.createAttribute("format_version", H5::PredType::NATIVE_INT, H5::DataSpace())
          .write(H5::PredType::NATIVE_INT, &version);
    }
    std::filesystem::copy_file(dir_ / "old.h5", dir_ / "changed.h5");
    refused((dir_ / "changed.h5").string(), "strewn sealed it with");
    seal_file((dir_ / "old.h5").string());
  }
  refused((dir_ / "old.h5").string(), "format version 1");
  // A crafted file, sealed again, whose dataset declares 2^36 values that are not there: refused
  // before anything is allocated for them.
  {
    std::filesystem::copy_file(file_, dir_ / "huge.h5");
    {
      H5::H5File huge((dir_ / "huge.h5").string(), H5F_ACC_RDWR);
      huge.unlink("footprint/all/containment/level");
      const hsize_t rows = hsize_t{1} << 36, chunk = 1024;
      H5::DSetCreatPropList properties;
      properties.setChunk(1, &chunk);
      huge.createDataSet("footprint/all/containment/level", H5::PredType::NATIVE_DOUBLE,
                         H5::DataSpace(1, &rows), properties);
    }
    seal_file((dir_ / "huge.h5").string());
  }
  refused((dir_ / "huge.h5").string(), "more than the file holds");
  // An HDF5 file that strewn did not write (no seal), and one sealed but without strewn's layout.
  { H5::H5File other((dir_ / "other.h5").string(), H5F_ACC_TRUNC); }
  refused((dir_ / "other.h5").string(), "has no strewn seal");
  { H5::H5File other((dir_ / "sealed.h5").string(), H5F_ACC_TRUNC, sealed_file_properties()); }
  seal_file((dir_ / "sealed.h5").string());
  refused((dir_ / "sealed.h5").string(), "not a strewn results file");
}

// study.target_width: parts of samples are added until the widest containment bound is within
// the target; the rows continue the sample indices, so the result is the straight run of the
// same number of samples.
TEST(ReportConvergence, GrownStudyEqualsAStraightRun) {
  const test::ScratchFolder dir("grow-test");
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
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// The numbers of an SVG element's attribute, e.g. the x of every <rect class="...">.
std::vector<double> attribute_values(const std::string& svg, const std::string& element,
                                     const std::string& attribute) {
  std::vector<double> out;
  for (std::size_t at = svg.find(element); at != std::string::npos;
       at = svg.find(element, at + 1)) {
    const std::size_t end = svg.find('>', at);
    const std::string tag = svg.substr(at, end - at);
    const std::size_t a = tag.find(" " + attribute + "=\"");
    if (a != std::string::npos) out.push_back(std::stod(tag.substr(a + attribute.size() + 3)));
  }
  return out;
}

// The map and page answer "how big, centred where" at a glance: each rule's zone drawn and
// labelled with its radius and status, the containment circles labelled with their level,
// latitude and longitude on the frame, nothing laid over the map panel but the map (legend,
// north arrow and scale bar beside it), no impact cell cut by the frame, a map per body beside
// the map of all, every warning on the page, the centres in words with their coordinates.
TEST(ReportMaps, AnswerHowBigAndCentredWhere) {
  const test::ScratchFolder dir("report-maps");
  const auto h5 = (dir / "debris.h5").string();
  ASSERT_EQ(run({"run", STREWN_SOURCE_DIR "/inputs/test-range-debris.toml", "-n", "2000", "-o", h5,
                 "--quiet"})
                .status,
            0);
  const auto svg = dir / "map.svg", html = dir / "page.html";
  const CommandResult r = run({"report", h5, "--svg", svg.string(), "--html", html.string()});
  ASSERT_EQ(r.status, 0) << r.err;
  // A map per body beside the map of all, named after the bodies.
  for (const char* body : {"motor_case", "avionics_box", "skin_panel"}) {
    const auto own = dir / ("map-" + std::string(body) + ".svg");
    EXPECT_TRUE(std::filesystem::exists(own)) << own;
    EXPECT_NE(r.out.find(own.string()), std::string::npos);
  }
  const std::string map = slurp(svg), page = slurp(html);
  // The rule's zone, about the centre of all, labelled with its radius and status.
  EXPECT_NE(map.find("class=\"rule-zone\""), std::string::npos);
  EXPECT_NE(map.find("zone 6 km: "), std::string::npos);
  // The containment bound circles labelled with their levels.
  for (const char* level : {">50 %<", ">90 %<", ">99 %<", ">99.9 %<"})
    EXPECT_NE(map.find(level), std::string::npos) << level;
  // Latitude and longitude on the frame (the site is at 22.4 S, 96.8 W).
  EXPECT_NE(map.find("\u00b0S<"), std::string::npos);
  EXPECT_NE(map.find("\u00b0W<"), std::string::npos);
  // The panel is x in [92, 732], y in [64, 704] (map_svg.cpp): every density cell lies within it
  // (none cut by the frame), the release point and track too; the legend, north arrow and scale
  // bar lie beside it.
  constexpr double kLeft = 92.0, kRight = 732.0, kTop = 64.0, kBottom = 704.0;
  const std::string density = map.substr(map.find("class=\"density\""));
  const auto xs = attribute_values(density.substr(0, density.find("</g>")), "<rect", "x");
  const auto ys = attribute_values(density.substr(0, density.find("</g>")), "<rect", "y");
  ASSERT_FALSE(xs.empty());
  for (double x : xs) {
    EXPECT_GE(x, kLeft - 0.5);
    EXPECT_LE(x, kRight);
  }
  for (double y : ys) {
    EXPECT_GE(y, kTop - 0.5);
    EXPECT_LE(y, kBottom);
  }
  for (double x : attribute_values(map, "<line class=\"release-track\"", "x1")) {
    EXPECT_GT(x, kLeft);
    EXPECT_LT(x, kRight);
  }
  for (const char* beside : {"class=\"legend\"", "class=\"north-arrow\"", "class=\"scale-bar\""}) {
    const std::string part = map.substr(map.find(beside));
    const auto x = attribute_values(part.substr(0, part.find("</g>")), "<text", "x");
    ASSERT_FALSE(x.empty()) << beside;
    EXPECT_GT(*std::min_element(x.begin(), x.end()), kRight) << beside;
  }
  // Found by a user: longitude labels ran into each other on a narrow map. The tick labels along
  // each edge stand apart by more than a label's width.
  const std::string ticks = map.substr(map.find("class=\"ticks\""));
  std::vector<double> along;
  for (std::size_t at = ticks.find("text-anchor=\"middle\">"); at != std::string::npos;
       at = ticks.find("text-anchor=\"middle\">", at + 1)) {
    const std::size_t x = ticks.rfind(" x=\"", at);
    along.push_back(std::stod(ticks.substr(x + 4)));
  }
  ASSERT_GE(along.size(), 2u);
  for (std::size_t k = 1; k < along.size(); ++k) EXPECT_GT(along[k] - along[k - 1], 60.0);
  // Energies of tonnes of debris read without exponents (16090, not 1.609e+04).
  const std::string energy = page.substr(page.find("<table id=\"energy\">"));
  EXPECT_EQ(energy.substr(0, energy.find("</table>")).find("e+0"), std::string::npos);
  // The page: a map of all and one per body, every warning, the centres' coordinates, which
  // centre each rule's zone is about.
  std::size_t maps = 0;
  for (std::size_t at = page.find("<svg"); at != std::string::npos; at = page.find("<svg", at + 1))
    ++maps;
  EXPECT_EQ(maps, 4u);
  const auto summary = nlohmann::json::parse(run({"report", h5, "--json"}).out);
  for (const auto& w : summary["warnings"])
    EXPECT_NE(page.find(w.get<std::string>().substr(0, 40)), std::string::npos) << w;
  EXPECT_NE(page.find("about the mean impact of one object of the release"), std::string::npos);
  EXPECT_NE(page.find(" S, "), std::string::npos);  // a latitude in words
}

TEST(ReportMaps, OneBodyIsNotRepeatedAsAll) {
  const test::ScratchFolder dir("report-one");
  const auto h5 = (dir / "ridge.h5").string(), html = (dir / "ridge.html").string();
  ASSERT_EQ(
      run({"run", STREWN_SOURCE_DIR "/inputs/ridge-drop.toml", "-n", "500", "-o", h5, "--quiet"})
          .status,
      0);
  ASSERT_EQ(run({"report", h5, "--html", html}).status, 0);
  const std::string page = slurp(html);
  EXPECT_EQ(page.find("<td class=\"name\">all</td>"), std::string::npos);
  EXPECT_NE(page.find("<td class=\"name\">bundle</td>"), std::string::npos);
  const CommandResult text = run({"report", h5});
  EXPECT_EQ(text.out.find("\nall"), std::string::npos) << text.out;
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// Found by a tester: a control character in a title or a body's name went raw into the SVG map,
// which then did not parse. XML 1.0 admits none but tab, line feed and carriage return.
TEST(ReportMaps, ControlCharactersNeverReachTheMarkup) {
  const std::string escaped = escape_markup(std::string("t\x01i<t>l&e\x1f\"'\t\n"));
  for (char c : escaped) {
    const auto byte = static_cast<unsigned char>(c);
    EXPECT_TRUE(byte >= 0x20 || c == '\t' || c == '\n') << static_cast<int>(byte);
  }
  EXPECT_EQ(escaped.find('<'), std::string::npos);
  EXPECT_NE(escaped.find("&lt;t&gt;"), std::string::npos);
}

}  // namespace
}  // namespace strewn
