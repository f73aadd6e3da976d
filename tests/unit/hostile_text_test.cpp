// Names and text are data, never markup or commands: UTF-8 checked as its standard defines it,
// control sequences made inert before a terminal sees them, CSV cells that a spreadsheet would
// evaluate defused, markup escaped so that SVG stays well-formed XML, and table files with a
// byte-order mark, CR LF line ends or a duplicated column read or refused, never misread.
#include <gtest/gtest.h>

#include <fstream>
#include <string>
#include <vector>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "report/report_files.hpp"
#include "scenario/scenario.hpp"
#include "scenario/table_file.hpp"
#include "support.hpp"

namespace strewn {
namespace {

// RFC 3629 (UTF-8), section 4 (the well-formed byte sequences) and section 10 (overlong forms
// are invalid); its section 7 examples are valid.
TEST(HostileText, Utf8IsCheckedAsRfc3629DefinesIt) {
  constexpr auto npos = std::string_view::npos;
  // Section 7's examples: "A<NOT IDENTICAL TO><ALPHA>.", the Korean word "hangugeo", the
  // Japanese word "nihongo".
  EXPECT_EQ(invalid_utf8_at("\x41\xE2\x89\xA2\xCE\x91\x2E"), npos);
  EXPECT_EQ(invalid_utf8_at("\xED\x95\x9C\xEA\xB5\xAD\xEC\x96\xB4"), npos);
  EXPECT_EQ(invalid_utf8_at("\xE6\x97\xA5\xE6\x9C\xAC\xE8\xAA\x9E"), npos);
  EXPECT_EQ(invalid_utf8_at("\xF4\x8F\xBF\xBF"), npos);    // U+10FFFF, the last code point
  EXPECT_EQ(invalid_utf8_at("ab\xC0\x80"), 2u);            // overlong NUL (section 10)
  EXPECT_EQ(invalid_utf8_at("\x2F\xC0\xAE\x2E\x2F"), 1u);  // section 10's overlong "."
  EXPECT_EQ(invalid_utf8_at("\xED\xA0\x80"), 0u);          // a surrogate, U+D800
  EXPECT_EQ(invalid_utf8_at("x\xF4\x90\x80\x80"), 1u);     // above U+10FFFF
  EXPECT_EQ(invalid_utf8_at("\xFF"), 0u);                  // never in UTF-8
  EXPECT_EQ(invalid_utf8_at("ok\xE2\x89"), 2u);            // cut short
  EXPECT_EQ(invalid_utf8_at("\xA2"), 0u);                  // a continuation byte alone
}

// What a terminal acts on (ECMA-48: the C0 and C1 control functions, ESC starting its escape
// sequences, DEL) and the bidirectional formatting characters of Unicode's UAX #9 (section 2)
// are written as escapes; other text, line breaks and tabs stay as they are.
TEST(HostileText, PrintableMakesControlsInert) {
  EXPECT_EQ(printable("\x1B[2J\x1B]0;owned\x07"), "\\u001B[2J\\u001B]0;owned\\u0007");
  EXPECT_EQ(printable("a\rb"), "a\\u000Db");
  EXPECT_EQ(printable("del\x7F"), "del\\u007F");
  EXPECT_EQ(printable("\xC2\x9B"
                      "31m"),
            "\\u009B31m");  // CSI as one C1 character
  EXPECT_EQ(printable("abc\xE2\x80\xAE"
                      "fdp.exe"),
            "abc\\u202Efdp.exe");                                        // RIGHT-TO-LEFT OVERRIDE
  EXPECT_EQ(printable("\xE2\x81\xA6x\xE2\x81\xA9"), "\\u2066x\\u2069");  // isolates
  EXPECT_EQ(printable("\xE2\x80\x8F"), "\\u200F");                       // RIGHT-TO-LEFT MARK
  EXPECT_EQ(printable("bad \xFF byte"), "bad \\xFF byte");
  const std::string plain =
      "Gr\xC3\xBC\xC3\x9F"
      "e, \xE6\x97\xA5\xE6\x9C\xAC\n\tline";
  EXPECT_EQ(printable(plain), plain);
}

// OWASP, "CSV Injection": a cell starting with =, +, -, @, tab or carriage return is read by
// spreadsheets as a formula; a leading apostrophe makes it text. RFC 4180, section 2: a field
// with a comma, a double quote or a line break is enclosed in double quotes, inner quotes doubled.
TEST(HostileText, CsvTextCellsAreDefusedAndQuoted) {
  EXPECT_EQ(csv_text("=1+1"), "'=1+1");
  EXPECT_EQ(csv_text("+41"), "'+41");
  EXPECT_EQ(csv_text("-2+3"), "'-2+3");
  EXPECT_EQ(csv_text("@SUM(A1:A9)"), "'@SUM(A1:A9)");
  EXPECT_EQ(csv_text("\tx"), "'\tx");
  EXPECT_EQ(csv_text("=HYPERLINK(\"h\",\"x\")"), "\"'=HYPERLINK(\"\"h\"\",\"\"x\"\")\"");
  EXPECT_EQ(csv_text("a,b"), "\"a,b\"");
  EXPECT_EQ(csv_text("two\nlines"), "\"two\nlines\"");
  EXPECT_EQ(csv_text("bundle"), "bundle");
  EXPECT_EQ(csv_text(""), "");
}

// XML 1.0 (fifth edition), section 2.2: Char admits tab, line feed, carriage return, U+0020 up to
// U+D7FF, U+E000 up to U+FFFD and above; section 2.4: < and & are escaped in character data.
TEST(HostileText, MarkupIsEscapedIntoWellFormedXml) {
  EXPECT_EQ(escape_markup("<script>alert('x')</script> & \"q\""),
            "&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt; &amp; &quot;q&quot;");
  const std::string replacement = "\xEF\xBF\xBD";
  EXPECT_EQ(escape_markup("\xEF\xBF\xBE\xEF\xBF\xBF"),
            replacement + replacement);  // U+FFFE, U+FFFF
  EXPECT_EQ(escape_markup("x\xFFy"), "x" + replacement + "y");
  // Control characters and the marks of UAX #9 are shown as escapes, inert: a right-to-left
  // override would make "exe.fdp" read "pdf.exe" in the page.
  EXPECT_EQ(escape_markup(std::string("a\x01"
                                      "b",
                                      3)),
            "a\\u0001b");
  EXPECT_EQ(escape_markup(std::string("nul\0", 4)), "nul\\u0000");
  EXPECT_EQ(escape_markup("\x1B[2J"), "\\u001B[2J");
  EXPECT_EQ(escape_markup("abc\xE2\x80\xAE"
                          "exe.fdp"),
            "abc\\u202Eexe.fdp");
  EXPECT_EQ(escape_markup("tab\tand\nline\r"), "tab\tand\nline\r");
  EXPECT_EQ(escape_markup("\xE6\x97\xA5"), "\xE6\x97\xA5");
}

const std::string kScenario = R"(title = "t"
[release]
altitude = 500.0
[[body]]
name = "crate"
mass = 10.0
[body.drag]
model = "area"
cd = 1.0
area = 0.3
)";

std::vector<Problem> problems_of(const std::string& text) {
  try {
    parse_scenario(text, "hostile.toml");
  } catch (const ScenarioError& e) {
    return e.problems();
  }
  return {};
}

bool has_problem(const std::vector<Problem>& problems, long line, const std::string& fragment) {
  for (const auto& p : problems)
    if (p.line == line && p.message.find(fragment) != std::string::npos) return true;
  return false;
}

// A scenario is UTF-8 TOML (TOML 1.0: "A TOML file must be a valid UTF-8 encoded Unicode
// document"): other bytes are refused at load with their line, not later by a writer.
TEST(HostileText, ScenarioTextThatIsNotUtf8IsRefusedWithItsLine) {
  std::string latin1 = kScenario;
  latin1.replace(latin1.find("name = \"crate\""), 14, "name = \"cr\xE8te\"");  // ISO 8859-1 e-grave
  const auto problems = problems_of(latin1);
  ASSERT_EQ(problems.size(), 1u);
  EXPECT_EQ(problems[0].line, 5);
  EXPECT_NE(problems[0].message.find("byte 11 of the line is not UTF-8"), std::string::npos)
      << problems[0].describe();
  // The first byte of the file, and the first byte of a line, are counted as byte 1.
  EXPECT_TRUE(has_problem(problems_of("\xFF" + kScenario), 1, "byte 1 of the line is not UTF-8"));
  EXPECT_TRUE(
      has_problem(problems_of("title = \"t\"\n\xFF\n"), 2, "byte 1 of the line is not UTF-8"));
  // The same name in UTF-8 is a name like any other.
  std::string utf8 = kScenario;
  utf8.replace(utf8.find("name = \"crate\""), 14, "name = \"cr\xC3\xA8te\"");
  EXPECT_TRUE(problems_of(utf8).empty());
}

// A body's name is shown on maps and terminals and names files: no control characters, line
// breaks or bidirectional marks, and no two names that differ only in case (one file where case
// is ignored). A title may hold anything: it is made inert where it is written.
TEST(HostileText, BodyNamesMustBePlainAndDistinct) {
  const auto named = [](const std::string& name) {
    std::string text = kScenario;
    return text.replace(text.find("name = \"crate\""), 14, "name = \"" + name + "\"");
  };
  for (const std::string& name : {std::string("a\\u001b[2Jb"), std::string("a\\nb"),
                                  std::string("x\\u202Eexe"), std::string("bell\\u0007")})
    EXPECT_TRUE(has_problem(problems_of(named(name)), 5, "must not hold control characters"))
        << name;
  const std::string two = kScenario + R"([[body]]
name = "CRATE"
mass = 10.0
[body.drag]
model = "area"
cd = 1.0
area = 0.3
)";
  EXPECT_TRUE(has_problem(problems_of(two), 12, "is the same name as body \"crate\""));
  // Names equal under Unicode's NFKC_Casefold (UAX #15; the Unicode Character Database's
  // DerivedNormalizationProps.txt): composed and decomposed accents (U+00E9 and e U+0301),
  // full-width letters (U+FF43...), a zero-width space (U+200B, default ignorable), the ligature
  // U+FB01 and "fi". Each second name must be refused as the first.
  const auto second_named = [](const std::string& first, const std::string& second) {
    std::string text = kScenario;
    text.replace(text.find("name = \"crate\""), 14, "name = \"" + first + "\"");
    return text + "[[body]]\nname = \"" + second +
           "\"\nmass = 10.0\n[body.drag]\nmodel = \"area\"\ncd = 1.0\narea = 0.3\n";
  };
  for (const auto& [first, second] :
       std::vector<std::pair<std::string, std::string>>{{"caf\xC3\xA9", "cafe\xCC\x81"},
                                                        {"crate", "\xEF\xBD\x83rate"},
                                                        {"crate",
                                                         "cr\xE2\x80\x8B"
                                                         "ate"},
                                                        {"\xEF\xAC\x81le", "FILE"}})
    EXPECT_TRUE(has_problem(problems_of(second_named(first, second)), 12, "is the same name as"))
        << second;
  EXPECT_TRUE(problems_of(second_named("crate", "crane")).empty());
  EXPECT_TRUE(has_problem(problems_of(named("\xE2\x80\x8B")), 5, "no visible character"));
  std::string title = kScenario;
  title.replace(0, 11, "title = \"\\u001b]0;x\\u0007 \\u202E <b>&\"");
  EXPECT_TRUE(problems_of(title).empty());
}

