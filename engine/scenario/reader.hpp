#pragma once
// Reading checked values out of toml++ tables, collecting every problem with its key path and
// line instead of stopping at the first: how strewn reads its TOML input files, the scenario
// (loader.cpp) and a sweep (cluster/sweep.cpp) alike, so that both report problems the same way.
#include <toml++/toml.h>
#include <functional>
#include <limits>
#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "core/bounds.hpp"
#include "core/errors.hpp"
#include "core/uncertain.hpp"

namespace strewn::toml_input {

// Bounds and the usual ones (kPositive, ...) are strewn's own (core/bounds.hpp).
using strewn::Bounds;
using strewn::kAny;
using strewn::kDegrees;
using strewn::kNonNegative;
using strewn::kPositive;
using strewn::kProbability;

/// Largest probability a distribution may put outside a physical range; the rest is cut off
/// (an implicit truncation at the physical bound, see docs/scenario.md).
inline constexpr double kOutsideTolerance = 1e-6;

class Diagnostics {
 public:
  explicit Diagnostics(std::string file) : file_(std::move(file)) {}
  void add(std::string key_path, const toml::node* node, std::string message);
  void add(std::string key_path, long line, std::string message);
  [[nodiscard]] bool empty() const { return problems_.empty(); }
  [[nodiscard]] std::vector<Problem> take() { return std::move(problems_); }
  [[nodiscard]] const std::string& file() const { return file_; }

 private:
  std::string file_;
  std::vector<Problem> problems_;
};

/// A view of one table that records which keys were read, so unknown keys can be reported.
class Table {
 public:
  Table(Diagnostics& diagnostics, const toml::table* table, std::string path, long line = 0);

  [[nodiscard]] bool present() const { return table_ != nullptr; }
  [[nodiscard]] bool has(std::string_view key) const;
  [[nodiscard]] const std::string& path() const { return path_; }
  [[nodiscard]] std::string key_path(std::string_view key) const;
  [[nodiscard]] long line() const { return line_; }
  [[nodiscard]] long line_of(std::string_view key) const;
  [[nodiscard]] const toml::node* node(std::string_view key);
  /// Marks a key as known without reading it (it was reported otherwise).
  void mark(std::string_view key) { (void)node(key); }
  Diagnostics& diagnostics() { return diagnostics_; }

  /// A plain number (integers accepted); nullopt when absent or invalid (then reported).
  std::optional<double> number(std::string_view key, const Bounds& bounds, bool required = false);
  double number(std::string_view key, double fallback, const Bounds& bounds);
  std::optional<long> integer(std::string_view key, long low, long high, bool required = false);
  std::optional<bool> boolean(std::string_view key);
  std::optional<std::string> text(std::string_view key,
                                  const std::vector<std::string>& allowed = {},
                                  bool required = false);
  /// A number or a distribution table; checked against `bounds` (fixed values exactly,
  /// distributions by the probability they put outside).
  std::optional<Uncertain> uncertain(std::string_view key, const Bounds& bounds,
                                     bool required = false);
  Uncertain uncertain(std::string_view key, double fallback, const Bounds& bounds);
  /// A list of numbers.
  std::optional<std::vector<double>> numbers(std::string_view key, const Bounds& bounds);
  /// A sub-table (absent: a view with present() false); reports a wrong type.
  Table table(std::string_view key);
  /// An array of tables ([[key]] or key = [{...}, ...]); reports a wrong type.
  std::vector<Table> tables(std::string_view key);
  /// The raw array node, marked as known.
  const toml::array* array(std::string_view key);

  /// Reports every key present but never read, with a suggestion for the likely intended key.
  void finish(const std::vector<std::string>& also_known = {});

 private:
  std::string type_name(const toml::node& node) const;
  Diagnostics& diagnostics_;
  const toml::table* table_;
  std::string path_;
  long line_;
  std::set<std::string, std::less<>> known_;
};

/// Line of a node (0 when unknown).
long line_of(const toml::node* node);
/// Reads a number node (integer or float); nullopt for other types.
std::optional<double> as_number(const toml::node& node);

}  // namespace strewn::toml_input
