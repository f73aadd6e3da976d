// The footprint's figure descriptions (footprint/figures.hpp) drive every output form: each
// described figure is found in a study's HDF5 footprint, its JSON summary and its CSV with the
// description's unit, and each labelled one heads a column of the HTML page.
#include <gtest/gtest.h>

#include <H5Cpp.h>

#include <memory>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "command_line.hpp"
#include "footprint/figures.hpp"
#include "support.hpp"

namespace strewn {
namespace {

using test::CommandResult;
using test::run;
using test::slurp;

// The fields of one CSV line; quoted fields may hold commas and doubled quotes.
std::vector<std::string> csv_fields(const std::string& line) {
  std::vector<std::string> fields(1);
  bool quoted = false;
  for (std::size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (c == '"' && quoted && i + 1 < line.size() && line[i + 1] == '"') {
      fields.back() += '"';
      ++i;
    } else if (c == '"') {
      quoted = !quoted;
    } else if (c == ',' && !quoted) {
      fields.emplace_back();
    } else {
      fields.back() += c;
    }
  }
  return fields;
}

class Figures : public ::testing::Test {
 protected:
  // One small study, with every output form written from its results file.
  static void SetUpTestSuite() {
    folder_ = std::make_unique<test::ScratchFolder>("figures-test");
    const std::string file = (*folder_ / "ridge.h5").string();
    const CommandResult r = run(
        {"run", STREWN_SOURCE_DIR "/inputs/ridge-drop.toml", "-n", "1000", "-o", file, "--quiet"});
    ASSERT_EQ(r.status, 0) << r.err;
    const std::string csv = (*folder_ / "ridge.csv").string();
    const std::string html = (*folder_ / "ridge.html").string();
    const CommandResult j = run({"report", file, "--json", "--csv", csv, "--html", html});
    ASSERT_EQ(j.status, 0) << j.err;
    json_ = nlohmann::json::parse(j.out);
    csv_ = slurp(csv);
    html_ = slurp(html);
    H5::H5File h5(file, H5F_ACC_RDONLY);
    H5::Group root = h5.openGroup("footprint");
    for (const auto& [name, figures] : json_["footprint"].items())
      if (name != "all") body_ = name;  // a body: "all" of several may leave sensitivities out
    H5::Group group = root.openGroup(body_);
    for (const FigureDescription& d : kGroupFigures) {
      const std::string name(d.hdf5);
      if (group.attrExists(name) || H5Lexists(group.getId(), name.c_str(), H5P_DEFAULT) > 0)
        hdf5_.insert(name);
    }
  }
  static void TearDownTestSuite() { folder_.reset(); }

  static inline std::unique_ptr<test::ScratchFolder> folder_;
  static inline nlohmann::json json_;
  static inline std::string csv_, html_, body_;
  static inline std::set<std::string> hdf5_;  ///< the described names found in the body's group
};

TEST_F(Figures, NamesAreUniqueAndEveryFigureHasAMeaning) {
  std::set<std::string_view> names;
  for (const FigureDescription& d : kGroupFigures) {
    EXPECT_TRUE(names.insert(d.name).second) << d.name;
    EXPECT_FALSE(d.meaning.empty()) << d.name;
    EXPECT_FALSE(d.hdf5.empty() || d.json.empty()) << d.name;
  }
  static_assert(group_figure("cep").level == 0.5);  // looked up while compiling
  EXPECT_THROW(group_figure("no such figure"), std::invalid_argument);
}

TEST_F(Figures, EveryFigureIsInTheHdf5Footprint) {
  for (const FigureDescription& d : kGroupFigures)
    EXPECT_TRUE(hdf5_.count(std::string(d.hdf5))) << d.name << ": no " << d.hdf5;
}

TEST_F(Figures, EveryFigureIsInTheJson) {
  const nlohmann::json& group = json_["footprint"][body_];
  for (const FigureDescription& d : kGroupFigures) {
    const nlohmann::json::json_pointer at{std::string(d.json)};
    ASSERT_TRUE(group.contains(at)) << d.name << ": no " << d.json;
    // Every figure of this study is determined: null would be a figure left out.
    EXPECT_FALSE(group[at].is_null()) << d.name;
    if (d.shape == FigureShape::bounded) {
      ASSERT_FALSE(group[at].empty()) << d.name;
      EXPECT_TRUE(group[at][0].contains(std::string(d.estimate))) << d.name;
      EXPECT_TRUE(group[at][0].contains(std::string(d.bound))) << d.name;
    }
  }
}

TEST_F(Figures, EveryFigureIsInTheCsvWithItsUnit) {
  std::istringstream lines(csv_);
  std::string line;
  std::getline(lines, line);
  const std::vector<std::string> header = csv_fields(line);
  ASSERT_EQ(header.size(), 10u);
  ASSERT_EQ(header[1], "figure");
  ASSERT_EQ(header[8], "unit");
  std::vector<std::vector<std::string>> rows;
  while (std::getline(lines, line)) {
    rows.push_back(csv_fields(line));
    ASSERT_EQ(rows.back().size(), 10u) << line;
  }
  for (const FigureDescription& d : kGroupFigures) {
    if (d.csv.empty()) continue;
    // The figure's rows: its name, or the names it starts (a point's _east and _north, the
    // ellipses' semi-axes, the sensitivities' outcomes).
    int found = 0;
    for (const auto& row : rows)
      if (row[0] == body_ && row[1].starts_with(d.csv)) {
        ++found;
        EXPECT_EQ(row[8], d.unit) << d.name << ": " << row[1];
      }
    EXPECT_GT(found, 0) << d.name << ": no CSV row " << d.csv;
  }
}

TEST_F(Figures, EveryLabelledFigureHeadsAnHtmlColumn) {
  for (const FigureDescription& d : kGroupFigures) {
    if (d.label.empty()) continue;
    EXPECT_NE(html_.find("<th>" + std::string(d.label)), std::string::npos) << d.name;
  }
}

}  // namespace
}  // namespace strewn
