#include "app/commands.hpp"

#include <CLI/CLI.hpp>
#include <iostream>

#include "core/errors.hpp"
#include "core/version.hpp"
#include "io/atmosphere_table.hpp"
#include "io/trace_report.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"

namespace strewn {

namespace {

struct TraceArguments {
  std::string scenario;
  std::string body;
  bool json = false;
  bool csv = false;
};

int run_trace(const TraceArguments& a, std::ostream& out) {
  const Scenario scenario = load_scenario(a.scenario);
  const World world = build_world(scenario);
  const TraceRecord trace = trace_body(scenario, world, a.body);
  if (a.json)
    out << trace_json(trace).dump(2) << '\n';
  else if (a.csv)
    write_trace_csv(out, trace);
  else
    write_trace_text(out, trace);
  return trace.result.status == FlightStatus::landed ? kExitDone : kExitFailure;
}

}  // namespace

int run_command_line(int argc, const char* const* argv, std::ostream& out, std::ostream& err) {
  CLI::App app{
      "strewn: Monte Carlo engine for drop and drift safety studies.\n"
      "Results are engineering estimates; exclusion zones are set by the responsible "
      "authority under local rules.",
      "strewn"};
  app.set_version_flag("--version", std::string("strewn ") + kEngineVersion);
  app.require_subcommand(1);

  TraceArguments trace;
  auto* trace_cmd = app.add_subcommand("trace",
                                       "Fly one body with every input at its median and "
                                       "report its impact, trajectory and drag regime");
  trace_cmd->add_option("SCENARIO", trace.scenario, "Scenario file (TOML)")->required();
  trace_cmd->add_option("--body", trace.body, "Name of the body to fly (default: the first)");
  auto* json_flag = trace_cmd->add_flag("--json", trace.json, "Print JSON");
  trace_cmd->add_flag("--csv", trace.csv, "Print the trajectory as CSV")->excludes(json_flag);

  AtmosphereRequest atmosphere;
  auto* atmosphere_cmd =
      app.add_subcommand("atmosphere", "Print the U.S. Standard Atmosphere 1976 table");
  atmosphere_cmd->add_option("--offset", atmosphere.offset, "Temperature offset, K");
  atmosphere_cmd->add_option("--top", atmosphere.top, "Highest altitude, m (default 20000)");
  atmosphere_cmd->add_option("--step", atmosphere.step, "Altitude step, m (default 1000)");
  atmosphere_cmd->add_flag("--csv", atmosphere.csv, "Print CSV");

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    // Help and --version are "errors" with exit code 0 that print to `out`.
    const int code = app.exit(e, out, err);
    return code == 0 ? kExitDone : kExitInvalid;
  }

  try {
    if (*trace_cmd) return run_trace(trace, out);
    if (*atmosphere_cmd) {
      write_atmosphere(out, atmosphere);
      return kExitDone;
    }
  } catch (const ScenarioError& e) {
    for (const auto& problem : e.problems()) err << "error: " << problem.describe() << '\n';
    err << e.problems().size() << (e.problems().size() == 1 ? " problem" : " problems")
        << " found; nothing was run.\n";
    return kExitInvalid;
  } catch (const UsageError& e) {
    err << "error: " << e.what() << '\n';
    return kExitInvalid;
  } catch (const IoError& e) {
    err << "error: " << e.what() << '\n';
    return kExitFailure;
  } catch (const std::exception& e) {
    err << "error: " << e.what() << '\n';
    return kExitFailure;
  }
  return kExitInvalid;
}

}  // namespace strewn
