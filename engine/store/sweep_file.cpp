#include "store/sweep_file.hpp"

#include <H5Cpp.h>
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <mutex>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "core/version.hpp"
#include "pipeline/study_record.hpp"
#include "store/file_seal.hpp"
#include "store/hdf5_support.hpp"
#include "store/output_file.hpp"
#include "store/results_file.hpp"

namespace strewn {

using namespace hdf5;

namespace {
std::string level_text(double level) {
  return printf_text("%g", level);
}
}  // namespace

namespace {
// One case in a line: its axis values, samples, warnings, the widest level's radius of all bodies
// (of the one body) with its bound, and the rules' statuses.
std::string case_line(std::size_t index, const std::vector<std::string>& axis_keys,
                      const SweepCaseSource& source, const StudyRecord& r) {
  std::string line = "case " + std::to_string(index) + " (";
  for (std::size_t a = 0; a < axis_keys.size(); ++a)
    line += (a ? ", " : "") + axis_keys[a] + " = " + printf_text("%g", source.values.at(a));
  const std::size_t warnings = record_warnings(r).size();
  line += printf_text("): %llu samples", static_cast<unsigned long long>(r.samples));
  if (r.target_width)
    line += r.footprint.widest_relative_width() <= *r.target_width ? ", target width met"
                                                                   : ", target width NOT met";
  line += ", " + std::to_string(warnings) + (warnings == 1 ? " warning" : " warnings");
  if (!r.footprint.groups.empty()) {
    const GroupFootprint& all = r.footprint.groups.back();
    if (!all.containment.empty()) {
      const Containment& c = all.containment.back();
      line += printf_text("; %g %% within %.1f m (upper bound ", 100.0 * c.level, c.radius) +
              (c.radius_upper ? printf_text("%.1f m)", *c.radius_upper)
                              : "needs " + std::to_string(c.samples_needed) + " samples)");
    }
  }
  for (const auto& k : r.footprint.rules)
    line += "; " + k.group + " " + k.rule + " " + to_string(k.status);
  return line + "\n";
}

// The summary table of a sweep, filled case by case: the case index, the axes' values, then the
// numbers and texts every case reports, named by the first case.
struct SummaryColumns {
  std::vector<std::uint64_t> index;
  std::vector<std::vector<double>> axes;  // one per axis key
  std::vector<std::string> number_names, text_names;
  std::vector<std::vector<double>> numbers;
  std::vector<std::vector<std::string>> texts;
};

// The file's attributes and the sweep's text as read, written before the cases.
void write_sweep_header(H5::H5File& file, const std::string& sweep_text,
                        const std::vector<std::string>& axis_keys, bool zip, std::size_t cases,
                        int ranks) {
  write_attribute(file, "format_version", kResultsFormatVersion);
  write_attribute(file, "kind", std::string("sweep"));
  write_attribute(file, "engine_version", std::string(kEngineVersion));
  write_attribute(file, "combine", std::string(zip ? "zip" : "grid"));
  write_attribute(file, "cases", static_cast<std::uint64_t>(cases));
  write_attribute(file, "ranks", ranks);
  write_strings_attribute(file, "axes", axis_keys);
  H5::StrType type(H5::PredType::C_S1, std::max<std::size_t>(1, sweep_text.size()));
  file.createDataSet("sweep", type, H5::DataSpace()).write(sweep_text.c_str(), type);
}

// Copies case `index`'s scenario, samples and footprint into /cases/<index>, with the record's
// attributes and the case's axis values, so that the case reads back as a study's own file.
void copy_case(H5::Group& all_cases, std::size_t index, const std::string& path,
               const SweepCaseSource& source, const StudyRecord& r,
               const std::vector<std::string>& axis_keys) {
  H5::H5File in(source.file, H5F_ACC_RDONLY);
  H5::Group target = all_cases.createGroup(std::to_string(index));
  for (const char* object : {"scenario", "samples", "footprint"})
    if (in.nameExists(object) &&
        H5Ocopy(in.getId(), object, target.getId(), object, H5P_DEFAULT, H5P_DEFAULT) < 0)
      throw IoError(path + ": cannot copy " + object + " of " + source.file);
  write_attributes(target, r, run_identity());
  write_attributes(target, r, run_counters());
  for (std::size_t a = 0; a < axis_keys.size(); ++a)
    write_attribute(target, axis_keys[a], source.values.at(a));
}

// Adds case `index`'s row to the summary; case 0 names the columns, and every later case must
// report the same figures (bodies, levels and rules).
void add_summary_row(SummaryColumns& table, std::size_t index, const std::string& path,
                     const SweepCaseSource& source, const StudyRecord& r) {
  table.index.push_back(index);
  for (std::size_t a = 0; a < table.axes.size(); ++a) table.axes[a].push_back(source.values.at(a));
  std::vector<std::pair<std::string, double>> row_numbers;
  // What each case ran: its samples (grown toward target_width or not), and its warnings.
  row_numbers.emplace_back("samples", static_cast<double>(r.samples));
  row_numbers.emplace_back("warnings", static_cast<double>(record_warnings(r).size()));
  for (const auto& g : r.footprint.groups)
    for (const auto& c : g.containment) {
      row_numbers.emplace_back(g.name + ".radius_" + level_text(c.level), c.radius);
      row_numbers.emplace_back(g.name + ".radius_upper_" + level_text(c.level),
                               c.radius_upper ? *c.radius_upper : std::nan(""));
    }
  std::vector<std::pair<std::string, std::string>> row_texts;
  row_texts.emplace_back("target_width_met",
                         !r.target_width                                          ? "none"
                         : r.footprint.widest_relative_width() <= *r.target_width ? "yes"
                                                                                  : "no");
  for (const auto& k : r.footprint.rules)
    row_texts.emplace_back(k.group + "." + k.rule + ".status", to_string(k.status));
  if (index == 0) {
    for (const auto& [name, v] : row_numbers) table.number_names.push_back(name);
    for (const auto& [name, v] : row_texts) table.text_names.push_back(name);
    table.numbers.assign(table.number_names.size(), {});
    table.texts.assign(table.text_names.size(), {});
  }
  if (row_numbers.size() != table.number_names.size() ||
      row_texts.size() != table.text_names.size())
    throw IoError(path + ": case " + std::to_string(index) +
                  " has other bodies, levels or rules than case 0; a sweep's cases must "
                  "report the same figures");
  for (std::size_t k = 0; k < row_numbers.size(); ++k)
    table.numbers[k].push_back(row_numbers[k].second);
  for (std::size_t k = 0; k < row_texts.size(); ++k) table.texts[k].push_back(row_texts[k].second);
}

// Writes the summary group, a dataset per column, with the columns' order as an attribute;
// returns that order (the CSV's header).
std::vector<std::string> write_summary(H5::H5File& file, const SummaryColumns& table,
                                       const std::vector<std::string>& axis_keys) {
  H5::Group summary = file.createGroup("summary");
  std::vector<std::string> order{"case"};
  write_vector(summary, "case", table.index);
  for (std::size_t a = 0; a < axis_keys.size(); ++a) {
    write_vector(summary, axis_keys[a], table.axes[a]);
    order.push_back(axis_keys[a]);
  }
  for (std::size_t k = 0; k < table.number_names.size(); ++k) {
    write_vector(summary, table.number_names[k], table.numbers[k]);
    order.push_back(table.number_names[k]);
  }
  for (std::size_t k = 0; k < table.text_names.size(); ++k) {
    write_strings(summary, table.text_names[k], table.texts[k]);
    order.push_back(table.text_names[k]);
  }
  write_strings_attribute(summary, "columns", order);
  return order;
}

// The same table as CSV: the header `order`, then a line a case.
std::string summary_csv(const SummaryColumns& table, const std::vector<std::string>& order) {
  std::string csv;
  // Names and labels are text cells (quoted when needed, defused when a spreadsheet would take
  // them for a formula: csv_text); numbers are written as they are.
  auto cell = [&](const std::string& text, bool first) {
    if (!first) csv += ',';
    csv += csv_text(text);
  };
  auto number_cell = [&](const std::string& number) { csv += ',' + number; };
  for (std::size_t c = 0; c < order.size(); ++c) cell(order[c], c == 0);
  csv += '\n';
  for (std::size_t i = 0; i < table.index.size(); ++i) {
    csv += std::to_string(i);
    for (std::size_t a = 0; a < table.axes.size(); ++a) number_cell(csv_number(table.axes[a][i]));
    for (std::size_t k = 0; k < table.number_names.size(); ++k)
      number_cell(csv_number(table.numbers[k][i]));
    for (std::size_t k = 0; k < table.text_names.size(); ++k) cell(table.texts[k][i], false);
    csv += '\n';
  }
  return csv;
}

}  // namespace

SweepSummary write_sweep_file(const std::string& path, const std::string& sweep_text,
                              const std::vector<std::string>& axis_keys, bool zip,
                              const std::vector<SweepCaseSource>& cases, int ranks) {
  namespace fs = std::filesystem;
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  const fs::path final_path(path);
  const std::string temporary = temporary_path_of(path);
  RemovedOnSignal removed_on_signal(temporary);
  std::string csv, text;
  try {
    std::error_code ignored;
    fs::remove(temporary, ignored);  // made new, never through a link under the name
    H5::H5File file(temporary, H5F_ACC_EXCL, sealed_file_properties());
    write_sweep_header(file, sweep_text, axis_keys, zip, cases.size(), ranks);
    H5::Group all_cases = file.createGroup("cases");
    SummaryColumns table;  // filled case by case
    table.axes.resize(axis_keys.size());
    for (std::size_t i = 0; i < cases.size(); ++i) {
      const ResultsFile source = read_results(cases[i].file, false);
      const StudyRecord& r = source.record;
      text += case_line(i, axis_keys, cases[i], r);
      copy_case(all_cases, i, path, cases[i], r, axis_keys);
      add_summary_row(table, i, path, cases[i], r);
    }
    csv = summary_csv(table, write_summary(file, table, axis_keys));
    // Every object closed first: HDF5 writes a file out only when its last object is closed.
    all_cases.close();
    file.close();
    seal_file(temporary);
  } catch (const H5::Exception& e) {
    std::error_code ignored;
    fs::remove(temporary, ignored);
    throw IoError(path + ": cannot write the sweep file (" + e.getDetailMsg() + ")");
  } catch (...) {
    std::error_code ignored;
    fs::remove(temporary, ignored);
    throw;
  }
  durable_rename(temporary, final_path.string());
  removed_on_signal.release();
  return {csv, text};
}

}  // namespace strewn
