// A study counts, per body, the samples that left a model's range or its assumptions, and says
// so everywhere a reader looks: the terminal summary, the JSON (`warnings`, always an array), the
// HTML page, the CSV, and the results file read back by `report`.
#include <gtest/gtest.h>

#include <filesystem>
#include <nlohmann/json.hpp>

#include "command_line.hpp"
#include "store/results_file.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;
using test::slurp;

class Warnings : public ::testing::Test {
 protected:
  const test::ScratchFolder folder_{"warnings"};  // one per test, removed after it
  const std::filesystem::path dir_ = folder_.path();
};

TEST_F(Warnings, StokesDropletsBeyondReOneAreCountedEverywhere) {
  // Droplets of 100 to 200 um leaving a drone at 8 m/s under the linear drag law: at the release
  // their Reynolds number is rho u D / mu = 1.2 x 8 x 1e-4 / 1.8e-5 = 53 or more (common
  // practice: Stokes' law holds below Re ~ 1), so every sample leaves the law's range.
  const std::string scenario = STREWN_SOURCE_DIR "/tests/data/spray-droplets.toml";
  const auto file = (dir_ / "spray.h5").string();
  const CommandResult text = run({"run", scenario, "-n", "500", "-o", file, "--quiet"});
  ASSERT_EQ(text.status, 0) << text.err;
  EXPECT_NE(text.out.find("droplet: 500 of 500 samples (100 %): the Reynolds number reached"),
            std::string::npos)
      << text.out;
  EXPECT_NE(text.out.find("where Stokes (linear) drag underestimates the drag"), std::string::npos);

  // The same study again, as JSON, replacing its file.
  const CommandResult json =
      run({"run", scenario, "-n", "500", "-o", file, "--quiet", "--json", "--force"});
  ASSERT_EQ(json.status, 0) << json.err;
  const auto j = nlohmann::json::parse(json.out);
  ASSERT_TRUE(j["warnings"].is_array());
  bool said = false;
  for (const auto& w : j["warnings"])
    said = said || w.get<std::string>().find("Reynolds number reached") != std::string::npos;
  EXPECT_TRUE(said) << j["warnings"].dump();
  ASSERT_TRUE(j["model_ranges"].is_array());
  ASSERT_FALSE(j["model_ranges"].empty());
  const auto& range = j["model_ranges"][0];
  EXPECT_EQ(range["group"], "droplet");
  EXPECT_EQ(range["kind"], "reynolds_above_law");
  EXPECT_EQ(range["count"], 500);
  EXPECT_EQ(range["limit"], 1.0);
  // 1.2 kg/m^3 and 1.8e-5 Pa s near the ground (U.S. Standard Atmosphere 1976 at 100-130 m, from
  // memory to two figures), 8 m/s plus the wind's difference, D up to 200 um: about 110 at most.
  EXPECT_GT(range["extreme"].get<double>(), 53.0);
  EXPECT_LT(range["extreme"].get<double>(), 160.0);

  // The results file keeps them, so `report` says the same, and the page and the CSV carry them.
  const ResultsFile back = read_results(file, false);
  ASSERT_EQ(back.record.range_warnings.size(), 1u);
  EXPECT_EQ(back.record.range_warnings[0].count, 500u);
  const auto html = dir_ / "page.html", csv = dir_ / "figures.csv";
  ASSERT_EQ(run({"report", file, "--html", html.string(), "--csv", csv.string()}).status, 0);
  const std::string page = slurp(html);
  EXPECT_NE(page.find("id=\"warnings\""), std::string::npos);
  EXPECT_NE(page.find("the Reynolds number reached"), std::string::npos);
  EXPECT_NE(slurp(csv).find("model_range_reynolds_above_law"), std::string::npos);
  const CommandResult reported = run({"report", file, "--json"});
  EXPECT_EQ(nlohmann::json::parse(reported.out)["warnings"], j["warnings"]);
}

