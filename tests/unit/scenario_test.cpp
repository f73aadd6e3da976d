// Scenario loading: the resolved model of a good file, and bad input refused with the key path,
// the line and what was expected, all problems in one pass.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <set>
#include <span>
#include <string>
#include <variant>
#include <vector>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "flight/model_range.hpp"
#include "report/scenario_report.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"
#include "support.hpp"

namespace strewn {
namespace {

const std::string kGood = R"(title = "t"
[site]
ground = 540.0
[wind]
layers = [ { altitude = 540.0, speed = 3.0, from = 240.0 }, { altitude = 1500.0, speed = 8.0, from = 255.0 } ]
[release]
altitude = 2400.0
speed = 62.0
track = 90.0
[[body]]
name = "bundle"
mass = { dist = "normal", mean = 95.0, sd = 4.0, min = 80.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.2 }
area = 0.55
)";

// Replaces the first occurrence of `from` in the good scenario by `to`.
std::string edit(const std::string& from, const std::string& to) {
  std::string text = kGood;
  const auto at = text.find(from);
  EXPECT_NE(at, std::string::npos) << from;
  return text.replace(at, from.size(), to);
}

// The problems reported for a scenario text (empty when it loads).
std::vector<Problem> problems_of(const std::string& text) {
  try {
    parse_scenario(text, "bad.toml");
  } catch (const ScenarioError& e) {
    return e.problems();
  }
  return {};
}

void expect_problem(const std::string& text, const std::string& key, long line,
                    const std::string& fragment) {
  const auto problems = problems_of(text);
  ASSERT_FALSE(problems.empty()) << "accepted:\n" << text;
  bool found = false;
  for (const auto& p : problems) {
    if (p.key_path == key && p.line == line && p.message.find(fragment) != std::string::npos)
      found = true;
  }
  std::string all;
  for (const auto& p : problems) all += p.describe() + "\n";
  EXPECT_TRUE(found) << "wanted " << key << " at line " << line << " with \"" << fragment
                     << "\", got:\n"
                     << all;
  for (const auto& p : problems) EXPECT_EQ(p.file, "bad.toml");
}

TEST(Scenario, GoodFileResolvesEveryInput) {
  const Scenario s = parse_scenario(kGood, "good.toml");
  ASSERT_EQ(s.bodies.size(), 1u);
  EXPECT_EQ(s.bodies[0].name, "bundle");
  EXPECT_EQ(s.site.ground_level(), 540.0);
  EXPECT_EQ(s.wind.layers.size(), 2u);
  EXPECT_EQ(s.study.tolerance, 0.05);  // the documented default
  ASSERT_EQ(s.sampled_inputs.size(), 2u);
  EXPECT_EQ(s.sampled_inputs[0].name, "bundle.mass");
  EXPECT_EQ(s.sampled_inputs[1].name, "bundle.drag.cd");
  const FlightInputs nominal = nominal_flight(s, 0);
  // The median of a normal truncated 3.75 sd below the mean is above the mean by a hair.
  EXPECT_NEAR(nominal.body.mass, 95.0, 1e-3);
  EXPECT_GT(nominal.body.mass, 95.0);
  EXPECT_DOUBLE_EQ(std::get<AreaDrag>(nominal.body.drag.law).cd, 1.05);  // uniform median
  EXPECT_NEAR(nominal.release.velocity.x(), 62.0, 1e-12);                // track 90: due east
  EXPECT_NEAR(nominal.release.velocity.y(), 0.0, 1e-12);
}

// A body may not take a section's name, which starts the names of that section's inputs
// ("wind.bias_east"), but "body", the name a lone body gets when it has none, is still its own
// (found in a read of the change that first refused it).
TEST(Scenario, BodyNamesOfSectionsAreRefusedButItsOwnDefaultIsNot) {
  expect_problem(edit("name = \"bundle\"", "name = \"medium\""), "body[0].name", 11,
                 "is the name of a section of the scenario");
  const Scenario s = parse_scenario(edit("name = \"bundle\"", "name = \"body\""), "good.toml");
  EXPECT_EQ(s.sampled_inputs[0].name, "body.mass");
}

TEST(Scenario, ReleaseErrorsMoveTheReleasePoint) {
  // Track 0 (north): along is north, crossrange (right of track) is east; a delay of 2 s at
  // 50 m/s is 100 m further along.
  const ReleaseState r = release_state(1000.0, 10.0, 20.0, 50.0, 0.0, 0.0, 5.0, 3.0, 2.0);
  EXPECT_NEAR(r.position.x(), 13.0, 1e-12);
  EXPECT_NEAR(r.position.y(), 20.0 + 5.0 + 100.0, 1e-12);
}

TEST(ScenarioBadInput, WrongType) {
  expect_problem(
      edit("mass = { dist = \"normal\", mean = 95.0, sd = 4.0, min = 80.0 }", "mass = \"heavy\""),
      "body[0].mass", 12, "expected a number or a distribution table");
}

TEST(ScenarioBadInput, NegativeMass) {
  expect_problem(
      edit("mass = { dist = \"normal\", mean = 95.0, sd = 4.0, min = 80.0 }", "mass = -3.0"),
      "body[0].mass", 12, "must be positive");
}

TEST(ScenarioBadInput, UnknownKeyWithSuggestion) {
  expect_problem(edit("mass = {", "mas = {"), "body[0].mas", 12, "did you mean \"mass\"?");
  expect_problem(edit("track = 90.0", "trak = 90.0"), "release.trak", 9, "did you mean \"track\"?");
  expect_problem(edit("[wind]", "[wnid]"), "wnid", 4, "did you mean \"wind\"?");
}

TEST(ScenarioBadInput, ReleaseBelowTheGround) {
  expect_problem(edit("altitude = 2400.0", "altitude = 500.0"), "release.altitude", 7,
                 "must be above the ground");
}

TEST(ScenarioBadInput, TomlSyntaxError) {
  expect_problem(edit("[release]", "[release"), "release", 6, "TOML syntax error");
  // The parser knows the line only; the key is read from the text.
  expect_problem(edit("speed = 62.0", "speed = 62.0 62"), "release.speed", 8, "TOML syntax error");
}

TEST(ScenarioBadInput, InvalidDistributions) {
  expect_problem(edit("sd = 4.0", "sd = -4.0"), "body[0].mass.sd", 12, "must be positive");
  expect_problem(edit("min = 0.9, max = 1.2", "min = 1.9, max = 1.2"), "body[0].drag.cd.min", 15,
                 "must be below max");
  expect_problem(edit("dist = \"uniform\"", "dist = \"uniforn\""), "body[0].drag.cd.dist", 15,
                 "did you mean \"uniform\"?");
  // A normal that puts real probability below zero on a positive quantity.
  expect_problem(edit("min = 80.0 }", "sd = 60.0 }").replace(kGood.find("sd = 4.0, "), 10, ""),
                 "body[0].mass", 12, "of its probability outside positive");
}

TEST(ScenarioBadInput, WindLayersOutOfOrder) {
  expect_problem(edit("altitude = 1500.0", "altitude = 300.0"), "wind.layers[1].altitude", 5,
                 "sorted by increasing altitude");
  expect_problem(edit("altitude = 1500.0", "altitude = 540.0"), "wind.layers[1].altitude", 5,
                 "duplicated altitude");
  expect_problem(edit("from = 240.0", "from = 400.0"), "wind.layers[0].from", 5, "[0, 360]");
}

TEST(ScenarioBadInput, ModelSpecificKeys) {
  expect_problem(edit("area = 0.55", "area = 0.55\ndiameter = 0.3"), "body[0].drag.diameter", 17,
                 "is not used by drag model \"area\"");
  expect_problem(edit("model = \"area\"", "model = \"spere\""), "body[0].drag.model", 14,
                 "did you mean \"sphere\"?");
  // A misspelt model is the one problem of a body with a Mach table: the table is still read.
  const std::string misspelt =
      edit("model = \"area\"", "model = \"spere\"\nmach_table = [[0.0, 1.0], [1.2, 1.5]]");
  for (const auto& p : problems_of(misspelt))
    EXPECT_EQ(p.key_path.find("mach_table"), std::string::npos) << p.describe();
  // Linear drag takes no Mach table (docs/scenario.md).
  expect_problem(edit("model = \"area\"", "model = \"stokes\"\nmach_table = [[0.0, 1.0]]"),
                 "body[0].drag.mach_table", 15, "does not apply to drag model \"stokes\"");
}

// Each wind source reads its own keys of [wind.uncertainty] and the loader names the keys of the
// other sources as theirs; the keys, defaults and ranges are those of docs/scenario.md,
// "[wind.uncertainty]".
TEST(Scenario, WindSourcesReadTheirOwnKeys) {
  const auto with = [](const std::string& table) {
    return edit("[release]", "[wind.uncertainty]\n" + table + "\n[release]");
  };
  const Scenario layered =
      parse_scenario(with("model = \"layered\"\nspeed_sd = 1.5\ncorrelation_length = 600.0"), "t");
  const auto* l = std::get_if<LayeredWind::Settings>(&layered.wind.uncertainty);
  ASSERT_NE(l, nullptr);
  EXPECT_EQ(l->speed_sd, 1.5);
  EXPECT_EQ(l->correlation_length, 600.0);
  EXPECT_STREQ(wind_source_name(layered.wind.uncertainty), "layered");
  // The default model is "none", the profile as given.
  EXPECT_TRUE(
      std::holds_alternative<ProfileWind::Settings>(parse_scenario(kGood, "t").wind.uncertainty));
  // The bias is two sampled inputs, each normal with sd speed_sd, registered where [wind] is read:
  // after the medium's and before the release's and the bodies' (the order of the columns and of
  // the sampling plan's dimensions, so of a seed's results).
  const Scenario bias = parse_scenario(with("model = \"bias\"\nspeed_sd = 2.0"), "t");
  std::vector<std::string> names;
  for (const auto& input : bias.sampled_inputs) names.push_back(input.name);
  EXPECT_EQ(names, (std::vector<std::string>{"wind.bias_east", "wind.bias_north", "bundle.mass",
                                             "bundle.drag.cd"}));
  const auto& b = std::get<BiasWind::Settings>(bias.wind.uncertainty);
  EXPECT_EQ(b.east.sampled_index(), 0);
  EXPECT_EQ(b.north.sampled_index(), 1);
  // One standard deviation above the mean at the normal's 0.841344746 quantile (standard normal
  // table: Phi(1) = 0.8413447460685429).
  EXPECT_NEAR(b.east.quantile(0.8413447460685429), 2.0, 1e-9);
  EXPECT_NEAR(b.north.quantile(1.0 - 0.8413447460685429), -2.0, 1e-9);

  const long line = 7;  // the line of the key after "[wind.uncertainty]" in the edited text
  expect_problem(with("model = \"layered\"\nspeed_sd = 1.5"), "wind.uncertainty.correlation_length",
                 line - 1, "required");
  expect_problem(with("model = \"ensemble\""), "wind.uncertainty.members", line - 1,
                 "is required for model \"ensemble\" (a list of wind files)");
  expect_problem(with("model = \"ensemble\"\nmembers = []"), "wind.uncertainty.members", line + 1,
                 "lists no profile");
  expect_problem(
      with(
          "model = \"layered\"\nspeed_sd = 1.5\ncorrelation_length = 600.0\nmembers = [\"a.csv\"]"),
      "wind.uncertainty.members", line + 3, "is not used by wind uncertainty model \"layered\"");
  expect_problem(with("model = \"bias\"\nspeed_sd = -1.0"), "wind.uncertainty.speed_sd", line + 1,
                 "zero or more");
  expect_problem(with("model = \"layerd\""), "wind.uncertainty.model", line,
                 "did you mean \"layered\"?");
  // An unknown model is read as the default, "none": the keys of the others are named as theirs.
  expect_problem(with("model = \"layerd\"\nspeed_sd = 1.5"), "wind.uncertainty.speed_sd", line + 1,
                 "is not used by wind uncertainty model \"none\"");
}

// What `check --json` writes back of each wind source is exactly the keys the source declares.
TEST(Scenario, EachWindSourceWritesBackItsKeys) {
  const test::ScratchFolder folder("wind-echo");
  const std::string member = (folder / "member.csv").string();
  std::ofstream(member) << "altitude_m,speed_ms,from_deg\n540,3,240\n1500,8,255\n";
  const std::vector<std::pair<std::string, std::string>> tables{
      {"bias", "speed_sd = 2.0"},
      {"layered", "speed_sd = 1.5\ncorrelation_length = 600.0"},
      {"ensemble", "members = [\"member.csv\", \"member.csv\"]"}};
  // Every registered source but the default ("none", no keys) has its row here.
  for (const std::string& name : wind_source_names())
    EXPECT_TRUE(name == "none" || std::any_of(tables.begin(), tables.end(),
                                              [&](const auto& row) { return row.first == name; }))
        << "wind source \"" << name << "\" has no row in this test";
  for (const auto& [model, keys] : tables) {
    const Scenario s = parse_scenario(
        edit("[release]", "[wind.uncertainty]\nmodel = \"" + model + "\"\n" + keys + "\n[release]"),
        (folder / "s.toml").string());
    ASSERT_STREQ(wind_source_name(s.wind.uncertainty), model.c_str());
    std::set<std::string> declared, written;
    for (const auto& [key, own] : wind_source_keys(s.wind.uncertainty))
      if (own) declared.insert(key);
    const auto json = scenario_json(s);
    for (const auto& [key, value] : json["wind"]["uncertainty"].items())
      if (key != "model") written.insert(key);
    EXPECT_EQ(written, declared) << model;
    EXPECT_FALSE(declared.empty()) << model;
  }
}

// A made-up kind of ground for the choice among kinds: a hill of two required keys.
struct TestHill {
  static constexpr const char* name = "test hill";
  static constexpr std::array<GroundKey, 2> keys{
      {{"hill_top", kAltitude, true, 0.0}, {"hill_width", kPositive, true, 0.0}}};
  double top = 0.0, width = 0.0;
  explicit TestHill(std::span<const double> values) : top(values[0]), width(values[1]) {}
};

// The ground is chosen and read by its own keys of [site]: a level ground at `ground` m above mean
// sea level, 0 when absent, in -5000 .. 86000 (docs/scenario.md, "[site]").
TEST(Scenario, TheGroundIsReadByItsKeys) {
  const Scenario s = parse_scenario(kGood, "t");
  ASSERT_TRUE(std::holds_alternative<LevelGround>(s.site.ground));
  EXPECT_EQ(std::get<LevelGround>(s.site.ground).height(1e4, -3e3), 540.0);
  const auto settings = ground_settings(s.site.ground);
  ASSERT_EQ(settings.size(), 1u);
  EXPECT_STREQ(settings[0].first, "ground");
  EXPECT_EQ(settings[0].second, 540.0);
  const Scenario at_sea = parse_scenario(edit("ground = 540.0\n", ""), "t");
  EXPECT_EQ(at_sea.site.ground_level(), 0.0);
  expect_problem(edit("ground = 540.0", "ground = 90000.0"), "site.ground", 3,
                 "an altitude from -5000 to 86000 m above mean sea level");
}

// Choosing among kinds of ground by the keys [site] gives (the rule of flight/ground.hpp), on a
// made-up pair: a hill that requires `hill_top` and `hill_width`, before the level ground.
TEST(Scenario, AGroundIsChosenByItsRequiredKeys) {
  using Pair = std::variant<TestHill, LevelGround>;
  static_assert(GroundKinds<Pair>::default_is_last());
  static_assert(!GroundKinds<std::variant<LevelGround, TestHill>>::default_is_last());
  const auto given = [](std::set<std::string> keys) {
    return [keys](const char* key) { return keys.count(key) > 0; };
  };
  EXPECT_EQ(GroundKinds<Pair>::choose(given({})), 1u);
  EXPECT_EQ(GroundKinds<Pair>::choose(given({"ground"})), 1u);
  EXPECT_EQ(GroundKinds<Pair>::choose(given({"hill_top"})), 1u);
  EXPECT_EQ(GroundKinds<Pair>::choose(given({"hill_top", "hill_width"})), 0u);
  const std::array<double, 2> hill_values{900.0, 250.0};
  const Pair hill = GroundKinds<Pair>::make(0, hill_values);
  EXPECT_EQ(std::get<TestHill>(hill).top, 900.0);
  EXPECT_EQ(std::get<TestHill>(hill).width, 250.0);
  // A hill's key given without its partner is named as the hill's, with what it lacks.
  const auto others = GroundKinds<Pair>::keys_of_others(1, given({"hill_top"}));
  ASSERT_EQ(others.size(), 1u);
  EXPECT_EQ(others[0].first, "hill_top");
  EXPECT_NE(others[0].second.find("is a key of ground \"test hill\", which also needs hill_width"),
            std::string::npos)
      << others[0].second;
  EXPECT_TRUE(GroundKinds<Pair>::keys_of_others(0, given({"hill_top", "hill_width"})).empty());
}

TEST(ScenarioBadInput, MissingSections) {
  const std::string no_release =
      edit("[release]\naltitude = 2400.0\nspeed = 62.0\ntrack = 90.0\n", "");
  expect_problem(no_release, "release", 0, "is required");
  expect_problem(kGood.substr(0, kGood.find("[[body]]")), "body", 0, "at least one [[body]]");
}

TEST(ScenarioBadInput, ParachuteProbabilitiesAndCorrelations) {
  const std::string chute = kGood + R"([body.parachute]
deploy_after = 3.0
drag_area = 45.0
partial_probability = 0.7
partial_drag_area = 6.0
failure_probability = 0.4
[[correlation]]
between = ["bundle.mass", "bundle.drag.cdd"]
rho = 0.3
)";
  expect_problem(chute, "body[0].parachute.failure_probability", 22, "must not exceed 1");
  expect_problem(chute, "correlation[0].between", 24, "did you mean \"bundle.drag.cd\"?");
}

