#include "app/commands.hpp"

#include <fcntl.h>
#include <tbb/global_control.h>
#include <time.h>
#include <unistd.h>
#include <CLI/CLI.hpp>

#include <array>
#include <atomic>
#include <cerrno>
#include <charconv>
#include <chrono>
#include <csignal>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <filesystem>
#include <functional>
#include <iostream>
#include <new>
#include <optional>
#include <sstream>

#include "app/rank_signals.hpp"
#include "app/read_deadline.hpp"
#include "cluster/job.hpp"
#include "cluster/rank_flights.hpp"
#include "cluster/sweep.hpp"
#include "core/errors.hpp"
#include "core/memory_limit.hpp"
#include "core/text.hpp"
#include "core/version.hpp"
#include "report/atmosphere_table.hpp"
#include "report/footprint_report.hpp"
#include "report/json_text.hpp"
#include "report/report_files.hpp"
#include "report/scenario_report.hpp"
#include "report/trace_report.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"
#include "store/output_file.hpp"
#include "store/results_file.hpp"

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
    out << json_text(trace_json(trace)) << '\n';
  else if (a.csv)
    write_trace_csv(out, trace);
  else
    write_trace_text(out, trace);
  return trace.result.status == FlightStatus::landed ? kExitDone : kExitFailure;
}

struct RunArguments {
  std::string scenario;
  std::uint64_t samples = 0;  // 0: the scenario's
  std::optional<std::uint64_t> seed;
  int threads = 0;  // 0: all
  std::string output;
  std::optional<std::uint64_t> sample;
  bool quiet = false;
  bool json = false;
  bool timing = false;
  bool resume = false;
  bool force = false;          // replace a results file already there
  bool allow_outside = false;  // let the scenario's output.file lie outside its folder
};

// Set by SIGINT, SIGTERM and SIGHUP while a study runs (a lock-free atomic exchange is safe in a
// handler). The first signal stops the run cleanly, keeping every finished sample; a second one
// ends the process at once, removing the temporary results file and the lock file
// (store/output_file.hpp, RemovedOnSignal) and leaving the checkpoint, whose records are each
// on disk before the next is begun (a torn last one is cut off on --resume). A repeat of the
// first signal within a quarter of a second is not a second request: one Ctrl-C reaches every
// process of the terminal's group, and a launcher that forwards it delivers it once more.
std::atomic<bool> stop_requested{false};
std::atomic<int> first_signal{0};
std::atomic<std::int64_t> first_signal_ns{0};
static_assert(std::atomic<bool>::is_always_lock_free && std::atomic<int>::is_always_lock_free &&
              std::atomic<std::int64_t>::is_always_lock_free);

std::int64_t monotonic_ns() {  // clock_gettime is async-signal-safe (POSIX.1-2008, signal(7))
  timespec now{};
  ::clock_gettime(CLOCK_MONOTONIC, &now);
  return static_cast<std::int64_t>(now.tv_sec) * 1'000'000'000 + now.tv_nsec;
}

extern "C" void request_stop(int signal_number) {
  // The first signal is the one that claims first_signal. A signal sent to the process may run
  // this handler on two threads at once: the other sees the claim before the time is set (0),
  // and counts as within the quarter second.
  int claimed = 0;
  if (first_signal.compare_exchange_strong(claimed, signal_number)) {
    first_signal_ns = monotonic_ns();
    stop_requested = true;
    return;
  }
  const std::int64_t since = first_signal_ns;
  if (signal_number == claimed && (since == 0 || monotonic_ns() - since < 250'000'000)) return;
  remove_files_held_for_signals();
  static const char text[] =
      "\nstrewn: stopped at once by a second signal; the checkpoint keeps the samples written to "
      "it: run the same command with --resume to go on\n";
  [[maybe_unused]] const ssize_t ignored = ::write(STDERR_FILENO, text, sizeof text - 1);
  ::_exit(kExitInterrupted);
}

// Installs the handlers for the life of a run and restores the previous ones after.
class StopOnSignals {
 public:
  StopOnSignals() {
    stop_requested = false;
    first_signal = 0;
    first_signal_ns = 0;
    struct sigaction action {};
    action.sa_handler = request_stop;
    action.sa_flags = SA_RESTART;  // reads and writes under way go on rather than fail (EINTR)
    sigemptyset(&action.sa_mask);
    for (std::size_t k = 0; k < kSignals.size(); ++k) sigaction(kSignals[k], &action, &old_[k]);
  }
  ~StopOnSignals() {
    for (std::size_t k = 0; k < kSignals.size(); ++k) sigaction(kSignals[k], &old_[k], nullptr);
  }
  StopOnSignals(const StopOnSignals&) = delete;
  StopOnSignals& operator=(const StopOnSignals&) = delete;

 private:
  static constexpr std::array<int, 3> kSignals{SIGINT, SIGTERM, SIGHUP};
  std::array<struct sigaction, 3> old_{};
};

// The results file: -o, else the scenario's [output] file, else results/<scenario name>.h5.
std::string output_path(const RunArguments& a, const Scenario& s) {
  if (!a.output.empty()) return a.output;
  if (!s.output.file.empty()) return s.output.file;
  return "results/" + std::filesystem::path(a.scenario).stem().string() + ".h5";
}

