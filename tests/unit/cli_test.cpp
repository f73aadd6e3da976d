// The command line end to end (app/commands.cpp, the code behind the strewn binary): exit codes,
// messages, and `trace --json` on every shipped and test scenario against an independent
// tight-tolerance integration of the same physics (Boost.Odeint, reference_flight.hpp).
#include <fcntl.h>
#include <gtest/gtest.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <variant>

#include "app/commands.hpp"
#include "command_line.hpp"
#include "reference_flight.hpp"
#include "scenario/world.hpp"
#include "store/results_file.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;

std::vector<std::string> scenarios() {
  std::vector<std::string> files;
  for (const char* folder : {"/inputs", "/tests/data"})
    for (const auto& entry :
         std::filesystem::directory_iterator(STREWN_SOURCE_DIR + std::string(folder)))
      if (entry.path().extension() == ".toml") files.push_back(entry.path().string());
  std::sort(files.begin(), files.end());
  return files;
}

// Acceptance: `strewn trace --json` on any scenario lands within 0.05 m (the default tolerance)
// of an independent tight-tolerance integration of the same physics.
TEST(Cli, TraceJsonLandsOnTheIndependentReference) {
  const auto files = scenarios();
  ASSERT_GE(files.size(), 5u);
  for (const auto& file : files) {
    SCOPED_TRACE(file);
    const Scenario scenario = load_scenario(file);
    for (const auto& body : scenario.bodies) {
      const CommandResult r = run({"trace", file, "--body", body.name, "--json"});
      ASSERT_EQ(r.status, 0) << r.err;
      const auto json = nlohmann::json::parse(r.out);
      for (const char* key : {"time", "east", "north", "speed", "energy"})
        ASSERT_TRUE(json["impact"].contains(key)) << key;
      ASSERT_FALSE(json["trajectory"].empty());
      ASSERT_TRUE(json["regime"].contains("reynolds"));
      const World world = build_world(scenario);
      const FlightInputs in =
          nominal_flight(scenario, static_cast<std::size_t>(scenario.body_index(body.name)));
      const Environment env{&world.medium, in.conditions, &world.wind, world.ground};
      // The reference meets the scenario's own ground (a terrain's surface too), located by
      // TOMS 748 on Odeint's dense output.
      test::ReferenceFrame frame;
      frame.ground = [&](double east, double north) {
        return std::visit([&](const auto& g) { return g.height(east, north); }, world.ground);
      };
      const auto reference = test::reference_fly(in.body, env, in.release, 1e-10, 1e6, frame);
      ASSERT_TRUE(reference.landed);
      const double miss =
          std::hypot(json["impact"]["east"].get<double>() - reference.position.x(),
                     json["impact"]["north"].get<double>() - reference.position.y());
      EXPECT_LE(miss, 0.05) << body.name;
      EXPECT_NEAR(json["impact"]["time"].get<double>(), reference.time, 1e-2);
      EXPECT_NEAR(json["impact"]["speed"].get<double>(), reference.velocity.norm(), 1e-2);
    }
  }
}

TEST(Cli, TraceFormats) {
  const std::string file = STREWN_SOURCE_DIR "/inputs/ridge-drop.toml";
  const CommandResult text = run({"trace", file});
  EXPECT_EQ(text.status, 0);
  EXPECT_NE(text.out.find("impact"), std::string::npos);
  EXPECT_NE(text.out.find("settling  the full equations"), std::string::npos);  // said either way
  EXPECT_NE(text.out.find("responsible authority"), std::string::npos);         // the cautions
  const CommandResult csv = run({"trace", file, "--csv"});
  EXPECT_EQ(csv.status, 0);
  EXPECT_EQ(csv.out.rfind("time_s,east_m,north_m,altitude_m", 0), 0u);
  EXPECT_GT(std::count(csv.out.begin(), csv.out.end(), '\n'), 50);
  EXPECT_EQ(run({"trace", file, "--csv", "--json"}).status, 2);  // one format at a time
}

