// Extreme but valid inputs (tests/data/extreme/): 10-micrometre droplets in shear, a tonne from
// 40 km, a Mach 3 release, calm air, an 80 m/s jet, a canopy opening 10 m above the ground, a
// body lighter than air. Each study ends (the ctest timeout bounds it), every row is finite with
// a known status, and no output (summary, CSV, map, page) holds a NaN or an infinity.
#include <gtest/gtest.h>

#include <unistd.h>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>

#include "app/commands.hpp"
#include "command_line.hpp"
#include "store/results_file.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;

using test::slurp;

// A NaN or an infinity printed as a word ("nan", "-inf", "Infinity"), not inside other words
// ("Provenance") nor as the HTML entity &infin; for an undetermined bound, which is a statement.
bool has_non_finite_text(const std::string& text) {
  static const std::regex word(R"((^|[^A-Za-z&])(nan|inf|infinity)([^A-Za-z;]|$))",
                               std::regex::icase);
  return std::regex_search(text, word);
}

class Extreme : public ::testing::TestWithParam<std::string> {};

TEST_P(Extreme, FiniteResultsOrAnExplicitStatus) {
  const auto dir = std::filesystem::temp_directory_path() /
                   ("strewn-extreme-" + std::to_string(::getpid()) + "-" + GetParam());
  std::filesystem::create_directories(dir);
  const std::string scenario = STREWN_SOURCE_DIR "/tests/data/extreme/" + GetParam() + ".toml";
  const auto file = (dir / "study.h5").string();
  const CommandResult r = run({"run", scenario, "-n", "400", "-o", file, "--quiet", "--json"});
  // Landed, or failed flights explicitly counted (status 3 when above study.max_failed).
  ASSERT_TRUE(r.status == 0 || r.status == 3) << r.err;
  EXPECT_FALSE(has_non_finite_text(r.out)) << r.out.substr(0, 2000);
  // The terminal summary too (found by a tester: "CEP inf m", "0.0 x 0.0" ellipses).
  const CommandResult text = run({"report", file});
  EXPECT_FALSE(has_non_finite_text(text.out)) << text.out.substr(0, 2000);
  const ResultsFile f = read_results(file);
  const StudyColumns& c = f.columns;
  ASSERT_EQ(c.rows(), 400u);
  for (std::size_t i = 0; i < c.rows(); ++i) {
    ASSERT_TRUE(std::isfinite(c.east[i]) && std::isfinite(c.north[i])) << i;
    ASSERT_TRUE(std::isfinite(c.time[i]) && std::isfinite(c.speed[i]) && std::isfinite(c.energy[i]))
        << i;
    ASSERT_LE(c.status[i], 5) << i;  // a FlightStatus
  }
  const auto svg = dir / "map.svg", html = dir / "page.html", csv = dir / "figures.csv";
  ASSERT_EQ(
      run({"report", file, "--svg", svg.string(), "--html", html.string(), "--csv", csv.string()})
          .status,
      0);
  EXPECT_FALSE(has_non_finite_text(slurp(svg)));
  EXPECT_FALSE(has_non_finite_text(slurp(html)));
  std::filesystem::remove_all(dir);
}

INSTANTIATE_TEST_SUITE_P(Robustness, Extreme,
                         ::testing::Values("droplet-10um", "tonne-from-40km", "mach3-release",
                                           "calm-air", "jet-80ms", "canopy-fails-low",
                                           "lighter-than-air"),
                         [](const auto& test) {
                           std::string name = test.param;
                           for (char& ch : name)
                             if (ch == '-') ch = '_';
                           return name;
                         });

}  // namespace
}  // namespace strewn