// Where the results file's path came from, for messages: the scenario's [output] file (its file,
// line and key), or the command line (nothing to add).
std::string output_origin(const RunArguments& a, const Scenario& s) {
  return !a.output.empty() || s.output.file.empty()
             ? ""
             : s.path + ":" + std::to_string(s.output.file_line) + ": output.file: ";
}

// What the command line allows the results file: replacing a file already there (--force), and,
// for the file the scenario names, lying outside the scenario's folder. A scenario may come from
// someone else: what it names is kept beside it unless the user allows more, by naming the file
// with -o or by --allow-outside.
OutputRules output_rules(const RunArguments& a, const Scenario& s) {
  OutputRules rules;
  rules.replace = a.force;
  if (a.output.empty() && !s.output.file.empty() && !a.allow_outside) {
    const std::filesystem::path own = std::filesystem::path(s.path).parent_path();
    rules.within = own.empty() ? "." : own.string();
    rules.within_what = "the scenario's folder";
  }
  return rules;
}

// Refuses a study whose rows and statistics would not fit in the memory this process may use
// (the machine's, or a tighter ulimit or control-group limit), saying how much they would take
// and which limit stops them (ranks 0 and 1 hold every row, so more ranks do not help).
void check_memory(const Scenario& s, const SampleModel& model) {
  const auto samples = static_cast<double>(
      s.study.target_width ? std::max(s.study.max_samples, s.study.samples) : s.study.samples);
  // Measured peaks (maximum resident size, `run` on 2 threads; docs/cluster.md, "Sizing"): 64 MiB
  // for the program, then per row 230 B (the fixed columns, the writer's and the statistics'
  // working arrays) and 12 B per sampled input or recorded choice (its column, and its ranks for
  // the sensitivity). From 1 body and 2 inputs to 256 bodies and 512 inputs, the peak stayed
  // within 0.80 to 0.98 of this estimate.
  const double per_row = 230.0 + 12.0 * static_cast<double>(model.column_names().size());
  const double need = 64.0 * 1048576.0 + samples * static_cast<double>(model.bodies()) * per_row;
  const MemoryLimit have = memory_limit();
  if (have.bytes > 0.0 && need > 0.8 * have.bytes) {
    char text[400];
    std::snprintf(text, sizeof text,
                  "%.0f samples would need about %.2f GiB of memory for their rows and "
                  "statistics, more than the %.2f GiB a study may take (80 %% of %s, %.2f "
                  "GiB). Run fewer samples, or several studies with different seeds",
                  samples, need / 1073741824.0, 0.8 * have.bytes / 1073741824.0, have.what.c_str(),
                  have.bytes / 1073741824.0);
    throw ScenarioError(
        {{s.path, s.study.target_width ? "study.max_samples" : "study.samples",
          s.study.target_width ? s.study.max_samples_line : s.study.samples_line, text}});
  }
}

int run_replay(const RunArguments& a, const SampleModel& model, std::ostream& out) {
  const Scenario& s = model.scenario();
  // A study grown toward study.target_width may reach study.max_samples.
  const auto limit =
      static_cast<std::uint64_t>(s.study.target_width ? s.study.max_samples : s.study.samples);
  if (*a.sample >= limit)
    throw UsageError("--sample " + std::to_string(*a.sample) + " is outside the study's " +
                     std::to_string(limit) + " samples");
  nlohmann::json j{{"sample", *a.sample}, {"seed", s.study.seed}};
  bool all_landed = true;
  for (std::size_t b = 0; b < model.bodies(); ++b) {
    TrajectoryRecorder recorder;
    const ReplayedRow row = replay_row(model, *a.sample, b, &recorder, 0.0);
    const std::vector<std::string> names = model.column_names();
    nlohmann::json inputs = nlohmann::json::object(), choices = nlohmann::json::object();
    for (std::size_t d = 0; d < row.values.size(); ++d)
      (d < model.sampler().dimensions() ? inputs : choices)[names[d]] = row.values[d];

    nlohmann::json points = nlohmann::json::array();
    for (const auto& p : recorder.points())
      points.push_back(
          {p.point.time, p.point.position.x(), p.point.position.y(), p.point.position.z()});
    const auto& r = row.result;
    all_landed = all_landed && r.status == FlightStatus::landed;
    j["bodies"].push_back(
        {{"body", s.bodies[b].name},
         {"status", to_string(r.status)},
         {"canopy", to_string(row.inputs.body.canopy_state())},
         // No impact for a flight that did not land: where it ended.
         {"impact", r.status == FlightStatus::landed ? impact_json(r) : nlohmann::json(nullptr)},
         {"end", r.status == FlightStatus::landed ? nlohmann::json(nullptr)
                                                  : nlohmann::json{{"time", r.time},
                                                                   {"east", r.position.x()},
                                                                   {"north", r.position.y()},
                                                                   {"altitude", r.position.z()}}},
         {"inputs", inputs},
         {"choices", choices},
         {"warnings", flight_warnings(r, row.limits, s.study.tolerance)},
         {"trajectory_columns", {"time", "east", "north", "altitude"}},
         {"trajectory", points}});
  }
  out << json_text(j) << '\n';
  return all_landed ? kExitDone : kExitFailure;
}

