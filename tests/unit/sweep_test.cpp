// Sweep files: the cases they make (grid and zip, keys of bodies by name, integer keys kept
// integer), and every malformed sweep refused with status 2, the sweep file's line and key path,
// before any case runs and with nothing written.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "app/commands.hpp"
#include "cluster/sweep.hpp"
#include "command_line.hpp"
#include "core/errors.hpp"
#include "scenario/scenario.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;

class Sweep : public ::testing::Test {
 protected:
  std::string write(const std::string& name, const std::string& text) {
    const auto path = (dir_ / name).string();
    std::ofstream(path) << text;
    return path;
  }
  std::string base() const { return STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml"; }
  const test::ScratchFolder folder_{"sweep-test"};  // one per test, removed after it
  const std::filesystem::path dir_ = folder_.path();
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

// Wind layers and table rows are swept by their index in the list, counted from 0.
TEST_F(Sweep, ListElementsBySweptIndex) {
  const std::string debris = STREWN_SOURCE_DIR "/tests/data/debris-sphere-mach.toml";
  const auto sweep =
      write("index.toml", "base = \"" + debris +
                              "\"\n[[axis]]\nkey = \"wind.layers[1].speed\"\nvalues = [10.0, "
                              "30.0]\n[[axis]]\nkey = \"ball.drag.mach_table[2][1]\"\nvalues = "
                              "[1.5, 2.5]\n");
  const SweepPlan plan = load_sweep(sweep);
  ASSERT_EQ(plan.cases.size(), 4u);
  const Scenario s = parse_scenario(plan.cases[3].text, plan.base_path);
  EXPECT_EQ(s.wind.layers[1].speed, 30.0);
  EXPECT_EQ(s.wind.layers[0].speed, 4.0);  // the others as in the base
  EXPECT_EQ(s.bodies[0].mach_table->factor()[2], 2.5);
  EXPECT_EQ(s.bodies[0].mach_table->mach()[2], 1.0);
  // An index past the list's end, and a malformed one, are refused with the sweep's line.
  const auto beyond = write("beyond.toml", "base = \"" + debris +
                                               "\"\n[[axis]]\nkey = \"wind.layers[3].speed\"\n"
                                               "values = [1.0]\n");
  const CommandResult r = run({"sweep", beyond, "-o", (dir_ / "b.h5").string(), "--quiet"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find(":3: axis[0].key: wind.layers[3].speed is not a key of the scenario: "
                       "wind.layers has 3 elements, counted from 0; there is no [3]"),
            std::string::npos)
      << r.err;
  // A whole layer is a table, not a distribution: one of its keys is to be swept.
  const auto whole = write("whole.toml", "base = \"" + debris +
                                             "\"\n[[axis]]\nkey = \"wind.layers[1]\"\n"
                                             "values = [1.0]\n");
  const CommandResult table = run({"sweep", whole, "-o", (dir_ / "w.h5").string(), "--quiet"});
  EXPECT_EQ(table.status, 2);
  EXPECT_NE(table.err.find("wind.layers[1] is a table in"), std::string::npos) << table.err;
  const auto broken = write("broken.toml", "base = \"" + debris +
                                               "\"\n[[axis]]\nkey = \"wind.layers[x].speed\"\n"
                                               "values = [1.0]\n");
  EXPECT_EQ(run({"sweep", broken, "-o", (dir_ / "c.h5").string(), "--quiet"}).status, 2);
}

// Found by a user and a tester: a sweep's missing output folder was not made (status 3), an output
// that is a folder was refused only after every case had run, and a comma in a body's name broke
// the summary CSV's header.
TEST_F(Sweep, OutputsAreMadeOrRefusedBeforeAnyCase) {
  const auto sweep = write(
      "one.toml", "base = \"" + base() + "\"\n[[axis]]\nkey = \"study.samples\"\nvalues = [50]\n");
  const CommandResult made =
      run({"sweep", sweep, "-o", (dir_ / "new" / "deeper" / "one.h5").string(), "--quiet"});
  EXPECT_EQ(made.status, 0) << made.err;
  EXPECT_TRUE(std::filesystem::exists(dir_ / "new" / "deeper" / "one.h5"));
  std::filesystem::create_directories(dir_ / "taken");
  const CommandResult refused = run({"sweep", sweep, "-o", (dir_ / "taken").string(), "--quiet"});
  EXPECT_EQ(refused.status, 2) << refused.err;
  EXPECT_FALSE(std::filesystem::exists(dir_ / "taken.cases"));  // nothing ran
  // A body whose name holds a comma: the header cells are quoted like the rows'.
  write("odd.toml",
        "[release]\naltitude = 200.0\n[[body]]\nname = \"pod,1\"\n"
        "mass = 2.0\n[body.drag]\nmodel = \"area\"\ncd = 1.0\n"
        "area = 0.1\n[study]\nsamples = 60\n");
  const auto odd_sweep = write("odd-sweep.toml",
                               "base = \"odd.toml\"\n[[axis]]\nkey = "
                               "\"release.altitude\"\nvalues = [200.0, 300.0]\n");
  ASSERT_EQ(run({"sweep", odd_sweep, "-o", (dir_ / "odd.h5").string(), "--quiet"}).status, 0);
  std::istringstream lines(test::slurp(dir_ / "odd-summary.csv"));
  std::string header, row;
  std::getline(lines, header);
  std::getline(lines, row);
  auto fields = [](const std::string& line) {  // RFC 4180 fields
    std::size_t count = 1;
    bool quoted = false;
    for (char ch : line) {
      if (ch == '"') quoted = !quoted;
      if (ch == ',' && !quoted) ++count;
    }
    return count;
  };
  EXPECT_EQ(fields(header), fields(row)) << header << "\n" << row;
  EXPECT_NE(header.find("\"pod,1.radius_0.5\""), std::string::npos) << header;
}

// The summary says what each case ran (its samples, whether target_width was met, its
// warnings), and `report --case` shows one case of the sweep's file as a study of its own.
TEST_F(Sweep, SummaryAndOneCaseReported) {
  const auto sweep =
      write("grow.toml", "base = \"" + base() +
                             "\"\n[[axis]]\nkey = \"study.target_width\"\nvalues = [0.5, "
                             "0.001]\n[[axis]]\nkey = \"study.max_samples\"\nvalues = [4096]\n");
  const auto output = (dir_ / "grow.h5").string();
  const CommandResult r = run({"sweep", sweep, "-n", "500", "-o", output, "--quiet"});
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string csv = test::slurp(dir_ / "grow-summary.csv");
  std::istringstream lines(csv);
  std::string header, first, second;
  std::getline(lines, header);
  std::getline(lines, first);
  std::getline(lines, second);
  EXPECT_NE(header.find(",samples,warnings,"), std::string::npos) << header;
  EXPECT_NE(header.find("target_width_met"), std::string::npos) << header;
  // A loose target is met (once the 99.9 % bound exists: about 3000 samples); a tight one grows
  // the case to its cap without meeting it.
  EXPECT_EQ(first.find(",500,"), std::string::npos) << first;  // it grew
  EXPECT_NE(first.find(",yes"), std::string::npos) << first;
  EXPECT_NE(second.find(",4096,"), std::string::npos) << second;
  EXPECT_NE(second.find(",no"), std::string::npos) << second;
  // One case, as `report` shows a study; its figures are those of the case run alone.
  const CommandResult one = run({"report", output, "--case", "1", "--json"});
  ASSERT_EQ(one.status, 0) << one.err;
  const auto j = nlohmann::json::parse(one.out);
  EXPECT_EQ(j["samples"], 4096);
  EXPECT_EQ(j["convergence"]["met"], false);
  const SweepPlan plan = load_sweep(sweep, 500);
  const auto alone = (dir_ / "alone.toml");
  std::ofstream(alone) << plan.cases[1].text;
  const auto alone_h5 = (dir_ / "alone.h5").string();
  // The case's text names its base's relative files from the base's folder: run it from there.
  ASSERT_EQ(run({"run", alone.string(), "-o", alone_h5, "--quiet"}).status, 0);
  const auto direct = nlohmann::json::parse(run({"report", alone_h5, "--json"}).out);
  EXPECT_EQ(j["footprint"], direct["footprint"]);
  // The case says which it is: its axes' values, in every report.
  EXPECT_NE(j["case"].get<std::string>().find("case 1 of the sweep: study.target_width = 0.001"),
            std::string::npos)
      << j["case"];
  // The terminal summary is a line a case, not the CSV.
  EXPECT_NE(r.out.find("case 1 (study.target_width = 0.001, study.max_samples = 4096): 4096 "
                       "samples, target width NOT met"),
            std::string::npos)
      << r.out;
  EXPECT_EQ(run({"report", output, "--case", "2"}).status, 2);    // no such case
  EXPECT_EQ(run({"report", output}).status, 2);                   // which case?
  EXPECT_EQ(run({"report", alone_h5, "--case", "0"}).status, 2);  // not a sweep
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
      // A body's key, named by the body's name in the axis and by its place in the scenario's
      // message: the axis's line is found all the same.
      {head + "[[axis]]\nkey = \"box.mass.sigma\"\nvalues = [-1.0]\n",
       ":3: axis[0].key: case 0 (box.mass.sigma = -1): body[0].mass.sigma:"},
      // Found in a code review: keys each fine in the base scenario, but one under the number
      // the other sets, ended the program (an empty std::function called).
      {head + "[[axis]]\nkey = \"release.extra\"\nvalues = [1.0]\n"
              "[[axis]]\nkey = \"release.extra.deeper\"\nvalues = [2.0]\n",
       ":6: axis[1].key: release.extra.deeper cannot be set once the other axes are"},
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