// All problems are reported in one pass, not just the first.
TEST(ScenarioBadInput, EveryProblemInOnePass) {
  std::string text = edit("mass = {", "mas = {");
  text = text.replace(text.find("track = 90.0"), 12, "track = \"east\"");
  text = text.replace(text.find("cd = {"), 6, "cd = -1.0 #");
  const auto problems = problems_of(text);
  EXPECT_GE(problems.size(), 4u);  // mas unknown, mass missing, track type, cd sign
}

TEST(ScenarioBadInput, FilesThatAreNotScenarios) {
  EXPECT_THROW(load_scenario("/nonexistent/strewn.toml"), ScenarioError);
  EXPECT_THROW(load_scenario(STREWN_SOURCE_DIR "/tests"), ScenarioError);
  EXPECT_THROW(parse_scenario("", "empty.toml"), ScenarioError);
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// The text helpers behind messages and files: the number text reads back exactly (the C++
// standard's shortest round trip), CSV cells follow the interface (empty for no value), and
// printf_text sizes its result to any length.
TEST(Text, NumbersAndPrintfText) {
  for (double v : {0.1, 1.0 / 3.0, 6.02214076e23, -2.5e-300})
    EXPECT_EQ(std::stod(format_number(v)), v) << format_number(v);
  EXPECT_EQ(csv_number(std::numeric_limits<double>::quiet_NaN()), "");
  EXPECT_EQ(csv_number(std::numeric_limits<double>::infinity()), "inf");
  EXPECT_EQ(csv_number(-std::numeric_limits<double>::infinity()), "-inf");
  EXPECT_EQ(csv_number(1234.5678912345), "1234.567891");
  EXPECT_EQ(printf_text("%.2f m", 3.14159), "3.14 m");
  EXPECT_EQ(printf_text("%s", std::string(300, 'x').c_str()).size(), 300u);
  EXPECT_EQ(closest_match("seeed", {"seed", "samples"}), "seed");
}

// Every uncertain input is read by its handle, never by its name: each distribution the loader
// reads carries its place among the sampled inputs, and the one flight builder puts each sampled
// value where it belongs (a value in the wrong place, or one left at its nominal, fails here).
TEST(Scenario, EveryInputIsReadByItsHandle) {
  const std::string text = R"(title = "every input uncertain"
[site]
ground = 100.0
[medium]
temperature_offset = { dist = "normal", mean = 0.0, sd = 3.0 }
density_factor = { dist = "uniform", min = 0.95, max = 1.05 }
[wind]
layers = [ { altitude = 100.0, speed = 3.0, from = 240.0 }, { altitude = 900.0, speed = 6.0, from = 250.0 } ]
[wind.uncertainty]
model = "bias"
speed_sd = 1.5
[release]
altitude = { dist = "normal", mean = 800.0, sd = 5.0 }
east = { dist = "normal", mean = 0.0, sd = 2.0 }
north = { dist = "normal", mean = 0.0, sd = 2.0 }
speed = { dist = "uniform", min = 40.0, max = 45.0 }
track = { dist = "normal", mean = 90.0, sd = 2.0 }
climb = { dist = "normal", mean = 0.0, sd = 0.5 }
along_error = { dist = "normal", mean = 0.0, sd = 20.0 }
cross_error = { dist = "normal", mean = 0.0, sd = 8.0 }
delay = { dist = "uniform", min = 0.0, max = 0.4 }
[release.burst]
speed = { dist = "uniform", min = 0.0, max = 3.0 }
[[body]]
name = "crate"
mass = { dist = "normal", mean = 60.0, sd = 2.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.1 }
area = { dist = "uniform", min = 0.4, max = 0.5 }
volume = { dist = "uniform", min = 0.10, max = 0.12 }
[body.parachute]
deploy_after = { dist = "uniform", min = 2.0, max = 3.0 }
fill_time = { dist = "uniform", min = 1.0, max = 2.0 }
drag_area = { dist = "uniform", min = 30.0, max = 35.0 }
partial_probability = 0.1
partial_drag_area = { dist = "uniform", min = 5.0, max = 6.0 }
[[body]]
name = "ball"
mass = { dist = "uniform", min = 1.0, max = 1.2 }
[body.drag]
model = "shape"
diameter = { dist = "uniform", min = 0.10, max = 0.12 }
sphericity = { dist = "uniform", min = 0.8, max = 0.9 }
[body.parachute]
deploy_height = { dist = "uniform", min = 200.0, max = 300.0 }
fill_time = 1.0
drag_area = 2.0
)";
  const Scenario s = parse_scenario(text, "handles.toml");
  // 4 medium and wind, 10 release, 8 crate and 4 ball inputs, every one a distribution.
  ASSERT_EQ(s.sampled_inputs.size(), 26u);
  std::vector<double> values;
  for (std::size_t i = 0; i < s.sampled_inputs.size(); ++i) {
    EXPECT_EQ(s.sampled_inputs[i].distribution.sampled_index(), static_cast<int>(i))
        << s.sampled_inputs[i].name;
    values.push_back(1000.0 + static_cast<double>(i));  // a value that names its input
  }
  auto value_of = [&](const std::string& name) {
    for (std::size_t i = 0; i < s.sampled_inputs.size(); ++i)
      if (s.sampled_inputs[i].name == name) return values[i];
    ADD_FAILURE() << "no sampled input " << name;
    return 0.0;
  };
  const InputValues sample = InputValues::of_sample(values);
  EXPECT_EQ(sample(std::get<BiasWind::Settings>(s.wind.uncertainty).east),
            value_of("wind.bias_east"));
  EXPECT_EQ(sample(std::get<BiasWind::Settings>(s.wind.uncertainty).north),
            value_of("wind.bias_north"));
  EXPECT_EQ(sample(s.release.burst_speed), value_of("release.burst.speed"));

  const FlightInputs crate = build_flight(s, 0, sample, CanopyState::full);
  EXPECT_EQ(crate.body.mass, value_of("crate.mass"));
  EXPECT_EQ(std::get<AreaDrag>(crate.body.drag.law).cd, value_of("crate.drag.cd"));
  EXPECT_EQ(std::get<AreaDrag>(crate.body.drag.law).area, value_of("crate.drag.area"));
  EXPECT_EQ(crate.body.volume, value_of("crate.drag.volume"));
  EXPECT_EQ(crate.body.canopy.deploy_after, value_of("crate.parachute.deploy_after"));
  EXPECT_EQ(crate.body.canopy.fill_time, value_of("crate.parachute.fill_time"));
  EXPECT_EQ(crate.body.canopy.drag_area, value_of("crate.parachute.drag_area"));
  EXPECT_EQ(crate.conditions.temperature_offset, value_of("medium.temperature_offset"));
  EXPECT_EQ(crate.conditions.density_factor, value_of("medium.density_factor"));
  const ReleaseState expected = release_state(
      value_of("release.altitude"), value_of("release.east"), value_of("release.north"),
      value_of("release.speed"), value_of("release.track"), value_of("release.climb"),
      value_of("release.along_error"), value_of("release.cross_error"), value_of("release.delay"));
  EXPECT_EQ(crate.release.position, expected.position);
  EXPECT_EQ(crate.release.velocity, expected.velocity);
  EXPECT_EQ(build_flight(s, 0, sample, CanopyState::partial).body.canopy.drag_area,
            value_of("crate.parachute.partial_drag_area"));
  EXPECT_EQ(build_flight(s, 0, sample, CanopyState::failed).body.canopy.state, CanopyState::failed);

  const FlightInputs ball = build_flight(s, 1, sample);
  EXPECT_EQ(ball.body.mass, value_of("ball.mass"));
  EXPECT_EQ(std::get<ShapeDrag>(ball.body.drag.law).diameter, value_of("ball.drag.diameter"));
  EXPECT_EQ(std::get<ShapeDrag>(ball.body.drag.law).sphericity, value_of("ball.drag.sphericity"));
  EXPECT_EQ(ball.body.canopy.deploy_height, value_of("ball.parachute.deploy_height"));

  // The nominal flight: every input at its median, through the same builder.
  const FlightInputs nominal = nominal_flight(s, 0);
  EXPECT_EQ(nominal.body.mass, s.bodies[0].mass.nominal());
  EXPECT_DOUBLE_EQ(std::get<AreaDrag>(nominal.body.drag.law).cd,
                   1.0);  // the median of uniform(0.9, 1.1)
  EXPECT_EQ(nominal.body.canopy.drag_area, s.bodies[0].parachute->drag_area.nominal());
}