// The progress line of a study on a terminal: samples done, rate and time left.
std::function<void(std::uint64_t)> progress_line(std::ostream& err, std::uint64_t samples,
                                                 std::chrono::steady_clock::time_point start) {
  return [&err, samples, start](std::uint64_t done) {
    const double seconds =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    const double rate = static_cast<double>(done) / std::max(seconds, 1e-9);
    char line[160];
    std::snprintf(line, sizeof line, "\r  %llu / %llu samples, %.0f per second, %.0f s left   ",
                  static_cast<unsigned long long>(done), static_cast<unsigned long long>(samples),
                  rate, static_cast<double>(samples - done) / std::max(rate, 1e-9));
    err << line << std::flush;
  };
}

// The study flown and stored: on one process with a checkpoint beside the output, stopped
// cleanly by SIGINT or SIGTERM; on the ranks of a job without.
StudyRun fly_and_store(const Job& job, const SampleModel& model, const World& world,
                       const StudyOptions& options, const std::string& path, int threads,
                       bool resume) {
  const bool keep_samples = model.scenario().output.samples;
  if (job.size() == 1) {
    RunControl control;
    control.stop = &stop_requested;
    control.checkpoint = true;
    control.resume = resume;
    return run_and_write(model, world, options, path, threads, keep_samples, control);
  }
  if (resume) throw UsageError("--resume works on one process; run it without mpirun");
  return run_on_ranks(job, model, world, options, path, threads, keep_samples);
}

// True, after saying so with the first samples to replay, when more flights failed than
// study.max_failed allows. Flights that came down beyond the terrain read (off_terrain) are not
// failures of the integration: they count as failed in the figures and the warnings name them,
// but they do not stop the run (a wider raster or reach is the remedy, not a replay).
bool too_many_failed(const StudyResult& result, double max_failed, std::ostream& err) {
  auto counts = [](std::uint8_t status) {
    return status != static_cast<std::uint8_t>(FlightStatus::landed) &&
           status != static_cast<std::uint8_t>(FlightStatus::off_terrain);
  };
  // (The rows kept in memory name the off-terrain ones; every other failure counts.)
  const auto off_terrain = static_cast<std::uint64_t>(
      std::count(result.columns.status.begin(), result.columns.status.end(),
                 static_cast<std::uint8_t>(FlightStatus::off_terrain)));
  const std::uint64_t failed = result.failed - std::min(off_terrain, result.failed);
  const double failed_share =
      static_cast<double>(failed) /
      static_cast<double>(std::max<std::uint64_t>(1, result.failed + result.completed));
  if (!(failed_share > max_failed)) return false;
  err << "error: " << failed << " flights failed, more than study.max_failed (" << max_failed
      << ") allows; replay them with --sample:";
  int listed = 0;
  for (std::size_t row = 0; row < result.columns.rows() && listed < 10; ++row)
    if (counts(result.columns.status[row])) {
      err << ' ' << row / result.bodies;
      ++listed;
    }
  err << (failed > 10 ? " ...\n" : "\n");
  return true;
}

// What a run needs before its first flight: the scenario, its world and sample model, and on
// rank 0 the checked output and its lock. Not moved once prepared (the model refers to the rest).
struct PreparedRun {
  Scenario scenario;
  std::optional<World> world;
  std::optional<SampleModel> model;
  std::string path, origin;
  std::optional<OutputLock> lock;
};

void prepare_run(const RunArguments& a, const Job& job, PreparedRun& run) {
  run.scenario = load_scenario(a.scenario);
  if (a.samples > 0) run.scenario.study.samples = static_cast<long>(a.samples);
  if (a.seed) run.scenario.study.seed = *a.seed;
  run.world.emplace(build_world(run.scenario));
  run.model.emplace(run.scenario, *run.world,
                    static_cast<std::uint64_t>(run.scenario.study.samples));
  if (a.sample) return;
  run.path = output_path(a, run.scenario);
  run.origin = output_origin(a, run.scenario);
  if (job.leader()) {
    // Refuse an unwritable destination before any flight (a missing folder is made).
    prepare_output(run.path, run.origin, true, run.scenario.files_read,
                   output_rules(a, run.scenario));
    // One writer per output: a second run or resume on it meanwhile is refused.
    run.lock.emplace(run.path);
  }
  check_memory(run.scenario, *run.model);
}

// On several ranks every rank prepares (`prepare` returns the digest of what it read and was
// asked), and then all agree before any work: a rank whose preparation failed (a file missing
// there), or that read or was given other inputs, ends every rank with status 2 and the cause,
// instead of leaving the others waiting for its rows. Every rank fails here together, so none
// ends the others (FailureNoRankWaitsFor).
template <class Prepare>
void prepare_together(const Job& job, Prepare&& prepare) {
  if (job.size() == 1) {
    prepare();
    return;
  }
  std::exception_ptr failure;
  std::string mine;
  try {
    mine = "ok " + prepare() + " " + kEngineVersion;
  } catch (const std::bad_alloc&) {
    // In words for rank 0's message ("std::bad_alloc" says nothing to a user).
    failure = std::current_exception();
    mine = "failed ran out of memory while reading its inputs";
  } catch (const std::exception& e) {
    failure = std::current_exception();
    mine = std::string("failed ") + e.what();
  }
  const std::string verdict = start_verdict(job, mine);
  if (failure) throw FailureNoRankWaitsFor{failure};
  if (!verdict.empty()) throw FailureNoRankWaitsFor{std::make_exception_ptr(UsageError(verdict))};
}

void prepare_on_every_rank(const RunArguments& a, const Job& job, PreparedRun& run) {
  prepare_together(job, [&] {
    prepare_run(a, job, run);
    return inputs_sha256(run.scenario) + " " + std::to_string(run.scenario.study.samples) + " " +
           std::to_string(run.scenario.study.seed);
  });
}

