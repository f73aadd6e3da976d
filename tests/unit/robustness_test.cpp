// Extreme but valid inputs (tests/data/extreme/): 10-micrometre droplets in shear, a tonne from
// 40 km, a Mach 3 release, calm air, an 80 m/s jet, a canopy opening 10 m above the ground, a
// body lighter than air. Each study ends (the ctest timeout bounds it), every sample ends with the
// status its case must give, every row is finite, and no output (summary, CSV, map, page) holds a
// NaN or an infinity.
//
// And every way a single flight can end (FlightStatus), each reached through fly() and asserted.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <ostream>
#include <regex>
#include <sstream>

#include "app/commands.hpp"
#include "command_line.hpp"
#include "flight/flight.hpp"
#include "store/results_file.hpp"
#include "support.hpp"

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

// One extreme case: its scenario, the status every one of its samples must end with, and the
// exit status of `strewn run` (3 when more flights failed than study.max_failed allows).
struct ExtremeCase {
  std::string name;
  FlightStatus status;
  int exit_status;
};
void PrintTo(const ExtremeCase& c, std::ostream* out) {
  *out << c.name;
}

class Extreme : public ::testing::TestWithParam<ExtremeCase> {};

TEST_P(Extreme, FiniteResultsAndTheExpectedStatus) {
  const ExtremeCase& expected = GetParam();
  const test::ScratchFolder dir("extreme-" + expected.name);
  const std::string scenario = STREWN_SOURCE_DIR "/tests/data/extreme/" + expected.name + ".toml";
  const auto file = (dir / "study.h5").string();
  const CommandResult r = run({"run", scenario, "-n", "400", "-o", file, "--quiet", "--json"});
  ASSERT_EQ(r.status, expected.exit_status) << r.err;
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
    ASSERT_EQ(c.status[i], static_cast<std::uint8_t>(expected.status))
        << "sample " << i << ": " << to_string(static_cast<FlightStatus>(c.status[i]));
  }
  const auto svg = dir / "map.svg", html = dir / "page.html", csv = dir / "figures.csv";
  ASSERT_EQ(
      run({"report", file, "--svg", svg.string(), "--html", html.string(), "--csv", csv.string()})
          .status,
      0);
  EXPECT_FALSE(has_non_finite_text(slurp(svg)));
  EXPECT_FALSE(has_non_finite_text(slurp(html)));
}

// What each case must give. The droplets settle at about 3 mm/s (Stokes' law) and land after some
// 18 hours aloft, well within the flight-time cap; the tonne, the Mach 3 fragments, the box in
// calm air, the canister under the jet and the crate whose canopy opens at 10 m or fails all fall
// to the ground. The envelope (10 to 20 g) displaces 0.05 m^3 of air, some 61 g at the ground
// (1.225 kg/m^3, U.S. Standard Atmosphere 1976): buoyancy beats its weight (Archimedes'
// principle), so every sample floats and the run ends with status 3 (all flights failed).
INSTANTIATE_TEST_SUITE_P(Robustness, Extreme,
                         ::testing::Values(ExtremeCase{"droplet-10um", FlightStatus::landed, 0},
                                           ExtremeCase{"tonne-from-40km", FlightStatus::landed, 0},
                                           ExtremeCase{"mach3-release", FlightStatus::landed, 0},
                                           ExtremeCase{"calm-air", FlightStatus::landed, 0},
                                           ExtremeCase{"jet-80ms", FlightStatus::landed, 0},
                                           ExtremeCase{"canopy-fails-low", FlightStatus::landed, 0},
                                           ExtremeCase{"lighter-than-air", FlightStatus::floats,
                                                       3}),
                         [](const auto& test) {
                           std::string name = test.param.name;
                           for (char& ch : name)
                             if (ch == '-') ch = '_';
                           return name;
                         });

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// Every way a flight ends, through fly(). The flight cut short: a 20 kg box released at 1500 m
// and 30 m/s into a breeze, in the standard atmosphere, which lands after about 50 s when nothing
// stops it.
struct BoxDrop {
  Medium air = Medium::us1976();
  WindProfile wind{{{0.0, 6.0, 250.0}}, 0.0};
  Body box = test::area_body(20.0, 1.05, 0.3);
  ReleaseState release = test::release_at(0, 0, 1500.0, 30.0, 0, 0);

  [[nodiscard]] FlightResult fly_with(const FlightOptions& options) const {
    const Environment environment{&air, {}, &wind, 0.0};
    return fly(box, environment, release, options);
  }
};

TEST(FlightEnds, MoreStepsThanTheCapEndWithStepLimit) {
  const BoxDrop drop;
  const FlightResult whole = drop.fly_with({});
  ASSERT_EQ(whole.status, FlightStatus::landed);
  FlightOptions options;
  options.max_steps = 5;
  ASSERT_GT(whole.steps, options.max_steps);  // the cap binds
  const FlightResult cut = drop.fly_with(options);
  EXPECT_EQ(cut.status, FlightStatus::step_limit);
  EXPECT_EQ(cut.steps, options.max_steps + 1);  // ended on the first step past the cap
  EXPECT_LT(cut.time, whole.time);
  EXPECT_GT(cut.position.z(), 0.0);  // where it was stopped, still aloft
}

