#include "cluster/sweep.hpp"

#include <tbb/parallel_for.h>

#include <toml++/toml.h>
#include <atomic>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <functional>
#include <iomanip>
#include <mutex>
#include <sstream>
#include <thread>

#include "core/errors.hpp"
#include "report/report_files.hpp"
#include "scenario/reader.hpp"
#include "scenario/world.hpp"
#include "store/output_file.hpp"
#include "store/results_file.hpp"
#include "store/sweep_file.hpp"
#include "study/sample_model.hpp"

namespace strewn {

namespace {

namespace fs = std::filesystem;
using toml_input::Bounds;
using toml_input::Diagnostics;
using toml_input::Table;

std::string read_text(const std::string& path, Diagnostics& d, const std::string& key, long line) {
  std::error_code ec;
  if (fs::is_directory(path, ec)) {
    d.add(key, line, path + " is a folder, not a file");
    return {};
  }
  if (fs::exists(path, ec) &&
      (!fs::is_regular_file(path, ec) || fs::file_size(path, ec) > (16u << 20))) {
    d.add(key, line, path + " is not a regular TOML file of at most 16 MiB");
    return {};
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    d.add(key, line, path + " cannot be read (no such file, or no permission)");
    return {};
  }
  std::ostringstream buffer;
  buffer << in.rdbuf();
  return buffer.str();
}

const char* node_kind(const toml::node& n) {
  if (n.is_string()) return "a string";
  if (n.is_boolean()) return "true or false";
  if (n.is_array()) return "a list";
  if (n.is_table()) return "a table";
  return "not a number";
}

// One step of a key path: a table's key, or an array's index ("layers[2]" is two steps).
struct KeyStep {
  std::string name;  // empty for an index
  std::size_t index = 0;
};

// "wind.layers[2].speed" -> wind, layers, [2], speed; "box.drag.mach_table[3][1]" likewise.
// Empty when the path is malformed (an empty part, an unclosed or non-numeric index).
std::vector<KeyStep> split_key(const std::string& key) {
  std::vector<KeyStep> steps;
  std::string part;
  std::istringstream in(key);
  while (std::getline(in, part, '.')) {
    const std::size_t bracket = part.find('[');
    const std::string name = part.substr(0, bracket);
    if (name.empty()) return {};
    steps.push_back({name, 0});
    for (std::size_t at = bracket; at != std::string::npos;) {
      const std::size_t close = part.find(']', at);
      if (close == std::string::npos || close == at + 1) return {};
      const std::string digits = part.substr(at + 1, close - at - 1);
      if (digits.find_first_not_of("0123456789") != std::string::npos || digits.size() > 9)
        return {};
      steps.push_back({"", static_cast<std::size_t>(std::stoul(digits))});
      at = close + 1 == part.size() ? std::string::npos : close + 1;
      if (at != std::string::npos && part[at] != '[') return {};
    }
  }
  return steps;
}

// The table of the body a key path starts with, by the body's name (or "body" for the one body
// of a scenario that names none); null when the path starts elsewhere.
toml::table* body_named(toml::table& root, const std::string& name) {
  auto* bodies = root["body"].as_array();
  if (!bodies || name.empty()) return nullptr;
  for (auto& b : *bodies) {
    auto* body = b.as_table();
    if (!body) continue;
    const auto given = (*body)["name"].value<std::string>();
    if ((given && *given == name) || (!given && bodies->size() == 1 && name == "body")) return body;
  }
  return nullptr;
}

// Where an axis key lands in the base scenario: the node that holds (or will hold) its value.
// Bodies are named by their `name` (or "body" when the only body has none); tables on the way
// that the scenario leaves out are made; an index must name an element that exists. Returns a
// setter of the value, or an empty one with a message when the path cannot be placed.
using Place = std::function<void(double value, bool integer)>;
Place place(toml::table& root, const std::string& key, std::string& problem,
            const toml::node** existing = nullptr) {
  const std::vector<KeyStep> steps = split_key(key);
  if (steps.empty()) {
    problem = "is not a key path (parts separated by dots, array elements as [index])";
    return {};
  }
  toml::node* at = &root;
  std::size_t i = 0;
  if (toml::table* body = body_named(root, steps[0].name)) {
    at = body;
    i = 1;
  }
  std::string walked = i == 1 ? steps[0].name : "";
  auto describe = [&] { return walked.empty() ? std::string("the scenario") : walked; };
  // The table, or the list holding element `index`, that a step needs `node` to be; null, with
  // the problem said, when it is not.
  auto table_of = [&](toml::node* node) -> toml::table* {
    toml::table* table = node->as_table();
    if (!table) problem = describe() + " is " + node_kind(*node) + ", not a table";
    return table;
  };
  auto list_of = [&](toml::node* node, std::size_t index) -> toml::array* {
    toml::array* list = node->as_array();
    if (!list) {
      problem = describe() + " is " + node_kind(*node) + ", not a list";
    } else if (index >= list->size()) {
      problem = describe() + " has " + std::to_string(list->size()) +
                " elements, counted from 0; there is no [" + std::to_string(index) + "]";
      return nullptr;
    }
    return list;
  };
  for (; i + 1 < steps.size(); ++i) {
    const KeyStep& step = steps[i];
    toml::node* next = nullptr;
    if (!step.name.empty()) {
      toml::table* table = table_of(at);
      if (!table) return {};
      next = table->get(step.name);
      if (!next && steps[i + 1].name.empty()) {
        problem = walked + (walked.empty() ? "" : ".") + step.name + " is not in the scenario";
        return {};
      }
      if (!next) next = &table->insert_or_assign(step.name, toml::table{}).first->second;
      walked += (walked.empty() ? "" : ".") + step.name;
    } else {
      toml::array* list = list_of(at, step.index);
      if (!list) return {};
      next = list->get(step.index);
      // Appended piece by piece: GCC 12 warns falsely (-Wrestrict, its bug 105329) on
      // "[" + std::string once this function is inlined.
      walked += '[';
      walked += std::to_string(step.index);
      walked += ']';
    }
    at = next;
  }
  const KeyStep& last = steps.back();
  if (!last.name.empty()) {
    toml::table* table = table_of(at);
    if (!table) return {};
    if (existing) *existing = table->get(last.name);
    return [table, name = last.name](double v, bool integer) {
      if (integer)
        table->insert_or_assign(name, static_cast<std::int64_t>(v));
      else
        table->insert_or_assign(name, v);
    };
  }
  toml::array* list = list_of(at, last.index);
  if (!list) return {};
  if (existing) *existing = list->get(last.index);
  return [list, index = last.index](double v, bool integer) {
    if (integer)
      list->replace(list->cbegin() + static_cast<long>(index), static_cast<std::int64_t>(v));
    else
      list->replace(list->cbegin() + static_cast<long>(index), v);
  };
}

std::string format_value(double v) {
  std::ostringstream s;
  s << std::setprecision(12) << v;
  return s.str();
}

std::string case_label(const SweepPlan& plan, std::size_t index) {
  std::string label;
  for (std::size_t a = 0; a < plan.axes.size(); ++a)
    label += (a ? ", " : "") + plan.axes[a].key + " = " + format_value(plan.cases[index].values[a]);
  return label;
}

}  // namespace

namespace {

// The base scenario's text, parsed into `table`; empty (the problem said) when it cannot be read
// or parsed.
std::string read_base(const std::string& base_path, long line, Diagnostics& d, toml::table& table) {
  std::string text = read_text(base_path, d, "base", line);
  if (text.empty()) return text;
  try {
    table = toml::parse(text, base_path);
  } catch (const toml::parse_error& e) {
    d.add("base", line,
          base_path + ":" + std::to_string(e.source().begin.line) + ": " +
              std::string(e.description()));
    text.clear();
  }
  return text;
}

// One axis of the sweep file: its key, checked against the base scenario (a number there, or a
// key it does not give yet, which the check of the cases accepts or refuses), and its values.
SweepAxis read_axis(Table& axis, const toml::table& base_table, const std::string& base_text,
                    const std::optional<std::string>& base, Diagnostics& d) {
  SweepAxis a;
  const auto key = axis.text("key", {}, true);
  const toml::array* values = axis.array("values");
  if (!values) {
    d.add(axis.key_path("values"), axis.line(), "is required: a list of numbers");
  } else if (values->empty()) {
    d.add(axis.key_path("values"), axis.line_of("values"),
          "is empty: an axis needs at least one value");
  } else {
    a.integers = true;
    for (const auto& v : *values) {
      a.integers = a.integers && v.is_integer();
      const auto number = toml_input::as_number(v);
      if (!number || !std::isfinite(*number)) {
        d.add(axis.key_path("values"), axis.line_of("values"), "must hold finite numbers only");
        break;
      }
      a.values.push_back(*number);
    }
  }
  axis.finish();
  if (key) {
    a.key = *key;
    a.line = axis.line_of("key");
    // The key must be a number in the base scenario (or a key it does not give yet, which the
    // scenario check below accepts or refuses).
    if (!base_text.empty()) {
      toml::table probe = base_table;
      std::string problem;
      const toml::node* existing = nullptr;
      if (!place(probe, a.key, problem, &existing)) {
        d.add(axis.key_path("key"), axis.line_of("key"),
              a.key + " is not a key of the scenario" + (problem.empty() ? "" : ": " + problem));
      } else if (existing) {
        if (existing->is_table() && existing->as_table()->contains("dist"))
          d.add(axis.key_path("key"), axis.line_of("key"),
                a.key + " is a distribution in " + *base + "; sweep one of its parameters, e.g. " +
                    a.key + (existing->as_table()->contains("mean") ? ".mean" : ".median"));
        else if (existing->is_table())
          d.add(axis.key_path("key"), axis.line_of("key"),
                a.key + " is a table in " + *base + "; sweep one of its numeric keys, e.g. " +
                    a.key + "." +
                    (existing->as_table()->empty()
                         ? std::string("speed")
                         : std::string(existing->as_table()->cbegin()->first.str())));
        else if (!existing->is_number())
          d.add(axis.key_path("key"), axis.line_of("key"),
                a.key + " is " + node_kind(*existing) + " in " + *base +
                    "; an axis sweeps numeric keys only");
      }
    }
  }
  return a;
}

// The values of every case: the grid of the axes (the first axis varies slowest), or the axes
// in step ("zip").
std::vector<std::vector<double>> case_values(const SweepPlan& plan) {
  std::vector<std::vector<double>> combos;
  if (plan.zip) {
    for (std::size_t i = 0; i < plan.axes[0].values.size(); ++i) {
      std::vector<double> c;
      for (const auto& a : plan.axes) c.push_back(a.values[i]);
      combos.push_back(c);
    }
  } else {
    combos.push_back({});
    for (const auto& a : plan.axes) {
      std::vector<std::vector<double>> next;
      for (const auto& c : combos)
        for (double v : a.values) {
          auto longer = c;
          longer.push_back(v);
          next.push_back(std::move(longer));
        }
      combos = std::move(next);
    }
  }
  return combos;
}

// Where in the sweep file a problem of a case's scenario comes from: the axis whose key it is
// about (its key path and line), or the scenario's own key path. The scenario names a body by its
// place (body[1].mass); an axis by its name (crate.mass).
std::pair<std::string, long> axis_of_problem(const SweepPlan& plan, const toml::table& base_table,
                                             const std::string& problem_key) {
  std::string key_path = problem_key, named = problem_key;
  if (named.rfind("body[", 0) == 0) {
    const std::size_t close = named.find(']');
    const auto* bodies = base_table["body"].as_array();
    if (close != std::string::npos && bodies && named.find_first_not_of("0123456789", 5) == close) {
      const std::size_t b = std::stoul(named.substr(5, close - 5));
      const toml::table* body = b < bodies->size() ? bodies->get(b)->as_table() : nullptr;
      const auto name = body ? (*body)["name"].value<std::string>() : std::nullopt;
      if (name) named = *name + named.substr(close + 1);
    }
  }
  long line = 0;
  for (std::size_t a = 0; a < plan.axes.size(); ++a) {
    const std::string& k = plan.axes[a].key;
    if (named == k || k.rfind(named + ".", 0) == 0 || named.rfind(k + ".", 0) == 0) {
      key_path = "axis[" + std::to_string(a) + "].key";
      line = plan.axes[a].line;
      break;
    }
  }
  return {key_path, line};
}

// Every case must be a valid scenario before anything runs: each is loaded and its correlations
// checked; the problems name the axis they come from. Sets the plan's samples and files read.
void check_cases(SweepPlan& plan, const toml::table& base_table, const std::string& path) {
  std::vector<Problem> problems;
  for (std::size_t index = 0; index < plan.cases.size(); ++index) {
    try {
      const Scenario s = parse_scenario(plan.cases[index].text, plan.base_path);
      const World world = build_world(s);
      (void)SampleModel(s, world, 1);  // correlations hold together
      if (index == 0) {
        plan.samples = static_cast<std::uint64_t>(s.study.samples);
        plan.files_read = s.files_read;
        plan.files_read.push_back(path);
      }
    } catch (const ScenarioError& e) {
      for (const auto& p : e.problems()) {
        const auto [key_path, line] = axis_of_problem(plan, base_table, p.key_path);
        problems.push_back({path, key_path, line,
                            "case " + std::to_string(index) + " (" + case_label(plan, index) +
                                "): " + (key_path != p.key_path ? p.key_path + ": " : "") +
                                p.message});
      }
    }
    if (problems.size() > 20) break;  // the same mistake repeats in every case
  }
  if (!problems.empty()) throw ScenarioError(problems);
}

// The sweep's results file: the sweep file's `output`, relative to its folder, and the line that
// names it; else results/<sweep name>.h5 under the working directory.
void set_output(SweepPlan& plan, const std::optional<std::string>& output, long line) {
  const fs::path file(plan.path);
  plan.output = output ? (file.parent_path() / *output).lexically_normal().string()
                       : "results/" + file.stem().string() + ".h5";
  plan.output_line = output ? line : 0;
}

}  // namespace

SweepPlan load_sweep(const std::string& path, std::uint64_t samples_override) {
  SweepPlan plan;
  plan.path = path;
  Diagnostics d(path);
  plan.text = read_text(path, d, "", 0);
  if (!d.empty()) throw ScenarioError(d.take());
  if (plan.text.find('\0') != std::string::npos)
    throw ScenarioError({{path, "", 0, "is a binary file, not a TOML sweep"}});
  toml::table root;
  try {
    root = toml::parse(plan.text, path);
  } catch (const toml::parse_error& e) {
    throw ScenarioError(
        {{path, "", static_cast<long>(e.source().begin.line), std::string(e.description())}});
  }
  Table top(d, &root, "");
  const auto base = top.text("base", {}, true);
  const auto combine = top.text("combine", {"grid", "zip"});
  plan.zip = combine && *combine == "zip";
  const auto output = top.text("output");
  std::vector<Table> axes = top.tables("axis");
  if (axes.empty() && !top.has("axis")) d.add("axis", 0L, "at least one [[axis]] is required");
  top.finish();

  // The base scenario, as a TOML table to place the axis values in.
  toml::table base_table;
  std::string base_text;
  if (base) {
    plan.base_path = (fs::path(path).parent_path() / *base).lexically_normal().string();
    base_text = read_base(plan.base_path, top.line_of("base"), d, base_table);
  }
  set_output(plan, output, top.line_of("output"));

  for (auto& axis : axes) plan.axes.push_back(read_axis(axis, base_table, base_text, base, d));
  if (plan.zip && !plan.axes.empty()) {
    for (std::size_t i = 1; i < plan.axes.size(); ++i)
      if (plan.axes[i].values.size() != plan.axes[0].values.size())
        d.add("axis[" + std::to_string(i) + "].values", axes[i].line_of("values"),
              "has " + std::to_string(plan.axes[i].values.size()) + " values but axis[0] has " +
                  std::to_string(plan.axes[0].values.size()) +
                  ": \"zip\" axes go in step and must be equally long");
  }
  if (!d.empty()) throw ScenarioError(d.take());

  const std::vector<std::vector<double>> combos = case_values(plan);
  for (std::size_t index = 0; index < combos.size(); ++index) {
    toml::table t = base_table;
    for (std::size_t a = 0; a < plan.axes.size(); ++a) {
      std::string problem;
      const toml::node* existing = nullptr;
      const Place set = place(t, plan.axes[a].key, problem, &existing);
      if (!set) {
        // Each key was found in the base scenario alone; an earlier axis can still have put a
        // number where this one needs a table ("release.x" and "release.x.y").
        d.add("axis[" + std::to_string(a) + "].key", plan.axes[a].line,
              plan.axes[a].key + " cannot be set once the other axes are" +
                  (problem.empty() ? std::string() : ": " + problem));
        throw ScenarioError(d.take());
      }
      const double v = combos[index][a];
      set(v, (plan.axes[a].integers || (existing && existing->is_integer())) &&
                 v == std::floor(v) && std::abs(v) < 9e18);
    }
    if (samples_override > 0) {
      if (!t["study"].is_table()) t.insert_or_assign("study", toml::table{});
      t["study"].as_table()->insert_or_assign("samples",
                                              static_cast<std::int64_t>(samples_override));
    }
    std::ostringstream text;
    text << "# case " << index << " of the sweep " << fs::path(path).filename().string() << ": "
         << "the base scenario " << fs::path(plan.base_path).filename().string() << " with ";
    for (std::size_t a = 0; a < plan.axes.size(); ++a)
      text << (a ? ", " : "") << plan.axes[a].key << " = " << format_value(combos[index][a]);
    text << "\n" << toml::toml_formatter(t) << "\n";
    plan.cases.push_back({combos[index], text.str()});
  }
  check_cases(plan, base_table, path);
  return plan;
}

namespace {

std::string case_file(const std::string& folder, std::size_t index) {
  std::ostringstream name;
  name << "case-" << std::setw(5) << std::setfill('0') << index << ".h5";
  return (fs::path(folder) / name.str()).string();
}

// A case is finished when its file reads back and was made from the same case scenario.
bool finished(const std::string& file, const std::string& text) {
  std::error_code ec;
  if (!fs::exists(file, ec)) return false;
  try {
    return read_results(file, false).record.scenario_sha256 == sha256_hex(text);
  } catch (const std::exception&) {
    return false;
  }
}

void run_case(const SweepPlan& plan, std::size_t index, const std::string& file, int threads) {
  const Scenario s = parse_scenario(plan.cases[index].text, plan.base_path);
  const World world = build_world(s);
  const auto samples = static_cast<std::uint64_t>(s.study.samples);
  const SampleModel model(s, world, samples);
  StudyOptions options;
  options.samples = samples;
  (void)run_and_write(model, world, options, file, threads, s.output.samples);
}

// The sweep's summary as CSV, beside its results file: `<output name>-summary.csv`.
std::string summary_csv_of(const std::string& output) {
  return fs::path(output).replace_extension("").string() + "-summary.csv";
}

// One sweep per output: the locks rank 0 holds on the results file and on the summary.
struct SweepLocks {
  std::optional<OutputLock> results, summary;
};

// The file that marks a folder of cases as made by a sweep.
constexpr const char* kCasesMark = "strewn-sweep-cases";

// Rank 0, before any case runs: the output checked (a missing folder is made; one that cannot be
// is refused with status 2), the folder of the cases made (emptied first when fresh), the
// leftovers of a stopped run cleared; returns the cases still to run, in order.
std::vector<std::size_t> pending_cases(const SweepPlan& plan, const SweepOptions& options,
                                       const std::string& output, const std::string& folder,
                                       const SweepEvents& events, SweepLocks& locks) {
  const bool named_in_file = options.output.empty() && plan.output_line > 0;
  const std::string origin =
      named_in_file ? plan.path + ":" + std::to_string(plan.output_line) + ": output: " : "";
  OutputRules rules;
  rules.replace = options.force;
  // A sweep file may be shared: the output it names stays in its folder unless the command line
  // says otherwise (-o names the output itself).
  if (named_in_file && !options.allow_outside) {
    const fs::path own = fs::path(plan.path).parent_path();
    rules.within = own.empty() ? "." : own.string();
    rules.within_what = "the sweep file's folder";
  }
  // The results file, then the summary beside it, both refused by the same rules before anything
  // is made or cleared (prepare_output makes the folder and clears stale leftovers).
  refuse_unsafe_output(output, origin, plan.files_read, rules);
  refuse_unsafe_output(summary_csv_of(output), "", plan.files_read, rules);
  prepare_output(output, origin, true, plan.files_read, rules);
  // One sweep per output: a second one on it meanwhile is refused before it touches the cases
  // (it would otherwise empty or remove the folder the first one writes in).
  // The summary too: two sweeps on outputs of one stem (s.h5, s.hdf5) share it.
  locks.results.emplace(output);
  locks.summary.emplace(summary_csv_of(output));
  std::error_code ec;
  // The folder of the cases is strewn's only when it holds the mark strewn puts in the folders it
  // makes: a folder of the user's that happens to have the name is never emptied or removed.
  const fs::file_status status = fs::symlink_status(folder, ec);
  if (fs::exists(status) && !fs::is_directory(status))
    throw UsageError(folder +
                     ": is not a folder (a file or a link) where the sweep keeps its "
                     "cases; move it away or choose another output");
  if (fs::exists(status) && !fs::exists(fs::path(folder) / kCasesMark))
    throw UsageError(folder + ": this folder was not made by a strewn sweep (it lacks the file " +
                     kCasesMark +
                     ") and is not emptied or removed; move it away or choose another "
                     "output");
  if (options.fresh) fs::remove_all(folder, ec);
  fs::create_directories(folder, ec);
  if (ec) throw IoError(folder + ": cannot create the folder of the cases (" + ec.message() + ")");
  if (!fs::exists(fs::path(folder) / kCasesMark)) {
    std::ofstream mark(fs::path(folder) / kCasesMark);
    mark << "made by a strewn sweep to keep its finished cases; removed when the sweep ends\n";
    if (!mark) throw IoError(folder + ": cannot write in the folder of the cases");
  }
  // Files left half-written by a stopped run (of this machine, whose process is gone).
  remove_stale_partials(folder, "");
  std::vector<std::size_t> pending;
  for (std::size_t i = 0; i < plan.cases.size(); ++i)
    if (!finished(case_file(folder, i), plan.cases[i].text)) pending.push_back(i);
  const std::size_t skipped = plan.cases.size() - pending.size();
  if (events.resumed && skipped > 0) events.resumed(skipped, plan.cases.size(), folder);
  return pending;
}

// On rank 0, the cases to run (pending_cases); on the others, none. A refusal on rank 0 (an
// output already there, or outside the sweep file's folder) is kept in `refused` rather than
// thrown: it must not leave the other ranks waiting for cases. None is handed out, every rank
// meets at the barrier, and rank 0 then reports it.
std::vector<std::size_t> leader_pending_cases(const Job& job, const SweepPlan& plan,
                                              const SweepOptions& options,
                                              const std::string& output, const std::string& folder,
                                              const SweepEvents& events, SweepLocks& locks,
                                              std::exception_ptr& refused) {
  if (!job.leader()) return {};
  try {
    return pending_cases(plan, options, output, folder, events, locks);
  } catch (const std::exception&) {
    refused = std::current_exception();
    return {};
  }
}

SweepOutcome gather_cases(const Job& job, const SweepPlan& plan, const std::string& output,
                          const std::string& folder) {
  // Rank 0 gathers the cases, in index order, into the sweep's file and its CSV summary.
  std::vector<SweepCaseSource> sources;
  std::vector<std::string> keys;
  for (const auto& a : plan.axes) keys.push_back(a.key);
  for (std::size_t i = 0; i < plan.cases.size(); ++i) {
    const std::string file = case_file(folder, i);
    if (!finished(file, plan.cases[i].text))
      throw IoError(file + ": case " + std::to_string(i) + " did not finish");
    sources.push_back({file, plan.cases[i].values});
  }
  const SweepSummary summary =
      write_sweep_file(output, plan.text, keys, plan.zip, sources, job.size());
  const std::string csv_path = summary_csv_of(output);
  write_report_file(csv_path, summary.csv, plan.files_read);
  std::error_code ec;
  fs::remove_all(folder, ec);
  return SweepOutcome{plan.cases.size(), output, csv_path, summary.text};
}

constexpr int kRequestTag = 21, kAnswerTag = 22;

// A rank other than 0: asks rank 0 for the next case and runs it, until told none is left (-1).
void run_cases_asked(const Job& job, const SweepPlan& plan, const std::string& folder,
                     int threads) {
  while (true) {
    const std::int64_t ask = 0;
    job.send(0, std::as_bytes(std::span(&ask, 1)), kRequestTag);
    const auto answer = job.receive(0, kAnswerTag);
    std::int64_t index = -1;
    std::memcpy(&index, answer.data(), sizeof index);
    if (index < 0) return;
    run_case(plan, static_cast<std::size_t>(index),
             case_file(folder, static_cast<std::size_t>(index)), threads);
  }
}

}  // namespace

std::optional<SweepOutcome> run_sweep(const Job& job, const SweepPlan& plan,
                                      const SweepOptions& options, const SweepEvents& events) {
  const std::string output = options.output.empty() ? plan.output : options.output;
  const std::string folder = output + ".cases";
  int threads = options.threads;
  if (threads <= 0) threads = static_cast<int>(std::thread::hardware_concurrency());
  std::exception_ptr refused;
  SweepLocks locks;  // rank 0's, until the sweep's files are in place
  const std::vector<std::size_t> pending =
      leader_pending_cases(job, plan, options, output, folder, events, locks, refused);
  std::mutex told;
  auto report_done = [&](std::size_t index) {
    if (!events.case_done) return;
    const std::lock_guard<std::mutex> lock(told);
    events.case_done(index, case_label(plan, index));
  };
  // A case failed on a rank of several: the others may be waiting for it, so the job ends.
  auto fail_on_rank = [&](const std::exception& e) {
    if (events.failed_on_rank) events.failed_on_rank(e);
    job.abort(3);  // kept in case the handler returned: no rank may be left waiting
  };
  std::atomic<std::size_t> next{0};
  auto take = [&]() -> std::int64_t {
    const std::size_t k = next++;
    return k < pending.size() ? static_cast<std::int64_t>(pending[k]) : -1;
  };

  if (job.size() == 1) {
    // Threads on one machine: cases dealt in order as threads finish; each case's study uses the
    // threads left free (TBB shares them).
    tbb::parallel_for(std::size_t{0}, pending.size(), std::size_t{1}, [&](std::size_t) {
      const std::int64_t index = take();
      if (index < 0) return;
      run_case(plan, static_cast<std::size_t>(index),
               case_file(folder, static_cast<std::size_t>(index)), threads);
      report_done(static_cast<std::size_t>(index));
    });
  } else if (job.leader()) {
    // The manager: a thread that answers every other rank's request with the next case index,
    // and -1 when none is left; rank 0's own thread takes cases from the same counter.
    std::thread manager([&] {
      int stopped = 0;
      while (stopped < job.size() - 1) {
        int from = -1;
        const auto request = job.receive_any(kRequestTag, from);
        (void)request;
        const std::int64_t index = take();
        job.send(from, std::as_bytes(std::span(&index, 1)), kAnswerTag);
        if (index < 0) ++stopped;
      }
    });
    try {
      for (std::int64_t index = take(); index >= 0; index = take()) {
        run_case(plan, static_cast<std::size_t>(index),
                 case_file(folder, static_cast<std::size_t>(index)), threads);
        report_done(static_cast<std::size_t>(index));
      }
    } catch (const std::exception& e) {
      fail_on_rank(e);
    }
    manager.join();
  } else {
    try {
      run_cases_asked(job, plan, folder, threads);
    } catch (const std::exception& e) {
      fail_on_rank(e);
    }
  }
  job.barrier();
  if (!job.leader()) return std::nullopt;
  // From here rank 0 works alone: the others have finished their part and wait for none of its
  // messages, so a failure ends rank 0 by itself rather than the whole job.
  try {
    if (refused) std::rethrow_exception(refused);
    return gather_cases(job, plan, output, folder);
  } catch (...) {
    if (job.size() == 1) throw;
    throw FailureNoRankWaitsFor{std::current_exception()};
  }
}

}  // namespace strewn