int run_study_command(const RunArguments& a, std::ostream& out, std::ostream& err, const Job& job) {
  // From the start on one process: a signal while the scenario is read still stops cleanly.
  std::optional<StopOnSignals> signals;
  if (job.size() == 1 && !a.sample) signals.emplace();
  PreparedRun prepared;
  prepare_on_every_rank(a, job, prepared);
  const Scenario& scenario = prepared.scenario;
  const World& world = *prepared.world;
  const SampleModel& model = *prepared.model;
  const auto samples = static_cast<std::uint64_t>(scenario.study.samples);
  std::optional<tbb::global_control> limit;
  if (a.threads > 0)
    limit.emplace(tbb::global_control::max_allowed_parallelism,
                  static_cast<std::size_t>(a.threads));
  if (a.sample) return job.leader() ? run_replay(a, model, out) : kExitDone;

  const std::string& path = prepared.path;
  const std::string& origin = prepared.origin;
  const auto start_wall = std::chrono::steady_clock::now();

  StudyOptions options;
  options.samples = samples;
  const bool show = !a.quiet && job.leader() && ::isatty(STDERR_FILENO);
  const auto start = std::chrono::steady_clock::now();
  if (show) options.progress = progress_line(err, samples, start);
  const int threads = a.threads > 0 ? a.threads
                                    : static_cast<int>(tbb::global_control::active_value(
                                          tbb::global_control::max_allowed_parallelism));
  StudyRun run;
  try {
    run = fly_and_store(job, model, world, options, path, threads, a.resume);
  } catch (const IoError& e) {
    throw IoError(origin + e.what());
  }
  if (run.result.interrupted) {
    if (show) err << "\n";
    err << "interrupted: " << run.result.finished << " of "
        << (run.result.planned ? run.result.planned : samples)
        << " samples are finished and kept in " << path
        << ".checkpoint; no results file was written. Run the "
        << "same command with --resume to go on.\n";
    return kExitInterrupted;
  }
  if (!job.leader()) return kExitDone;
  if (show) err << "\n";
  if (a.resume)
    err << "resumed: " << run.resumed << " of " << run.result.samples
        << " samples taken from the checkpoint, the others flown now\n";
  run.record.file = path;
  if (a.timing)
    err << "timing: "
        << std::chrono::duration<double>(std::chrono::steady_clock::now() - start_wall).count()
        << " s for the study on " << job.size() << (job.size() == 1 ? " rank" : " ranks") << " of "
        << threads << (threads == 1 ? " thread\n" : " threads\n");
  if (a.json)
    out << json_text(record_json(run.record, false)) << '\n';
  else
    write_record_text(out, run.record);
  return too_many_failed(run.result, scenario.study.max_failed, err) ? kExitFailure : kExitDone;
}

struct ReportArguments {
  std::string results;
  std::optional<std::uint64_t> sweep_case;
  bool json = false;
  std::string geojson, svg, html, csv;
  bool impacts = false;
  bool force = false;  // replace output files already there
};

// One file `report` writes: its path, the option that named it, and for a body's own map the
// body.
struct ReportOutput {
  std::string path, option, body;
  [[nodiscard]] std::string what() const {
    return body.empty() ? option : "the map of body " + body + " beside --svg";
  }
};

// The files `report` writes, in the order it writes them: GeoJSON, the map (and with several
// bodies a map of each beside it, <name>-<body>.svg), the HTML page, the CSV figures.
std::vector<ReportOutput> report_outputs(const ReportArguments& a, const StudyRecord& record) {
  std::vector<ReportOutput> outputs;
  if (!a.geojson.empty()) outputs.push_back({a.geojson, "--geojson", ""});
  if (!a.svg.empty()) {
    outputs.push_back({a.svg, "--svg", ""});
    const auto& groups = record.footprint.groups;
    if (groups.size() > 2) {
      const std::filesystem::path svg(a.svg);
      for (std::size_t b = 0; b + 1 < groups.size(); ++b)
        outputs.push_back(
            {(svg.parent_path() / (svg.stem().string() + "-" + groups[b].name + ".svg")).string(),
             "--svg", groups[b].name});
    }
  }
  if (!a.html.empty()) outputs.push_back({a.html, "--html", ""});
  if (!a.csv.empty()) outputs.push_back({a.csv, "--csv", ""});
  return outputs;
}

// Every output is checked before any is written: none may be a file the command reads, a
// folder, a device or a link, nor a file already there without --force, and no two may be one
// file (the second would replace the first).
void refuse_report_outputs(const std::vector<ReportOutput>& outputs, const std::string& results,
                           bool force) {
  namespace fs = std::filesystem;
  OutputRules rules;
  rules.replace = force;
  std::vector<fs::path> seen;
  for (const auto& output : outputs) {
    refuse_unsafe_output(output.path, "", {results}, rules);
    std::error_code ec;
    fs::path resolved = fs::weakly_canonical(fs::absolute(output.path), ec);
    if (ec) resolved = fs::absolute(output.path).lexically_normal();
    for (std::size_t k = 0; k < seen.size(); ++k)
      if (seen[k] == resolved)
        throw UsageError(output.path + ": named for two outputs (" + outputs[k].what() + " and " +
                         output.what() + "); give each output its own file");
    seen.push_back(resolved);
  }
}

