// libFuzzer target over report generation from crafted names: any bytes as a study's title and
// its bodies' names (as a crafted results file may hold them) must give a JSON and a GeoJSON that
// parse, an SVG map (of all and of each body) that is well-formed XML, an HTML page with exactly
// the tags of the same page under plain names, a CSV whose every row has its ten cells and no
// cell a spreadsheet would evaluate, and terminal text with no control character or reordering
// mark; never a crash or an undefined behaviour. The record is a real study's, read once.
#include <expat.h>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <map>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "core/text.hpp"
#include "fuzz_study.hpp"
#include "report/footprint_report.hpp"
#include "report/json_text.hpp"
#include "report/report_files.hpp"
#include "store/results_file.hpp"

namespace {

using strewn::StudyRecord;

// The record with its title and each body's name replaced (a group named by a body follows it).
StudyRecord renamed(const StudyRecord& original, const std::string& title,
                    const std::vector<std::string>& names) {
  StudyRecord r = original;
  r.title = title;
  std::map<std::string, std::string> rename;
  for (std::size_t b = 0; b < r.body_names.size() && b < names.size(); ++b)
    rename[r.body_names[b]] = names[b];
  auto apply = [&](std::string& name) {
    if (auto it = rename.find(name); it != rename.end()) name = it->second;
  };
  for (auto& name : r.body_names) apply(name);
  for (auto& g : r.footprint.groups) apply(g.name);
  for (auto& k : r.footprint.rules) apply(k.group);
  for (auto& w : r.range_warnings) apply(w.group);
  return r;
}

bool well_formed_xml(const std::string& text) {
  XML_Parser parser = XML_ParserCreate("UTF-8");
  const bool ok = XML_Parse(parser, text.data(), static_cast<int>(text.size()), 1) == XML_STATUS_OK;
  XML_ParserFree(parser);
  return ok;
}

// The CSV's records (RFC 4180: quoted cells may hold commas, quotes doubled and line ends).
std::vector<std::vector<std::string>> csv_records(const std::string& text) {
  std::vector<std::vector<std::string>> records(1, std::vector<std::string>(1));
  bool quoted = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (quoted) {
      if (c == '"' && i + 1 < text.size() && text[i + 1] == '"')
        records.back().back() += text[++i];
      else if (c == '"')
        quoted = false;
      else
        records.back().back() += c;
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      records.back().emplace_back();
    } else if (c == '\n') {
      records.emplace_back(1);
    } else {
      records.back().back() += c;
    }
  }
  if (records.back().size() == 1 && records.back()[0].empty()) records.pop_back();
  return records;
}

void check_csv(const std::string& csv) {
  for (const auto& record : csv_records(csv)) {
    if (record.size() != 10) std::abort();
    const std::string& group = record[0];  // the one text cell that holds a name
    if (!group.empty() && std::string("=+-@\t\r").find(group[0]) != std::string::npos) std::abort();
  }
}

// No C0 control but line feed and tab, no DEL, no C1, no mark that reorders text (UAX #9).
void check_terminal(const std::string& text) {
  for (std::size_t i = 0; i < text.size();) {
    const auto [code, length] = strewn::decode_utf8(text, i);
    if (code != U'\n' && code != U'\t' && strewn::acts_on_text(code)) std::abort();
    i += std::max<std::size_t>(length, 1);
  }
}

std::size_t tags(const std::string& html) {
  return static_cast<std::size_t>(std::count(html.begin(), html.end(), '<'));
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const StudyRecord original = strewn::read_results(strewn::fuzz::study_file()).record;
  // The input: the title, then each body's name, separated by byte 0x1F.
  std::vector<std::string> parts(1);
  for (std::size_t i = 0; i < size; ++i)
    if (data[i] == 0x1F)
      parts.emplace_back();
    else
      parts.back() += static_cast<char>(data[i]);
  const std::vector<std::string> names(parts.begin() + 1, parts.end());
  const StudyRecord r = renamed(original, parts[0], names);
  // The same record under plain names that collide where the crafted ones do (and stay empty or
  // "all", the group of every body, where they are): its page must have the same tags.
  std::vector<std::string> plain_names;
  std::map<std::string, std::string> plain_of;
  for (const auto& name : r.body_names) {
    auto [it, added] = plain_of.try_emplace(name, "body" + std::to_string(plain_of.size()));
    if (name.empty() || name == "all") it->second = name;
    plain_names.push_back(it->second);
  }
  const StudyRecord plain = renamed(original, r.title.empty() ? "" : "title", plain_names);

  (void)nlohmann::json::parse(strewn::json_text(strewn::record_json(r, true)));  // throws if not
  (void)nlohmann::json::parse(strewn::geojson_text(r, nullptr));
  check_csv(strewn::figures_csv(r));
  if (!well_formed_xml(strewn::map_svg(r))) std::abort();
  for (const auto& g : r.footprint.groups)
    if (!well_formed_xml(strewn::map_svg(r, g.name))) std::abort();
  if (tags(strewn::html_report(r)) != tags(strewn::html_report(plain))) std::abort();
  std::ostringstream terminal;
  strewn::write_record_text(terminal, r);
  check_terminal(strewn::printable(terminal.str()));
  return 0;
}