// What the results file cannot hold is refused at load, not after every flight: a title longer
// than 4096 bytes, more than 256 bodies (the results file's attributes share one object header
// of 64 KiB: HDF5 File Format Specification, section IV.A.1, from memory). A 4096-byte title and
// 256 bodies with names of 64 characters were written and reported whole
// (tests/reliability/hostile_names.sh runs the longest title).
TEST(HostileText, WhatTheResultsFileCannotHoldIsRefusedAtLoad) {
  std::string long_title = kScenario;
  long_title.replace(0, 11, "title = \"" + std::string(4097, 'x') + "\"");
  EXPECT_TRUE(
      has_problem(problems_of(long_title), 1, "is 4097 bytes long; a title may have at most 4096"));
  std::string longest = kScenario;
  longest.replace(0, 11, "title = \"" + std::string(4096, 'x') + "\"");
  EXPECT_TRUE(problems_of(longest).empty());
  std::string many = "[release]\naltitude = 500.0\n";
  for (int i = 0; i < 257; ++i)
    many += "[[body]]\nname = \"b" + std::to_string(i) +
            "\"\nmass = 1.0\n[body.drag]\nmodel = \"area\"\ncd = 1.0\narea = 0.1\n";
  EXPECT_TRUE(has_problem(problems_of(many), 0, "257 bodies; a scenario may have at most 256"));
}

