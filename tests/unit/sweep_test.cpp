// Sweep files: the cases they make (grid and zip, keys of bodies by name, integer keys kept
// integer), and every malformed sweep refused with status 2, the sweep file's line and key path,
// before any case runs and with nothing written.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "app/commands.hpp"
#include "cluster/sweep.hpp"
#include "command_line.hpp"
#include "core/errors.hpp"
#include "scenario/scenario.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;

class Sweep : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ =
        std::filesystem::temp_directory_path() /
        ("strewn-sweep-test-" + std::to_string(::testing::UnitTest::GetInstance()->random_seed()) +
         "-" + ::testing::UnitTest::GetInstance()->current_test_info()->name());
    std::filesystem::create_directories(dir_);
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }
  std::string write(const std::string& name, const std::string& text) {
    const auto path = (dir_ / name).string();
    std::ofstream(path) << text;
    return path;
  }
  std::string base() const { return STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml"; }
  std::filesystem::path dir_;
};

TEST_F(Sweep, GridAndZipCases) {
  const auto grid = write("grid.toml", "base = \"" + base() +
                                           "\"\n[[axis]]\nkey = \"release.altitude\"\nvalues = "
                                           "[2400.0, 2800.0, 3000.0]\n[[axis]]\nkey = "
                                           "\"box.mass.median\"\nvalues = [35.0, 45.0]\n"
                                           "[[axis]]\nkey = \"study.samples\"\nvalues = [300]\n");
  const SweepPlan plan = load_sweep(grid);
  ASSERT_EQ(plan.cases.size(), 6u);
  EXPECT_EQ(plan.cases[1].values, (std::vector<double>{2400.0, 45.0, 300.0}));  // last axis fastest
  EXPECT_EQ(plan.cases[4].values, (std::vector<double>{3000.0, 35.0, 300.0}));
  const Scenario s = parse_scenario(plan.cases[5].text, plan.base_path);
  EXPECT_EQ(s.release.altitude.nominal(), 3000.0);
  EXPECT_NEAR(s.bodies[0].mass.nominal(), 45.0, 1e-9);  // the body, found by its name
  EXPECT_EQ(s.study.samples, 300);                      // an integer key stays an integer
  EXPECT_EQ(s.study.seed, 1u);                          // the base scenario's seed

  const auto zip =
      write("zip.toml", "base = \"" + base() +
                            "\"\ncombine = \"zip\"\n[[axis]]\nkey = "
                            "\"release.altitude\"\nvalues = [2400.0, 2800.0]\n"
                            "[[axis]]\nkey = \"release.speed\"\nvalues = [40.0, 50.0]\n");
  const SweepPlan zipped = load_sweep(zip);
  ASSERT_EQ(zipped.cases.size(), 2u);
  EXPECT_EQ(zipped.cases[1].values, (std::vector<double>{2800.0, 50.0}));
}

TEST_F(Sweep, MalformedSweepsAreRefusedBeforeAnyCaseRuns) {
  const std::string head = "base = \"" + base() + "\"\n";
  struct Bad {
    std::string text, words;
  };
  const std::vector<Bad> cases{
      {head + "[[axis]]\nkey = \"release.altitud\"\nvalues = [1.0]\n",
       ":3: axis[0].key: case 0 (release.altitud = 1): release.altitud: unknown key \"altitud\"; "
       "did you mean \"altitude\"?"},
      {head + "[[axis]]\nkey = \"box.drag.model\"\nvalues = [1.0]\n",
       ":3: axis[0].key: box.drag.model is a string in"},
      {head + "[[axis]]\nkey = \"box.mass\"\nvalues = [1.0]\n", "box.mass is a distribution in"},
      {head + "[[axis]]\nkey = \"release.altitude\"\nvalues = []\n",
       ":4: axis[0].values: is empty"},
      {head + "combine = \"zip\"\n[[axis]]\nkey = \"release.altitude\"\nvalues = [2000.0, 2500.0]\n"
              "[[axis]]\nkey = \"release.speed\"\nvalues = [40.0]\n",
       "axis[1].values: has 1 values but axis[0] has 2"},
      {head + "[[axis]]\nkey = \"release.altitude\"\nvalues = [\"high\"]\n",
       "axis[0].values: must hold finite numbers only"},
      {head + "combine = \"mixed\"\n[[axis]]\nkey = \"release.altitude\"\nvalues = [1.0]\n",
       "combine"},
      {"base = \"missing.toml\"\n[[axis]]\nkey = \"release.altitude\"\nvalues = [1.0]\n",
       "cannot be read"},
      {head, "at least one [[axis]] is required"},
      {head + "[[axis]]\nkey = \"release.altitude\"\nvalue = [1.0]\n", "unknown key \"value\""},
  };
  for (std::size_t i = 0; i < cases.size(); ++i) {
    const auto path = write("bad" + std::to_string(i) + ".toml", cases[i].text);
    const auto output = (dir_ / ("out" + std::to_string(i) + ".h5")).string();
    const CommandResult r = run({"sweep", path, "-o", output, "--quiet"});
    EXPECT_EQ(r.status, 2) << cases[i].text;
    EXPECT_NE(r.err.find(cases[i].words), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("nothing was run"), std::string::npos) << r.err;
    EXPECT_FALSE(std::filesystem::exists(output));
    EXPECT_FALSE(std::filesystem::exists(output + ".cases"));
  }
}

}  // namespace
}  // namespace strewn