int run_report(const ReportArguments& a, std::ostream& out) {
  const bool need_samples = !a.geojson.empty() && a.impacts;
  ResultsFile file = [&] {
    std::error_code unknown;  // a missing file is refused by the reader, at once
    const std::uintmax_t bytes = std::filesystem::file_size(a.results, unknown);
    const ReadDeadline deadline(a.results, ReadDeadline::limit_for(unknown ? 0 : bytes));
    return read_results(a.results, need_samples, a.sweep_case);
  }();
  if (need_samples && !file.has_samples)
    throw UsageError(a.results +
                     ": --impacts needs the per-sample table, which this study did "
                     "not keep (output.samples = false)");
  const StudyRecord& record = file.record;
  const auto outputs = report_outputs(a, record);
  refuse_report_outputs(outputs, a.results, a.force);
  std::vector<std::string> written;
  for (const auto& output : outputs) {
    if (output.option == "--geojson") {
      // Written as it is made: with --impacts the whole document would take several times the
      // memory of the rows it shows (docs/reliability.md, Resources).
      stream_report_file(
          output.path,
          [&](const TextSink& sink) {
            write_geojson(record, need_samples ? &file.columns : nullptr, sink);
          },
          {a.results}, a.force);
      written.push_back(output.path);
      continue;
    }
    std::string text;
    if (output.option == "--html")
      text = html_report(record);
    else if (output.option == "--csv")
      text = figures_csv(record);
    else
      text = output.body.empty() ? map_svg(record) : map_svg(record, output.body);
    write_report_file(output.path, text, {a.results}, a.force);
    written.push_back(output.path);
  }
  if (a.json)
    out << json_text(record_json(record, true)) << '\n';
  else if (written.empty())
    write_record_text(out, record);
  else
    for (const std::string& f : written) out << "wrote " << f << '\n';
  return kExitDone;
}

// Runs a sweep and says what it does: a line per finished case (unless quiet), and on rank 0
// where the results are. A case failing on one rank of several ends the whole job.
int run_sweep_command(const Job& job, const SweepPlan& plan, const SweepOptions& options,
                      bool quiet, std::ostream& out, std::ostream& err, std::ostream& rank_err) {
  SweepEvents events;
  if (!quiet) {
    events.resumed = [&](std::size_t finished, std::size_t cases, const std::string& folder) {
      err << "sweep: " << finished << " of " << cases << " cases already finished in " << folder
          << "; running the other " << cases - finished << "\n";
    };
    events.case_done = [&](std::size_t index, const std::string& label) {
      err << "sweep: case " << index << " done (" << label << ")\n";
    };
  }
  events.failed_on_rank = [&](const std::exception& e) {
    if (job.leader())
      err << "error: " << e.what() << "\n";
    else
      rank_err << "error (rank " << job.rank() << "): " << e.what() << "\n";
    err.flush();
    rank_err.flush();
    job.abort(kExitFailure);
  };
  const std::optional<SweepOutcome> done = run_sweep(job, plan, options, events);
  if (!done) return kExitDone;  // another rank: rank 0 tells the results
  out << "strewn sweep: " << done->cases << " cases of " << plan.base_path << "\n\n"
      << done->summary_text << "\nresults   " << done->output << " (strewn report " << done->output
      << " --case N shows case N in full)\nsummary   " << done->summary_csv
      << " (every figure of every case)\n";
  return kExitDone;
}

// A whole number from `least` to `most`, refused in plain words (CLI11's own range checks print
// the largest double, 309 digits).
CLI::Validator whole_number(std::uint64_t least, std::uint64_t most) {
  return CLI::Validator(
      [least, most](std::string& text) -> std::string {
        std::uint64_t value = 0;
        const char* end = text.data() + text.size();
        const auto [stop, error] = std::from_chars(text.data(), end, value);
        if (error != std::errc() || stop != end || value < least || value > most)
          return "expected a whole number from " + std::to_string(least) + " to " +
                 std::to_string(most) + ", got \"" + text + "\"";
        return "";
      },
      "WHOLE NUMBER " + std::to_string(least) + ".." + std::to_string(most));
}
// The ranges of the command line's numbers: samples as study.samples (1 .. 2e9), threads as
// many as a machine may have, seeds and indices as TOML's integers hold.
constexpr std::uint64_t kMostSamples = 2000000000, kMostThreads = 4096,
                        kMostInteger = 9223372036854775807ULL;

}  // namespace

int run_command_line(int argc, const char* const* argv, std::ostream& out, std::ostream& err) {
  const Job single;
  return run_command_line(argc, argv, out, err, single);
}