// Each enum's names come from its one table: every name reads back as its value, no two values
// share a name, and a word outside the table is no value.
template <class E>
void expect_names_round_trip() {
  const auto names = enum_names<E>();
  ASSERT_FALSE(names.empty());
  for (std::size_t i = 0; i < names.size(); ++i) {
    const auto value = enum_from_name<E>(names[i]);
    ASSERT_TRUE(value.has_value()) << names[i];
    EXPECT_EQ(std::string(name_of(*value)), names[i]);
    for (std::size_t j = 0; j < i; ++j) EXPECT_NE(names[i], names[j]);
  }
  EXPECT_FALSE(enum_from_name<E>("no such name").has_value());
}

TEST(Scenario, EnumNamesRoundTrip) {
  expect_names_round_trip<SamplingPlan>();
  expect_names_round_trip<Medium::Kind>();
  expect_names_round_trip<DistributionKind>();
  expect_names_round_trip<FlightStatus>();
  expect_names_round_trip<CanopyState>();
  expect_names_round_trip<ModelRangeFlag>();
  // The words the scenario reference (docs/scenario.md) gives for the drag models, in its order.
  EXPECT_EQ(drag_model_names(), (std::vector<std::string>{"sphere", "shape", "area", "stokes"}));
  // ... and for the wind uncertainty models, each a wind source, in its order.
  EXPECT_EQ(wind_source_names(), (std::vector<std::string>{"none", "bias", "layered", "ensemble"}));
  for (DragModel model = 0; model < kDragModels; ++model)
    EXPECT_EQ(drag_model_named(drag_model_name(model)), model);
  EXPECT_FALSE(drag_model_named("spere").has_value());
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// A sounding of temperature alone, read from its file: its lowest level takes the standard
// atmosphere's pressure there (U.S. Standard Atmosphere 1976, NOAA-S/T 76-1562, Part 4 Table I:
// 89 876 Pa at 1000 m, printed to 5 figures; tests/reference/us1976_table.csv), and a hot day drawn
// in the scenario keeps that pressure and adds some aloft (the hydrostatic law with a warmer
// column: MediumTable.HotAndColdDaysAreInHydrostaticBalance checks the figures).
TEST(Scenario, ASoundingWithoutPressureIsBalancedFromTheStandardAtItsLowestLevel) {
  const test::ScratchFolder folder("sounding");
  std::ofstream(folder / "sounding.csv") << "altitude_m,temperature_K\n"
                                            "1000,281.65\n3000,268.65\n6000,249.15\n";
  std::ofstream(folder / "drop.toml") << R"([site]
ground = 1000.0
[medium]
model = "profile"
profile = "sounding.csv"
temperature_offset = { dist = "uniform", min = 0.0, max = 20.0 }
[release]
altitude = 2500.0
[[body]]
name = "crate"
mass = 10.0
[body.drag]
model = "area"
cd = 1.0
area = 0.2
)";
  const Scenario s = load_scenario((folder / "drop.toml").string());
  ASSERT_EQ(s.medium.profile.size(), 3u);
  EXPECT_TRUE(std::isnan(s.medium.profile[1].pressure));
  const World world = build_world(s);
  EXPECT_NEAR(world.medium.pressure(1000.0, {}) / 89876.0, 1.0, 1e-4);
  EXPECT_GE(world.medium.offsets().size(), 4u);  // a lattice over 0 .. 20 K
  EXPECT_NEAR(world.medium.pressure(1000.0, {20.0, 1.0}), world.medium.pressure(1000.0, {}), 1e-6);
  EXPECT_GT(world.medium.pressure(5000.0, {20.0, 1.0}), world.medium.pressure(5000.0, {}) * 1.01);
}

}  // namespace
}  // namespace strewn