TEST(FlightEnds, AloftAtTheTimeCapEndsWithTimeLimit) {
  const BoxDrop drop;
  FlightOptions options;
  options.max_time = 5.0;
  const FlightResult cut = drop.fly_with(options);
  EXPECT_EQ(cut.status, FlightStatus::time_limit);
  EXPECT_DOUBLE_EQ(cut.time, options.max_time);  // the state at the cap
  EXPECT_GT(cut.position.z(), 0.0);
  EXPECT_LT(cut.position.z(), drop.release.position.z());

  // The same in the quasi-steady form: a 40 um droplet from 15 m settles at about 5 cm/s and
  // needs some 5 minutes; after its release transient (milliseconds) it flies in that form.
  const Medium air = Medium::us1976();
  const WindProfile calm;
  const Environment environment{&air, {}, &calm, 0.0};
  const Body drop40 = test::round_body(SphereDrag(40e-6), 998.2);
  const ReleaseState release = test::release_at(0, 0, 15.0, 1.0, 0, 0);
  const FlightResult whole = fly(drop40, environment, release);
  ASSERT_EQ(whole.status, FlightStatus::landed);
  ASSERT_TRUE(whole.quasi_steady);
  FlightOptions minute;
  minute.max_time = 60.0;
  ASSERT_LT(minute.max_time, whole.time);
  const FlightResult settling = fly(drop40, environment, release, minute);
  EXPECT_EQ(settling.status, FlightStatus::time_limit);
  EXPECT_TRUE(settling.quasi_steady);
  EXPECT_DOUBLE_EQ(settling.time, minute.max_time);
  EXPECT_GT(settling.position.z(), 0.0);
}

// A tolerance of 1e-20 m, far below what doubles resolve on an altitude of 1500 m (they lie
// 2.3e-13 m apart there: IEEE 754 binary64, a 53-bit significand): the controller cannot meet it
// and gives up rather than shrink the step for ever.
TEST(FlightEnds, AToleranceNoDoubleCanMeetEndsWithStepTooSmall) {
  const BoxDrop drop;
  const FlightResult whole = drop.fly_with({});
  ASSERT_EQ(whole.status, FlightStatus::landed);
  FlightOptions options;
  options.tolerance = 1e-20;
  const FlightResult stuck = drop.fly_with(options);
  EXPECT_EQ(stuck.status, FlightStatus::step_too_small);
  EXPECT_LT(stuck.time, whole.time);
  EXPECT_GT(stuck.position.z(), 0.0);
  EXPECT_TRUE(stuck.position.allFinite());
}

// A release state that is not a number or infinite, handed to fly() directly (a scenario refuses
// it before any flight).
TEST(FlightEnds, ANonFiniteReleaseEndsWithNonFinite) {
  const BoxDrop drop;
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  constexpr double kInfinity = std::numeric_limits<double>::infinity();
  const Environment environment{&drop.air, {}, &drop.wind, 0.0};
  for (const ReleaseState& release :
       {test::release_at(0, 0, 1500.0, kNaN, 0, 0), test::release_at(0, 0, kInfinity, 30, 0, 0),
        test::release_at(kNaN, 0, 1500.0, 30, 0, 0),
        test::release_at(0, 0, 1500.0, 0, 0, -kInfinity)}) {
    const FlightResult r = fly(drop.box, environment, release);
    EXPECT_EQ(r.status, FlightStatus::non_finite)
        << release.position.transpose() << " / " << release.velocity.transpose();
    EXPECT_EQ(r.steps, 0);
  }
}

// An envelope of 15 g holding 0.05 m^3 displaces about 61 g of air at the ground (1.225 kg/m^3,
// U.S. Standard Atmosphere 1976): buoyancy beats its weight (Archimedes' principle) and it can
// never come down. Said at once, with the state left at the release. The same envelope at 100 g
// is heavier than the air it displaces and lands.
TEST(FlightEnds, LighterThanTheAirAtTheGroundFloats) {
  const Medium air = Medium::us1976();
  const WindProfile wind({{0.0, 3.0, 90.0}}, 0.0);
  const Environment environment{&air, {}, &wind, 0.0};
  Body envelope = test::area_body(0.015, 0.5, 0.3);
  envelope.volume = 0.05;
  const ReleaseState release = test::release_at(10.0, -20.0, 300.0, 2.0, 0, 0);
  const FlightResult r = fly(envelope, environment, release);
  EXPECT_EQ(r.status, FlightStatus::floats);
  EXPECT_EQ(r.time, 0.0);
  EXPECT_EQ(r.steps, 0);
  EXPECT_EQ(r.position, release.position);
  envelope.mass = 0.1;
  EXPECT_EQ(fly(envelope, environment, release).status, FlightStatus::landed);
}

}  // namespace
}  // namespace strewn