TEST_F(Warnings, AnArrayEvenWhenThereAreNone) {
  // A slow bead in a tank (the settling-tank worked study's physics): nothing leaves a range.
  const std::string scenario = STREWN_SOURCE_DIR "/tests/data/tank-stokes.toml";
  const CommandResult r =
      run({"run", scenario, "-n", "50", "-o", (dir_ / "tank.h5").string(), "--quiet", "--json"});
  ASSERT_EQ(r.status, 0) << r.err;
  const auto j = nlohmann::json::parse(r.out);
  ASSERT_TRUE(j.contains("warnings"));
  EXPECT_TRUE(j["warnings"].is_array());
  EXPECT_TRUE(j["warnings"].empty()) << j["warnings"].dump();
  EXPECT_TRUE(j["model_ranges"].empty());
  // The terminal says there are none, rather than leaving the line out.
  const CommandResult text =
      run({"run", scenario, "-n", "50", "-o", (dir_ / "tank.h5").string(), "--quiet", "--force"});
  EXPECT_NE(text.out.find("warnings  none"), std::string::npos) << text.out;
}

TEST_F(Warnings, SamplingPlanCaveatReachesThePage) {
  // A Sobol plan: the bounds assume independent samples. The terminal and the JSON said so; the
  // page must too.
  std::string text = slurp(STREWN_SOURCE_DIR "/tests/data/tank-stokes.toml");
  text += "[study]\nsampling = \"sobol\"\n";
  const auto scenario = dir_ / "sobol.toml";
  std::ofstream(scenario) << text;
  const auto file = (dir_ / "sobol.h5").string();
  ASSERT_EQ(run({"run", scenario.string(), "-n", "64", "-o", file, "--quiet"}).status, 0);
  const auto html = dir_ / "sobol.html";
  ASSERT_EQ(run({"report", file, "--html", html.string()}).status, 0);
  EXPECT_NE(slurp(html).find("the confidence bounds assume independent random sampling"),
            std::string::npos);
}

TEST_F(Warnings, LighterThanTheMediumIsNamed) {
  const std::string scenario = STREWN_SOURCE_DIR "/tests/data/extreme/lighter-than-air.toml";
  const CommandResult r =
      run({"run", scenario, "-n", "20", "-o", (dir_ / "lta.h5").string(), "--quiet", "--json"});
  ASSERT_EQ(r.status, 3) << r.err;  // every flight failed: more than study.max_failed allows
  const auto j = nlohmann::json::parse(r.out);
  bool named = false;
  for (const auto& w : j["model_ranges"]) named = named || w["kind"] == "floats";
  EXPECT_TRUE(named) << j["model_ranges"].dump();
}

TEST_F(Warnings, EarthsCurvatureAndRotationBeyondTheTolerance) {
  // The ridge drop at the default tolerance (0.05 m): a bundle that drifts kilometres is moved by
  // Earth's rotation by far more than 5 cm (docs/model.md, "Frame and units"); the warning gives
  // the size.
  const std::string scenario = STREWN_SOURCE_DIR "/inputs/ridge-drop.toml";
  const CommandResult r =
      run({"run", scenario, "-n", "200", "-o", (dir_ / "ridge.h5").string(), "--quiet", "--json"});
  ASSERT_EQ(r.status, 0) << r.err;
  const auto j = nlohmann::json::parse(r.out);
  bool frame = false;
  for (const auto& w : j["model_ranges"])
    if (w["kind"] == "frame_offset") {
      frame = true;
      EXPECT_GT(w["extreme"].get<double>(), 0.05);
      EXPECT_EQ(w["limit"], 0.05);
    }
  EXPECT_TRUE(frame) << j["model_ranges"].dump();
  // Found by a user: the warning alone cannot say whether metres matter; it sets the offsets
  // beside the footprint's width.
  bool beside = false;
  for (const auto& w : j["warnings"])
    beside = beside || w.get<std::string>().find("containment radius of") != std::string::npos;
  EXPECT_TRUE(beside) << j["warnings"].dump();
}

}  // namespace
}  // namespace strewn