TEST(Cli, BadInputExitsWithStatusTwoAndNamesKeyAndLine) {
  const test::ScratchFolder dir("cli-test");
  const auto file = (dir / "negative-mass.toml").string();
  std::ofstream(file) << "[release]\naltitude = 100.0\n[[body]]\nmass = -2.0\n[body.drag]\n"
                         "model = \"area\"\ncd = 1.0\narea = 0.1\n";
  const CommandResult r = run({"trace", file});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find(file + ":4: body[0].mass: must be positive"), std::string::npos) << r.err;
  EXPECT_TRUE(r.out.empty());
  EXPECT_EQ(run({"trace", "/nonexistent.toml"}).status, 2);
  EXPECT_EQ(run({"trace", STREWN_SOURCE_DIR "/inputs/ridge-drop.toml", "--body", "nope"}).status,
            2);
  EXPECT_EQ(run({}).status, 2);
  EXPECT_EQ(run({"fly"}).status, 2);
}

TEST(Cli, VersionAndAtmosphere) {
  const CommandResult v = run({"--version"});
  EXPECT_EQ(v.status, 0);
  EXPECT_NE(v.out.find("strewn 0."), std::string::npos);
  const CommandResult a = run({"atmosphere", "--csv", "--top", "11000", "--step", "1000"});
  EXPECT_EQ(a.status, 0);
  std::istringstream lines(a.out);
  std::string header, sea_level;
  std::getline(lines, header);
  std::getline(lines, sea_level);
  EXPECT_EQ(header.rfind("altitude_m,temperature_K,pressure_Pa,density_kg_m3", 0), 0u);
  // Sea level of the U.S. Standard Atmosphere 1976: 288.15 K, 101325 Pa, 1.225 kg/m^3.
  EXPECT_EQ(sea_level.rfind("0.000,288.150,101325,1.225", 0), 0u) << sea_level;
  EXPECT_EQ(std::count(a.out.begin(), a.out.end(), '\n'), 13);
  EXPECT_EQ(run({"atmosphere", "--top", "90000"}).status, 2);
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

TEST(CliRun, WritesTheResultsFileAndTheSummary) {
  const test::ScratchFolder dir("cli-run");
  const auto file = (dir / "box.h5").string();
  const CommandResult r = run({"run", STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml", "-n",
                               "300", "-o", file, "--quiet", "--json", "-j", "2"});
  ASSERT_EQ(r.status, 0) << r.err;
  const auto json = nlohmann::json::parse(r.out);
  EXPECT_EQ(json["samples"], 300);
  EXPECT_EQ(json["completed"].get<int>() + json["failed"].get<int>(), 300);
  for (const char* group : {"box", "all"}) {
    const auto& g = json["footprint"][group];
    ASSERT_TRUE(g.contains("mean")) << group;
    ASSERT_EQ(g["containment"].size(), 4u);  // the default levels
    EXPECT_TRUE(g["containment"][0].contains("radius_upper"));
    EXPECT_TRUE(g["energy"].contains("exceed_upper"));
  }
  // 300 samples support the 0.99 bound (299 needed) but not the 0.999 one (2995 needed).
  EXPECT_FALSE(json["footprint"]["all"]["containment"][2]["radius_upper"].is_null());
  EXPECT_TRUE(json["footprint"]["all"]["containment"][3]["radius_upper"].is_null());
  EXPECT_EQ(json["footprint"]["all"]["containment"][3]["samples_needed"], 2995);
  EXPECT_TRUE(std::filesystem::exists(file));
  for (const auto& entry : std::filesystem::directory_iterator(dir.path()))
    EXPECT_EQ(entry.path().string().find(".partial"), std::string::npos);  // nothing half-written
  // The same seed again gives the same summary (replacing the file: --force).
  EXPECT_EQ(run({"run", STREWN_SOURCE_DIR "/tests/data/canopy-by-height.toml", "-n", "300", "-o",
                 file, "--quiet", "--json", "-j", "1", "--force"})
                .out,
            r.out);
}

TEST(CliRun, ReplayCheckAndRefusals) {
  const std::string scenario = STREWN_SOURCE_DIR "/inputs/drone-survey.toml";
  const CommandResult replay = run({"run", scenario, "--sample", "3"});
  ASSERT_EQ(replay.status, 0) << replay.err;
  const auto json = nlohmann::json::parse(replay.out);
  EXPECT_EQ(json["bodies"].size(), 2u);
  EXPECT_TRUE(json["bodies"][0]["inputs"].contains("pod.mass"));
  EXPECT_EQ(run({"run", scenario, "--sample", "999999"}).status, 2);

  const CommandResult check = run({"check", scenario});
  EXPECT_EQ(check.status, 0);
  EXPECT_NE(check.out.find("drone.drag.area"), std::string::npos);
  EXPECT_NE(check.out.find("wind.bias_east"), std::string::npos);

  // Correlations that cannot hold together: status 2 with file, line and key path, nothing written.
  const test::ScratchFolder dir("cli-correlation");
  const auto bad = (dir / "bad.toml").string();
  std::ofstream(bad)
      << "[release]\naltitude = 500.0\n[[body]]\nmass = { dist = \"normal\", mean = 5.0, sd = 0.5 "
         "}\n"
         "[body.drag]\nmodel = \"area\"\ncd = { dist = \"uniform\", min = 0.9, max = 1.1 }\n"
         "area = { dist = \"uniform\", min = 0.1, max = 0.2 }\n"
         "[[correlation]]\nbetween = [\"body.mass\", \"body.drag.cd\"]\nrho = 0.95\n"
         "[[correlation]]\nbetween = [\"body.drag.cd\", \"body.drag.area\"]\nrho = 0.95\n"
         "[[correlation]]\nbetween = [\"body.mass\", \"body.drag.area\"]\nrho = -0.95\n";
  const CommandResult refused = run({"run", bad, "-o", (dir / "out.h5").string(), "--quiet"});
  EXPECT_EQ(refused.status, 2);
  EXPECT_NE(refused.err.find(
                "bad.toml:16: correlation[2].between: the correlations cannot hold together"),
            std::string::npos)
      << refused.err;
  EXPECT_FALSE(std::filesystem::exists(dir / "out.h5"));
  EXPECT_EQ(run({"check", bad}).status, 2);

  // An output folder that cannot be made (under a regular file): status 2 before any flight,
  // nothing written. A folder that is merely missing is made (see OutputFoldersAreMade).
  const std::string under_file = std::string(scenario) + "/x.h5";
  const CommandResult blocked = run({"run", scenario, "-n", "10", "-o", under_file, "--quiet"});
  EXPECT_EQ(blocked.status, 2);
  EXPECT_NE(blocked.err.find("cannot make the folder"), std::string::npos) << blocked.err;
  // A sample count of zero is refused in plain words, not with the largest double (309 digits).
  const CommandResult zero = run({"run", scenario, "-n", "0"});
  EXPECT_EQ(zero.status, 2);
  EXPECT_NE(zero.err.find("-n: expected a whole number from 1 to 2000000000, got \"0\""),
            std::string::npos)
      << zero.err;
  EXPECT_LT(zero.err.size(), 200u) << zero.err;
  EXPECT_EQ(run({"run", scenario, "-j", "0"}).status, 2);
  EXPECT_EQ(run({"run", scenario, "--seed", "-1"}).status, 2);
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// One rule for paths: every path written in a scenario (tables, soundings, output) is read
// against the scenario's own folder, whatever the working directory; a path on the command line
// against the working directory; a missing output folder is made.
TEST(CliPaths, ScenarioPathsFromItsFolderCommandLinePathsFromTheWorkingDirectory) {
  namespace fs = std::filesystem;
  const test::ScratchFolder root("cli-paths");
  const fs::path here = root / "study", elsewhere = root / "elsewhere";
  fs::create_directories(here);
  fs::create_directories(elsewhere);
  fs::copy_file(STREWN_SOURCE_DIR "/tests/data/sounding.csv", here / "sounding.csv");
  fs::copy_file(STREWN_SOURCE_DIR "/tests/data/winds.csv", here / "winds.csv");
  std::ofstream(here / "scenario.toml")
      << "[medium]\nmodel = \"profile\"\nprofile = \"sounding.csv\"\n[wind]\nfile = \"winds.csv\"\n"
         "[release]\naltitude = 1500.0\n[[body]]\nname = \"crate\"\nmass = 20.0\n[body.drag]\n"
         "model = \"area\"\ncd = 1.0\narea = 0.3\n[output]\nfile = \"results/crate.h5\"\n";
  const fs::path before = fs::current_path();
  fs::current_path(elsewhere);
  const CommandResult from_file =
      run({"run", (here / "scenario.toml").string(), "-n", "20", "--quiet"});
  EXPECT_EQ(from_file.status, 0) << from_file.err;
  EXPECT_TRUE(fs::exists(here / "results" / "crate.h5"));  // the folder made, beside the scenario
  EXPECT_FALSE(fs::exists(elsewhere / "results"));
  // `check` shows every file as it is read: from the scenario's folder.
  const auto resolved =
      nlohmann::json::parse(run({"check", (here / "scenario.toml").string(), "--json"}).out);
  EXPECT_EQ(resolved["medium"]["profile"], (here / "sounding.csv").string());
  EXPECT_EQ(resolved["wind"]["file"], (here / "winds.csv").string());
  EXPECT_EQ(resolved["output"]["file"], (here / "results" / "crate.h5").string());
  // -o is the command line's: from the working directory, its folders made too.
  const CommandResult from_line = run(
      {"run", (here / "scenario.toml").string(), "-n", "20", "--quiet", "-o", "out/deep/crate.h5"});
  EXPECT_EQ(from_line.status, 0) << from_line.err;
  EXPECT_TRUE(fs::exists(elsewhere / "out" / "deep" / "crate.h5"));
  // The same for the report files.
  EXPECT_EQ(run({"report", "out/deep/crate.h5", "--html", "pages/crate.html"}).status, 0);
  EXPECT_TRUE(fs::exists(elsewhere / "pages" / "crate.html"));
  fs::current_path(before);
}

// Small defects a first user met.
TEST(CliDefects, TraceOfAFloatingBodyHasNoImpactAndListsTheValuesFlown) {
  const CommandResult r =
      run({"trace", STREWN_SOURCE_DIR "/tests/data/extreme/lighter-than-air.toml", "--json"});
  EXPECT_EQ(r.status, 3);  // it did not land
  const auto j = nlohmann::json::parse(r.out);
  EXPECT_EQ(j["status"], "floats");
  EXPECT_TRUE(j["impact"].is_null());  // not an all-zero impact
  EXPECT_TRUE(j["end"].is_object());
  ASSERT_TRUE(j["inputs"].is_object());  // the values flown, not a sentence
  EXPECT_TRUE(j["inputs"].contains("release.altitude"));
  bool mass = false;
  for (const auto& [key, value] : j["inputs"].items())
    mass = mass || (key.size() > 5 && key.substr(key.size() - 5) == ".mass" && value.is_number());
  EXPECT_TRUE(mass) << j["inputs"].dump();
}

TEST(CliDefects, CrossrangeSaysWhichSideOfTheTrack) {
  // A crate released flying north into a wind from the east drifts west: left of its track.
  const test::ScratchFolder dir("cli-side");
  const auto file = (dir / "side.toml").string();
  std::ofstream(file) << "[wind]\nlayers = [{ altitude = 0.0, speed = 8.0, from = 90.0 }]\n"
                         "[release]\naltitude = 500.0\nspeed = 10.0\ntrack = 0.0\n[[body]]\n"
                         "mass = 5.0\n[body.drag]\nmodel = \"area\"\ncd = 1.0\narea = 0.5\n";
  const CommandResult r = run({"trace", file});
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find(" m left of track"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("right of track"), std::string::npos) << r.out;
  const auto j = nlohmann::json::parse(run({"trace", file, "--json"}).out);
  EXPECT_LT(j["impact"]["crossrange"].get<double>(), 0.0);  // negative: left
}

TEST(CliDefects, CsvRuleRowsHoldProbabilitiesNotMetres) {
  const test::ScratchFolder dir("cli-csv");
  const auto h5 = (dir / "ridge.h5").string(), csv = (dir / "figures.csv").string();
  ASSERT_EQ(
      run({"run", STREWN_SOURCE_DIR "/inputs/ridge-drop.toml", "-n", "300", "-o", h5, "--quiet"})
          .status,
      0);
  ASSERT_EQ(run({"report", h5, "--csv", csv}).status, 0);
  std::istringstream lines(test::slurp(csv));
  std::string line;
  bool rule = false;
  while (std::getline(lines, line)) {
    if (line.find(",rule_zone_radius,") == std::string::npos) continue;
    rule = true;
    // group,figure,level,estimate,interval_lower,interval_upper,bound_upper,confidence,unit,note
    std::vector<std::string> cells{""};
    for (char ch : line.substr(0, line.find(",\"")))
      if (ch == ',')
        cells.emplace_back();
      else
        cells.back() += ch;
    ASSERT_GE(cells.size(), 9u) << line;
    EXPECT_EQ(cells[2], "") << "level: " << line;  // no level for a rule
    EXPECT_EQ(cells[8], "") << "unit: " << line;   // a probability has no unit
    EXPECT_NE(line.find("accepted probability 0.001 of landing outside 900 m"), std::string::npos)
        << line;
  }
  EXPECT_TRUE(rule);
  // A figure without bounds (the mean) carries no confidence.
  const std::string all_rows = test::slurp(csv);
  const std::size_t mean = all_rows.find("\"bundle\",mean_east,");
  ASSERT_NE(mean, std::string::npos);
  const std::string mean_row = all_rows.substr(mean, all_rows.find('\n', mean) - mean);
  EXPECT_NE(mean_row.find(",,,,,m,"), std::string::npos) << mean_row;
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// Found by a tester: an output that is a device, a pipe or a link was replaced by a regular file
// (as root, /dev/null itself), and an output naming a file the command reads overwrote it.
// Each is refused with status 2 before anything runs, and left as it was.
TEST(CliPaths, UnsafeOutputsAreRefusedAndLeftAlone) {
  namespace fs = std::filesystem;
  const test::ScratchFolder dir("cli-unsafe");
  const std::string scenario = (dir / "s.toml").string();
  std::ofstream(scenario) << "[release]\naltitude = 300.0\n[[body]]\nmass = 1.0\n[body.drag]\n"
                             "model = \"area\"\ncd = 1.0\narea = 0.05\n[study]\nsamples = 20\n";
  const fs::path pipe = dir / "pipe", link = dir / "link", target = dir / "target.h5";
  ASSERT_EQ(::mkfifo(pipe.c_str(), 0644), 0);
  std::ofstream(target) << "keep me";
  fs::create_symlink(target, link);
  for (const fs::path& out : {pipe, link, fs::path(scenario)}) {
    const CommandResult r = run({"run", scenario, "-o", out.string(), "--quiet"});
    EXPECT_EQ(r.status, 2) << out << ": " << r.err;
    EXPECT_EQ(run({"check", scenario}).status, 0);
  }
  EXPECT_TRUE(fs::is_fifo(fs::symlink_status(pipe)));
  EXPECT_TRUE(fs::is_symlink(fs::symlink_status(link)));
  EXPECT_EQ(test::slurp(target), "keep me");
  EXPECT_NE(test::slurp(scenario).find("[release]"), std::string::npos);
  // `report` neither writes over the results file it reads, nor into a folder or a pipe.
  const std::string h5 = (dir / "r.h5").string();
  ASSERT_EQ(run({"run", scenario, "-o", h5, "--quiet"}).status, 0);
  const std::string before = test::slurp(h5);
  EXPECT_EQ(run({"report", h5, "--csv", h5}).status, 2);
  EXPECT_EQ(run({"report", h5, "--svg", dir.string()}).status, 2);
  EXPECT_EQ(run({"report", h5, "--html", pipe.string()}).status, 2);
  EXPECT_EQ(test::slurp(h5), before);
  // Huge counts are refused in words, not by a failed allocation.
  for (const char* n : {"18446744073709551615", "9223372036854775808", "2000000001"})
    EXPECT_EQ(run({"run", scenario, "-n", n}).status, 2) << n;
  EXPECT_EQ(run({"run", scenario, "-j", "2147483647"}).status, 2);
}

// Found in a code review: a link planted under the checkpoint's name, or under the name the
// results are written under before they are complete, had the study write through it; and the
// leftovers of killed runs were recognised by process id alone, so on a folder shared by several
// machines one run removed another machine's live temporary file.
TEST(CliPaths, PlantedLinksAreNotFollowedAndOtherMachinesFilesAreLeftAlone) {
  namespace fs = std::filesystem;
  const test::ScratchFolder dir("cli-planted");
  const std::string scenario = (dir / "s.toml").string();
  std::ofstream(scenario) << "[release]\naltitude = 300.0\n[[body]]\nmass = 1.0\n[body.drag]\n"
                             "model = \"area\"\ncd = 1.0\narea = 0.05\n[study]\nsamples = 20\n";
  const fs::path target = dir / "target";
  std::ofstream(target) << "keep me";
  const std::string out = (dir / "r.h5").string();
  // A link under the checkpoint's name: refused, in words, before anything runs.
  fs::create_symlink(target, out + ".checkpoint");
  CommandResult r = run({"run", scenario, "-o", out, "--quiet"});
  EXPECT_EQ(r.status, 2) << r.err;
  EXPECT_NE(r.err.find("checkpoint"), std::string::npos) << r.err;
  fs::remove(out + ".checkpoint");
  // A link under this process's own temporary name: replaced by a new file, never followed.
  fs::create_symlink(target, temporary_path_of(out));
  r = run({"run", scenario, "-o", out, "--quiet"});
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(test::slurp(target.string()), "keep me");
  EXPECT_FALSE(fs::exists(fs::symlink_status(temporary_path_of(out))));
  // Leftovers: this machine's of a process that is gone are removed; another machine's, and
  // those of a live process (this one's parent), are left.
  const pid_t child = ::fork();
  if (child == 0) ::_exit(0);
  ASSERT_GT(child, 0);
  ::waitpid(child, nullptr, 0);
  const std::string suffix = partial_suffix();
  const std::string host_part = suffix.substr(0, suffix.rfind('-') + 1);  // ".partial-<host>-"
  const std::string dead = out + host_part + std::to_string(child);
  const std::string other_machine = out + ".partial-another-machine-" + std::to_string(child);
  const std::string live = out + host_part + std::to_string(::getppid());
  // Named for a dead process of this machine, but held locked (as HDF5 locks a file it writes):
  // another machine of the same name is writing it.
  const std::string locked = out + host_part + std::to_string(child) + "0";
  for (const auto& f : {dead, other_machine, live, locked}) std::ofstream(f) << "left";
  const int lock = ::open(locked.c_str(), O_RDONLY);
  ASSERT_EQ(::flock(lock, LOCK_EX | LOCK_NB), 0);
  r = run({"run", scenario, "-o", out, "--quiet", "--force"});
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_FALSE(fs::exists(dead));
  EXPECT_TRUE(fs::exists(other_machine));
  EXPECT_TRUE(fs::exists(live));
  EXPECT_TRUE(fs::exists(locked));
  ::close(lock);
  // Files are made as any program makes them, 0666 less the umask (a group sharing a folder
  // shares them): the results file, and a report below (found in a read of the code: reports
  // and checkpoints were 0644 whatever the umask).
  const mode_t mask = ::umask(002);
  ::umask(mask);
  EXPECT_EQ(fs::status(out).permissions() & fs::perms::all, static_cast<fs::perms>(0666 & ~mask));
  // A report is written new as well: a link under its temporary name is not followed.
  fs::create_symlink(target, temporary_path_of((dir / "m.svg").string()));
  EXPECT_EQ(run({"report", out, "--svg", (dir / "m.svg").string()}).status, 0);
  EXPECT_EQ(test::slurp(target.string()), "keep me");
  EXPECT_EQ(fs::status(dir / "m.svg").permissions() & fs::perms::all,
            static_cast<fs::perms>(0666 & ~mask));
  // A link beside a report named like a checkpoint is no business of the report's.
  fs::create_symlink(target, (dir / "m.svg.checkpoint"));
  EXPECT_EQ(run({"report", out, "--svg", (dir / "m.svg").string(), "--force"}).status, 0);
  // A name too long for the file system once strewn adds its temporary suffix: refused in words.
  const std::string long_name = (dir / (std::string(240, 'n') + ".h5")).string();
  r = run({"run", scenario, "-o", long_name, "--quiet"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("the file's name is too long"), std::string::npos) << r.err;
}

// Found by a tester: a replayed sample of a floating body gave an all-zero impact.
TEST(CliDefects, ReplayOfAFloatingBodyHasNoImpact) {
  const CommandResult r =
      run({"run", STREWN_SOURCE_DIR "/tests/data/extreme/lighter-than-air.toml", "--sample", "3"});
  EXPECT_EQ(r.status, 3);
  const auto j = nlohmann::json::parse(r.out);
  for (const auto& body : j["bodies"]) {
    EXPECT_TRUE(body["impact"].is_null()) << body.dump();
    EXPECT_TRUE(body["end"].is_object());
  }
}

}  // namespace
}  // namespace strewn