namespace {

// The arguments of `sweep` and `check`, filled by CLI11.
struct SweepArguments {
  std::string file;
  std::uint64_t samples = 0;
  SweepOptions options;
  bool quiet = false;
};
struct CheckArguments {
  std::string scenario;
  bool json = false;
  bool allow_outside = false;
};

// Each command's options, one function a command: the command is returned.
CLI::App* add_trace_command(CLI::App& app, TraceArguments& a) {
  auto* command = app.add_subcommand("trace",
                                     "Fly one body with every input at its median and "
                                     "report its impact, trajectory and drag regime");
  command->add_option("SCENARIO", a.scenario, "Scenario file (TOML)")->required();
  command->add_option("--body", a.body, "Name of the body to fly (default: the first)");
  auto* json_flag = command->add_flag("--json", a.json, "Print JSON");
  command->add_flag("--csv", a.csv, "Print the trajectory as CSV")->excludes(json_flag);
  return command;
}

CLI::App* add_run_command(CLI::App& app, RunArguments& a) {
  auto* command = app.add_subcommand(
      "run", "Run the Monte Carlo study of a scenario into an HDF5 results file");
  command->add_option("SCENARIO", a.scenario, "Scenario file (TOML)")->required();
  command->add_option("-n", a.samples, "Samples (default: study.samples)")
      ->check(whole_number(1, kMostSamples));
  command->add_option("--seed", a.seed, "Random seed (default: study.seed)")
      ->check(whole_number(0, kMostInteger));
  command->add_option("-j", a.threads, "Threads (default: all)")
      ->check(whole_number(1, kMostThreads));
  command->add_option("-o", a.output,
                      "Results file (default: output.file, else results/<scenario>.h5)");
  command
      ->add_option("--sample", a.sample,
                   "Replay this one sample with its trajectory (writes nothing)")
      ->check(whole_number(0, kMostInteger));
  command->add_flag("--quiet", a.quiet, "No progress line");
  command->add_flag("--json", a.json, "Print the summary as JSON");
  command->add_flag("--resume", a.resume,
                    "Go on from the checkpoint a stopped run left beside its output");
  command->add_flag(
      "--timing", a.timing,
      "Print the study's wall time (from input read to file written) on standard error");
  command->add_flag("--force", a.force, "Replace the results file if it exists");
  command->add_flag("--allow-outside", a.allow_outside,
                    "Let the scenario's output.file lie outside the scenario's folder");
  return command;
}

CLI::App* add_sweep_command(CLI::App& app, SweepArguments& a) {
  auto* command = app.add_subcommand(
      "sweep", "Run every case of a parameter sweep (a complete study each) into one results file");
  command->add_option("SWEEP", a.file, "Sweep file (TOML)")->required();
  command->add_option("-n", a.samples, "Samples per case (default: the base scenario's)")
      ->check(whole_number(1, kMostSamples));
  command->add_option("-j", a.options.threads, "Threads per rank (default: all)")
      ->check(whole_number(1, kMostThreads));
  command->add_option("-o", a.options.output,
                      "Results file (default: the sweep's output, else results/<sweep>.h5)");
  command->add_flag(
      "--fresh", a.options.fresh,
      "Run every case again (default: a stopped sweep resumes, skipping finished cases)");
  command->add_flag("--quiet", a.quiet, "No line per finished case");
  command->add_flag("--force", a.options.force,
                    "Replace the results file and its summary CSV if they exist");
  command->add_flag("--allow-outside", a.options.allow_outside,
                    "Let the sweep file's output lie outside the sweep file's folder");
  return command;
}

CLI::App* add_report_command(CLI::App& app, ReportArguments& a) {
  auto* command = app.add_subcommand(
      "report", "Show a results file's footprint: summary, JSON, GeoJSON, CSV, SVG map, HTML page");
  command->add_option("RESULTS", a.results, "Results file (HDF5) written by run")->required();
  command
      ->add_option("--case", a.sweep_case,
                   "Of a sweep's file: the case to show (0, 1, ...; see its summary CSV)")
      ->check(whole_number(0, kMostInteger));
  command->add_flag("--json", a.json, "Print the summary as JSON");
  command->add_option("--geojson", a.geojson,
                      "Write the footprint as GeoJSON (needs site.latitude and longitude)");
  command->add_flag("--impacts", a.impacts, "Add every impact point to the GeoJSON");
  command->add_option("--svg", a.svg, "Write the map as SVG");
  command->add_option("--html", a.html, "Write a self-contained HTML report");
  command->add_option("--csv", a.csv, "Write every figure as CSV");
  command->add_flag("--force", a.force, "Replace output files that exist");
  return command;
}

CLI::App* add_check_command(CLI::App& app, CheckArguments& a) {
  auto* command = app.add_subcommand(
      "check", "Validate a scenario and print it fully resolved with its sampled inputs");
  command->add_option("SCENARIO", a.scenario, "Scenario file (TOML)")->required();
  command->add_flag("--json", a.json, "Print JSON");
  command->add_flag("--allow-outside", a.allow_outside,
                    "Let the scenario's output.file lie outside the scenario's folder");
  return command;
}

CLI::App* add_atmosphere_command(CLI::App& app, AtmosphereRequest& a) {
  auto* command = app.add_subcommand("atmosphere", "Print the U.S. Standard Atmosphere 1976 table");
  command->add_option("--offset", a.offset, "Temperature offset, K");
  command->add_option("--top", a.top, "Highest altitude, m (default 20000)");
  command->add_option("--step", a.step, "Altitude step, m (default 1000)");
  command->add_flag("--csv", a.csv, "Print CSV");
  return command;
}

// `check`: the scenario validated whole, and printed fully resolved.
int run_check(const CheckArguments& a, std::ostream& out) {
  const Scenario scenario = load_scenario(a.scenario);
  const World world = build_world(scenario);
  const SampleModel model(scenario, world, 1);  // correlations hold together
  check_memory(scenario, model);
  // The results file `run` would write: its folder must be one that can be made and written, and
  // the file the scenario names must lie in its folder (unless allowed). A file already there is
  // no fault of the scenario: `run --force` replaces it.
  RunArguments as_run;
  as_run.scenario = a.scenario;
  as_run.allow_outside = a.allow_outside;
  as_run.force = true;
  prepare_output(output_path(as_run, scenario), output_origin(as_run, scenario), false,
                 scenario.files_read, output_rules(as_run, scenario));
  if (a.json)
    out << json_text(scenario_json(scenario)) << '\n';
  else
    write_scenario_text(out, scenario);
  return kExitDone;
}

// The command line's commands and their arguments.
struct Commands {
  TraceArguments trace;
  RunArguments run;
  SweepArguments sweep;
  ReportArguments report;
  CheckArguments check;
  AtmosphereRequest atmosphere;
  CLI::App *trace_command = nullptr, *run_command = nullptr, *sweep_command = nullptr,
           *report_command = nullptr, *check_command = nullptr, *atmosphere_command = nullptr;

