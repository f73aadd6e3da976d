#include "scenario/reader.hpp"

#include <cmath>

#include "core/text.hpp"

namespace strewn::toml_input {

long line_of(const toml::node* node) {
  if (!node) return 0;
  return static_cast<long>(node->source().begin.line);
}

std::optional<double> as_number(const toml::node& node) {
  if (const auto* f = node.as_floating_point()) return f->get();
  if (const auto* i = node.as_integer()) return static_cast<double>(i->get());
  return std::nullopt;
}

void Diagnostics::add(std::string key_path, const toml::node* node, std::string message) {
  add(std::move(key_path), line_of(node), std::move(message));
}

void Diagnostics::add(std::string key_path, long line, std::string message) {
  problems_.push_back({file_, std::move(key_path), line, std::move(message)});
}

Table::Table(Diagnostics& diagnostics, const toml::table* table, std::string path, long line)
    : diagnostics_(diagnostics), table_(table), path_(std::move(path)), line_(line) {
  if (table_ && line_ == 0) line_ = toml_input::line_of(table_);
}

bool Table::has(std::string_view key) const {
  return table_ && table_->contains(key);
}

std::string Table::key_path(std::string_view key) const {
  return path_.empty() ? std::string(key) : path_ + "." + std::string(key);
}

long Table::line_of(std::string_view key) const {
  if (!table_) return line_;
  const toml::node* n = table_->get(key);
  return n ? toml_input::line_of(n) : line_;
}

const toml::node* Table::node(std::string_view key) {
  known_.emplace(key);
  return table_ ? table_->get(key) : nullptr;
}

std::string Table::type_name(const toml::node& node) const {
  switch (node.type()) {
    case toml::node_type::string:
      return "a string";
    case toml::node_type::integer:
      return "an integer";
    case toml::node_type::floating_point:
      return "a number";
    case toml::node_type::boolean:
      return "a boolean";
    case toml::node_type::table:
      return "a table";
    case toml::node_type::array:
      return "an array";
    case toml::node_type::date:
    case toml::node_type::time:
    case toml::node_type::date_time:
      return "a date or time";
    default:
      return "something else";
  }
}

std::optional<double> Table::number(std::string_view key, const Bounds& bounds, bool required) {
  const toml::node* n = node(key);
  if (!n) {
    if (required) diagnostics_.add(key_path(key), line_, "is required (" + bounds.describe() + ")");
    return std::nullopt;
  }
  const auto value = as_number(*n);
  if (!value) {
    diagnostics_.add(key_path(key), n, "expected a number, got " + type_name(*n));
    return std::nullopt;
  }
  if (!std::isfinite(*value)) {
    diagnostics_.add(key_path(key), n,
                     "must be a finite number (got " + format_number(*value) + ")");
    return std::nullopt;
  }
  if (!bounds.contains(*value)) {
    diagnostics_.add(key_path(key), n,
                     "must be " + bounds.describe() + " (got " + format_number(*value) + ")");
    return std::nullopt;
  }
  return value;
}

double Table::number(std::string_view key, double fallback, const Bounds& bounds) {
  return number(key, bounds).value_or(fallback);
}

std::optional<long> Table::integer(std::string_view key, long low, long high, bool required) {
  const toml::node* n = node(key);
  if (!n) {
    if (required) diagnostics_.add(key_path(key), line_, "is required (a whole number)");
    return std::nullopt;
  }
  const auto* i = n->as_integer();
  if (!i) {
    diagnostics_.add(key_path(key), n, "expected a whole number, got " + type_name(*n));
    return std::nullopt;
  }
  const auto v = i->get();
  if (v < low || v > high) {
    diagnostics_.add(key_path(key), n,
                     "must be a whole number from " + std::to_string(low) + " to " +
                         std::to_string(high) + " (got " + std::to_string(v) + ")");
    return std::nullopt;
  }
  return static_cast<long>(v);
}

std::optional<bool> Table::boolean(std::string_view key) {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  if (const auto* b = n->as_boolean()) return b->get();
  diagnostics_.add(key_path(key), n, "expected true or false, got " + type_name(*n));
  return std::nullopt;
}

std::optional<std::string> Table::text(std::string_view key,
                                       const std::vector<std::string>& allowed, bool required) {
  const toml::node* n = node(key);
  auto choices = [&] {
    std::string out;
    for (const auto& a : allowed) out += (out.empty() ? "\"" : ", \"") + a + "\"";
    return out;
  };
  if (!n) {
    if (required)
      diagnostics_.add(
          key_path(key), line_,
          allowed.empty() ? "is required (a string)" : "is required: one of " + choices());
    return std::nullopt;
  }
  const auto* s = n->as_string();
  if (!s) {
    diagnostics_.add(key_path(key), n, "expected a string, got " + type_name(*n));
    return std::nullopt;
  }
  std::string value = s->get();
  // A NUL ends a C string: a path would name another file (everything after it dropped, so a
  // results file vanished) and a name would be cut in the results file.
  if (value.find('\0') != std::string::npos) {
    diagnostics_.add(key_path(key), n, "must not hold a NUL character (\\u0000)");
    return std::nullopt;
  }
  if (!allowed.empty() && std::find(allowed.begin(), allowed.end(), value) == allowed.end()) {
    std::string message = "\"" + value + "\" is not one of " + choices();
    const std::string guess = closest_match(value, allowed);
    if (!guess.empty()) message += "; did you mean \"" + guess + "\"?";
    diagnostics_.add(key_path(key), n, message);
    return std::nullopt;
  }
  return value;
}

namespace {
// Checks a distribution against physical bounds: fixed values and choices exactly, continuous
// distributions by the probability they put outside.
std::optional<std::string> outside_bounds(const Uncertain& u, const Bounds& bounds) {
  if (u.kind() == DistributionKind::fixed) {
    if (bounds.contains(u.p1())) return std::nullopt;
    return "must be " + bounds.describe() + " (got " + format_number(u.p1()) + ")";
  }
  if (u.kind() == DistributionKind::choice) {
    for (double v : u.values())
      if (!bounds.contains(v))
        return "every value must be " + bounds.describe() + " (got " + format_number(v) + ")";
    return std::nullopt;
  }
  double outside = 0.0;
  if (std::isfinite(bounds.low)) outside += u.probability_below(bounds.low);
  if (std::isfinite(bounds.high)) outside += u.probability_above(bounds.high);
  if (outside <= kOutsideTolerance) return std::nullopt;
  return "the distribution puts " + format_number(outside) + " of its probability outside " +
         bounds.describe() + "; narrow it or truncate it with min/max";
}
}  // namespace

std::optional<Uncertain> Table::uncertain(std::string_view key, const Bounds& bounds,
                                          bool required) {
  const toml::node* n = node(key);
  const std::string path = key_path(key);
  if (!n) {
    if (required)
      diagnostics_.add(path, line_,
                       "is required (" + bounds.describe() + ", or a distribution table)");
    return std::nullopt;
  }
  if (as_number(*n)) {
    const double v = *as_number(*n);
    if (!std::isfinite(v)) {
      diagnostics_.add(path, n, "must be a finite number (got " + format_number(v) + ")");
      return std::nullopt;
    }
    if (auto why = outside_bounds(Uncertain(v), bounds)) {
      diagnostics_.add(path, n, *why);
      return std::nullopt;
    }
    return Uncertain(v);
  }
  const auto* t = n->as_table();
  if (!t) {
    diagnostics_.add(path, n,
                     "expected a number or a distribution table such as { dist = \"normal\", "
                     "mean = ..., sd = ... }, got " +
                         type_name(*n));
    return std::nullopt;
  }
  Table dist(diagnostics_, t, path, toml_input::line_of(n));
  const auto kind =
      dist.text("dist", {"normal", "lognormal", "uniform", "triangular", "choice"}, true);
  std::optional<Uncertain> result;
  constexpr double inf = std::numeric_limits<double>::infinity();
  if (kind == "normal") {
    auto mean = dist.number("mean", kAny, true);
    auto sd = dist.number("sd", kAny, true);
    const double lo = dist.number("min", -inf, kAny), hi = dist.number("max", inf, kAny);
    if (mean && sd) result = Uncertain::normal(*mean, *sd, lo, hi);
  } else if (kind == "lognormal") {
    auto median = dist.number("median", kAny, true);
    auto sigma = dist.number("sigma", kAny, true);
    const double lo = dist.number("min", 0.0, kAny), hi = dist.number("max", inf, kAny);
    if (median && sigma) result = Uncertain::lognormal(*median, *sigma, lo, hi);
  } else if (kind == "uniform") {
    auto lo = dist.number("min", kAny, true);
    auto hi = dist.number("max", kAny, true);
    if (lo && hi) result = Uncertain::uniform(*lo, *hi);
  } else if (kind == "triangular") {
    auto lo = dist.number("min", kAny, true);
    auto mode = dist.number("mode", kAny, true);
    auto hi = dist.number("max", kAny, true);
    if (lo && mode && hi) result = Uncertain::triangular(*lo, *mode, *hi);
  } else if (kind == "choice") {
    auto values = dist.numbers("values", kAny);
    if (!dist.has("values"))
      diagnostics_.add(path + ".values", dist.line(), "is required (a list of numbers)");
    auto weights = dist.numbers("weights", kAny);
    if (values) result = Uncertain::choice(*values, weights.value_or(std::vector<double>{}));
  }
  // Unknown keys are reported only once the kind is known (its own keys are then marked read).
  if (kind)
    dist.finish();
  else
    dist.finish({"mean", "sd", "min", "max", "median", "sigma", "mode", "values", "weights"});
  if (!result) return std::nullopt;
  const auto problems = result->problems();
  for (const auto& [parameter, message] : problems)
    diagnostics_.add(path + "." + parameter, dist.line_of(parameter), message);
  if (!problems.empty()) return std::nullopt;
  if (auto why = outside_bounds(*result, bounds)) {
    diagnostics_.add(path, n, *why);
    return std::nullopt;
  }
  return result;
}

Uncertain Table::uncertain(std::string_view key, double fallback, const Bounds& bounds) {
  return uncertain(key, bounds).value_or(Uncertain(fallback));
}

std::optional<std::vector<double>> Table::numbers(std::string_view key, const Bounds& bounds) {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  const auto* a = n->as_array();
  if (!a) {
    diagnostics_.add(key_path(key), n, "expected a list of numbers, got " + type_name(*n));
    return std::nullopt;
  }
  std::vector<double> out;
  bool ok = true;
  for (std::size_t i = 0; i < a->size(); ++i) {
    const toml::node& item = *a->get(i);
    const auto v = as_number(item);
    const std::string item_path = key_path(key) + "[" + std::to_string(i) + "]";
    if (!v) {
      diagnostics_.add(item_path, &item, "expected a number, got " + type_name(item));
      ok = false;
    } else if (!std::isfinite(*v) || !bounds.contains(*v)) {
      diagnostics_.add(item_path, &item,
                       "must be " +
                           (std::isfinite(*v) ? bounds.describe() : std::string("finite")) +
                           " (got " + format_number(*v) + ")");
      ok = false;
    } else {
      out.push_back(*v);
    }
  }
  if (!ok) return std::nullopt;
  return out;
}

Table Table::table(std::string_view key) {
  const toml::node* n = node(key);
  if (n && !n->is_table()) {
    diagnostics_.add(key_path(key), n, "expected a table, got " + type_name(*n));
    return Table(diagnostics_, nullptr, key_path(key), toml_input::line_of(n));
  }
  return Table(diagnostics_, n ? n->as_table() : nullptr, key_path(key),
               n ? toml_input::line_of(n) : line_);
}

std::vector<Table> Table::tables(std::string_view key) {
  std::vector<Table> out;
  const toml::node* n = node(key);
  if (!n) return out;
  const auto* a = n->as_array();
  if (!a) {
    diagnostics_.add(
        key_path(key), n,
        "expected an array of tables ([[" + std::string(key) + "]]), got " + type_name(*n));
    return out;
  }
  for (std::size_t i = 0; i < a->size(); ++i) {
    const toml::node* item = a->get(i);
    const std::string item_path = key_path(key) + "[" + std::to_string(i) + "]";
    if (!item->is_table()) {
      diagnostics_.add(item_path, item, "expected a table, got " + type_name(*item));
      continue;
    }
    out.emplace_back(diagnostics_, item->as_table(), item_path, toml_input::line_of(item));
  }
  return out;
}

const toml::array* Table::array(std::string_view key) {
  const toml::node* n = node(key);
  if (!n) return nullptr;
  if (!n->is_array()) {
    diagnostics_.add(key_path(key), n, "expected an array, got " + type_name(*n));
    return nullptr;
  }
  return n->as_array();
}

void Table::finish(const std::vector<std::string>& also_known) {
  if (!table_) return;
  std::vector<std::string> candidates(known_.begin(), known_.end());
  candidates.insert(candidates.end(), also_known.begin(), also_known.end());
  for (const auto& [key, value] : *table_) {
    const std::string name(key.str());
    if (known_.count(name) ||
        std::find(also_known.begin(), also_known.end(), name) != also_known.end())
      continue;
    std::string message = "unknown key \"" + name + "\"";
    const std::string guess = closest_match(name, candidates);
    if (!guess.empty()) message += "; did you mean \"" + guess + "\"?";
    diagnostics_.add(key_path(name), &value, message);
  }
}

}  // namespace strewn::toml_input