// Table files (soundings, wind profiles): a UTF-8 byte-order mark before the header and CR LF
// line ends are read as the same table; a column named twice and bytes that are not UTF-8 are
// refused with their line. (The byte-order mark is U+FEFF encoded, EF BB BF: Unicode 15.0,
// section 23.8, from memory.)
TEST(HostileText, TableFilesWithMarksLineEndsAndDuplicateColumns) {
  const test::ScratchFolder folder("tables");
  const std::vector<std::string> columns{"altitude_m", "speed_ms", "from_deg"};
  const auto write = [&](const std::string& name, const std::string& text) {
    std::ofstream(folder / name, std::ios::binary) << text;
    return (folder / name).string();
  };
  const TableFile plain = read_table_file(
      write("plain.csv", "altitude_m,speed_ms,from_deg\n0,3,240\n900,8,255\n"), columns);
  const TableFile marked =
      read_table_file(write("marked.csv",
                            "\xEF\xBB\xBF"
                            "altitude_m,speed_ms,from_deg\r\n0,3,240\r\n900,8,255\r\n"),
                      columns);
  ASSERT_EQ(marked.rows.size(), plain.rows.size());
  for (std::size_t i = 0; i < plain.rows.size(); ++i) {
    EXPECT_EQ(marked.rows[i].values, plain.rows[i].values);
    EXPECT_EQ(marked.rows[i].line, plain.rows[i].line);
  }
  const auto refused = [&](const std::string& name, const std::string& text) {
    try {
      (void)read_table_file(write(name, text), columns);
    } catch (const TableFileError& e) {
      return std::string(e.what());
    }
    return std::string("accepted");
  };
  EXPECT_NE(refused("twice.csv", "altitude_m,speed_ms,from_deg,speed_ms\n0,3,240,9\n")
                .find("twice.csv:1: the header names column \"speed_ms\" twice"),
            std::string::npos);
  EXPECT_NE(refused("latin1.csv", "altitude_m,speed_ms,from_deg\n# m\xE8tres\n0,3,240\n")
                .find("latin1.csv:2: byte 4 of the line is not UTF-8"),
            std::string::npos);
}

}  // namespace
}  // namespace strewn