  explicit Commands(CLI::App& app)
      : trace_command(add_trace_command(app, trace)),
        run_command(add_run_command(app, run)),
        sweep_command(add_sweep_command(app, sweep)),
        report_command(add_report_command(app, report)),
        check_command(add_check_command(app, check)),
        atmosphere_command(add_atmosphere_command(app, atmosphere)) {}

  // What this rank was asked to do, in words: the command and what changes its course (a
  // replayed sample, a resume, a fresh sweep). The ranks of a job must all be asked the same.
  std::string what_runs() const {
    if (*run_command)
      return "run" + (run.sample ? " --sample " + std::to_string(*run.sample) : "") +
             (run.resume ? " --resume" : "");
    if (*sweep_command) return sweep.options.fresh ? "sweep --fresh" : "sweep";
    if (*trace_command) return "trace";
    if (*report_command) return "report";
    if (*check_command) return "check";
    if (*atmosphere_command) return "atmosphere";
    return "";
  }

  // Runs the command given; `err` is rank 0's, `rank_err` every rank's own.
  int run_chosen(std::ostream& out, std::ostream& err, std::ostream& rank_err, const Job& job) {
    if (*run_command) return run_study_command(run, out, err, job);
    if (*sweep_command) {
      // Every rank reads the sweep, and all agree on it before any case runs: a rank that read
      // other files would otherwise put its cases, run on other inputs, into the same results.
      SweepPlan plan;
      prepare_together(job, [&] {
        plan = load_sweep(sweep.file, sweep.samples);
        // The sweep's text, then every file it reads: the base and its tables (files_read ends
        // with the sweep file itself, whose text is given).
        std::vector<std::string> files{sweep.file};
        if (!plan.files_read.empty())
          files.insert(files.end(), plan.files_read.begin(), plan.files_read.end() - 1);
        // And where the cases go: each rank writes its cases beside the results file.
        const std::string output =
            sweep.options.output.empty() ? plan.output : sweep.options.output;
        // Links resolved as the kernel resolves them (lnk/../x is not x when lnk is a link).
        std::error_code ec;
        const auto where = std::filesystem::weakly_canonical(std::filesystem::absolute(output), ec);
        return inputs_sha256(plan.text, files) + " " + std::to_string(plan.samples) + " " +
               (ec ? std::filesystem::absolute(output).string() : where.string());
      });
      // One process: a signal ends the sweep at once, its finished cases kept for the next run
      // and the files it was writing removed (on ranks, main.cpp installs the same).
      std::optional<EndRankOnSignals> end_on_signals;
      if (job.size() == 1) end_on_signals.emplace(-1);
      std::optional<tbb::global_control> limit;
      if (sweep.options.threads > 0)
        limit.emplace(tbb::global_control::max_allowed_parallelism,
                      static_cast<std::size_t>(sweep.options.threads));
      return run_sweep_command(job, plan, sweep.options, sweep.quiet, out, err, rank_err);
    }
    if (!job.leader()) return kExitDone;  // the other commands run on rank 0 only
    if (*trace_command) return run_trace(trace, out);
    if (*report_command) return run_report(report, out);
    if (*check_command) return run_check(check, out);
    if (*atmosphere_command) {
      write_atmosphere(out, atmosphere);
      return kExitDone;
    }
    return kExitInvalid;
  }
};

// Address space kept aside, from the start, for saying that memory ran out. When an allocation
// fails the process is at its limit; what the message needs (the limit read from /proc, the
// text, the output's buffers) would fail too, and an exception thrown in the handler of
// std::bad_alloc ends the process with std::terminate (status 134). Released first thing in
// that handler. 1 MiB: above glibc's mmap threshold (128 KiB by default, mallopt(3)), so its
// release gives the address space back at once.
class MemoryReserve {
 public:
  MemoryReserve() : block_(static_cast<char*>(std::malloc(kBytes))) {}
  ~MemoryReserve() { release(); }
  MemoryReserve(const MemoryReserve&) = delete;
  MemoryReserve& operator=(const MemoryReserve&) = delete;
  void release() {
    std::free(block_);
    block_ = nullptr;
  }

 private:
  static constexpr std::size_t kBytes = 1 << 20;
  char* volatile block_;  // volatile: an allocation never used may otherwise be left out
};

// What failed, in words for `err`, and the exit status. `reserve` is released before the words
// of a memory failure are made.
int describe_failure(const std::exception_ptr& failure, std::ostream& err, const Job& job,
                     MemoryReserve& reserve) {
  try {
    std::rethrow_exception(failure);
  } catch (const ScenarioError& e) {
    for (const auto& problem : e.problems()) err << "error: " << problem.describe() << '\n';
    err << e.problems().size() << (e.problems().size() == 1 ? " problem" : " problems")
        << " found; nothing was run.\n";
    return kExitInvalid;
  } catch (const InputFileError& e) {
    err << "error: " << e.what() << '\n';
    return kExitInvalid;
  } catch (const UsageError& e) {
    err << "error: " << e.what() << '\n';
    return kExitInvalid;
  } catch (const IoError& e) {
    err << "error: " << e.what() << '\n';
    return kExitFailure;
  } catch (const std::bad_alloc&) {
    // Memory ran out although the study was sized against the limit (another process took it,
    // or the estimate fell short): said plainly, with the limit, and nothing half-written kept.
    reserve.release();
    const MemoryLimit limit = memory_limit();
    err << "error: ran out of memory (" << limit.what << ": "
        << printf_text("%.2f", limit.bytes / 1073741824.0)
        << " GiB); run fewer samples, or free memory\n";
    return kExitFailure;
  } catch (const std::exception& e) {
    err << "error: " << e.what() << '\n';
    return kExitFailure;
  } catch (const FailureNoRankWaitsFor& f) {
    return describe_failure(f.cause, err, job, reserve);
  } catch (...) {
    err << "error: an unexpected failure (not a standard exception)\n";
    return kExitFailure;
  }
}

// A number that tells texts apart (the first 64 bits of their SHA-256).
std::uint64_t digest_of(const std::string& text) {
  return std::stoull(sha256_hex(text).substr(0, 16), nullptr, 16);
}

// `text` with every line that starts "error:" made to name the rank: "error (rank 2):".
std::string naming_rank(const std::string& text, int rank) {
  std::string out, line;
  std::istringstream lines(text);
  while (std::getline(lines, line)) {
    if (line.starts_with("error:"))
      line = "error (rank " + std::to_string(rank) + "):" + line.substr(6);
    out += line + '\n';
  }
  return out;
}

// A failure on a rank of several where the other ranks may wait for this one (not a
// FailureNoRankWaitsFor): said on this rank's own standard error, naming it, and then the whole
// job is ended (MPI_Abort) with the failure's status, so that no rank waits for ever.
[[noreturn]] void end_job(const std::string& said, int status, std::ostream& err_stream,
                          const Job& job) {
  err_stream << (job.leader() ? said : naming_rank(said, job.rank())) << "strewn: rank "
             << job.rank() << " failed alone; ending every rank of the job\n";
  err_stream.flush();
  job.abort(status);
}

}  // namespace

int run_command_line(int argc, const char* const* argv, std::ostream& out_stream,
                     std::ostream& err_stream, const Job& job) {
  MemoryReserve reserve;
  // Only rank 0 speaks; the others keep quiet unless something fails on them alone.
  std::ostringstream silent;
  std::ostream& out = job.leader() ? out_stream : silent;
  std::ostream& err = job.leader() ? err_stream : silent;
  CLI::App app{
      "strewn: Monte Carlo engine for drop and drift safety studies.\n"
      "Results are engineering estimates; exclusion zones are set by the responsible "
      "authority under local rules.",
      "strewn"};
  app.set_version_flag("--version", std::string("strewn ") + kEngineVersion);
  app.require_subcommand(1);
  Commands commands(app);
  // Every rank parses its own command line (a launch may give each rank its own); they agree on
  // the outcome before anything else, so that a rank whose line is wrong does not leave the
  // others waiting: 0 go on, 1 ended here (help, --version), 2 refused.
  int parsed = 0;
  std::string refusal;
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    // Help and --version are "errors" with exit code 0 that print to `out`.
    if (e.get_exit_code() == 0) {
      app.exit(e, out, err);
      parsed = 1;
    } else {
      refusal =
          std::string("error: ") + e.what() + "\n(--help lists the commands and their options)\n";
      parsed = 2;
    }
  }
  // The same command on every rank: a rank given another (a replay, a check) would end while
  // the others wait for it. Help and --version count as a command of their own.
  const std::string asked = parsed == 1 ? "--help or --version" : commands.what_runs();
  const std::uint64_t leaders_ask = job.broadcast(digest_of(asked));
  if (parsed != 2 && digest_of(asked) != leaders_ask) {
    refusal = "error: given another command than rank 0 (" + asked +
              "); every rank of a job runs the same command\n";
    parsed = 2;
  }
  const int agreed = job.highest(parsed);
  const std::uint64_t leaders = job.broadcast(static_cast<std::uint64_t>(parsed));
  if (parsed == 2) {
    // Said by rank 0; by another rank only when rank 0's line was not refused too.
    if (job.leader())
      err_stream << refusal;
    else if (leaders != 2)
      err_stream << naming_rank(refusal, job.rank());
  }
  if (agreed != 0) return agreed == 1 ? kExitDone : kExitInvalid;

  try {
    return commands.run_chosen(out, err, err_stream, job);
  } catch (...) {
    const std::exception_ptr failure = std::current_exception();
    bool alone = job.size() > 1;
    try {
      std::rethrow_exception(failure);
    } catch (const FailureNoRankWaitsFor&) {
      alone = false;
    } catch (...) {
    }
    if (!alone) return describe_failure(failure, err, job, reserve);
    std::ostringstream said;
    const int status = describe_failure(failure, said, job, reserve);
    end_job(said.str(), status, err_stream, job);
  }
}

}  // namespace strewn
