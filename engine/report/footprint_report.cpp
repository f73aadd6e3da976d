#include "report/footprint_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "core/text.hpp"
#include "footprint/figures.hpp"
#include "report/cautions.hpp"
#include "report/site_frame.hpp"

namespace strewn {

nlohmann::json json_number(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}

namespace {

nlohmann::json upper_quantiles_json(const std::vector<Containment>& list, std::string_view value,
                                    std::string_view upper) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& k : list) {
    nlohmann::json item{
        {"level", k.level},
        {std::string(value), json_number(k.radius)},
        {std::string(upper), k.radius_upper ? json_number(*k.radius_upper) : nullptr},
        {"confidence", k.confidence},
        {"interval", {json_number(k.interval_lower), json_number(k.interval_upper)}},
        {"relative_width", json_number(k.relative_width())}};
    if (!k.radius_upper) item["samples_needed"] = k.samples_needed;
    out.push_back(item);
  }
  return out;
}

nlohmann::json quantiles_json(const std::vector<QuantileEstimate>& list) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& q : list)
    out.push_back({{"probability", q.probability},
                   {"value", json_number(q.value)},
                   {"interval", {json_number(q.lower), json_number(q.upper)}}});
  return out;
}

nlohmann::json ellipses_json(const std::vector<DispersionEllipse>& list) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& e : list)
    out.push_back({{"level", e.level},
                   {"approximation", "gaussian"},
                   {"scale", e.scale},
                   {"semi_major", json_number(e.semi_major)},
                   {"semi_minor", json_number(e.semi_minor)},
                   {"bearing", json_number(e.bearing)},
                   {"counted", json_number(e.counted)}});
  return out;
}

nlohmann::json polygons_json(const std::vector<HazardPolygon>& list) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& p : list) {
    nlohmann::json item{{"level", p.level}, {"determined", p.determined}, {"rank", p.rank}};
    if (p.determined) {
      item["coverage"] = p.coverage;
      item["area"] = p.area;
      nlohmann::json ring = nlohmann::json::array();
      for (const auto& v : p.ring) ring.push_back({v.east, v.north});
      item["ring"] = ring;
    } else {
      item["reason"] = p.reason;
      if (p.samples_needed) item["samples_needed"] = p.samples_needed;
    }
    out.push_back(item);
  }
  return out;
}

nlohmann::json sensitivity_json(const std::vector<InputSensitivity>& list) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& s : list)
    out.push_back({{"input", s.input},
                   {"measure", s.categorical ? "correlation_ratio" : "spearman"},
                   {"downrange", json_number(s.downrange)},
                   {"crossrange", json_number(s.crossrange)},
                   {"distance", json_number(s.distance)},
                   {"energy", json_number(s.energy)},
                   {"strength", s.strength()}});
  return out;
}

// One figure of a group, laid out by its shape. The exceedance's keys go beside the energy
// quantiles (the JSON pointers of both start at /energy), so both add to what is there.
void figure_json(nlohmann::json& j, const FigureDescription& d, const GroupFootprint& g) {
  nlohmann::json& at = j[nlohmann::json::json_pointer(std::string(d.json))];
  switch (d.shape) {
    case FigureShape::count:
      at = g.*d.count;
      return;
    case FigureShape::number:
      at = json_number(g.*d.number);
      return;
    case FigureShape::point:
      at["east"] = json_number((g.*d.point).east);
      at["north"] = json_number((g.*d.point).north);
      return;
    case FigureShape::covariance: {
      // Undetermined below two landed flights.
      auto term = [&](double v) { return g.landed >= 2 ? json_number(v) : nullptr; };
      at = {{"east_east", term(g.covariance[0])},
            {"east_north", term(g.covariance[1])},
            {"north_north", term(g.covariance[2])}};
      return;
    }
    case FigureShape::bounded:
      at = upper_quantiles_json(g.*d.bounded, d.estimate, d.bound);
      return;
    case FigureShape::quantiles:
      at = quantiles_json(g.*d.quantiles);
      return;
    case FigureShape::ellipses:
      at = ellipses_json(g.ellipses);
      return;
    case FigureShape::polygons:
      at = polygons_json(g.polygons);
      return;
    case FigureShape::grid: {
      double peak = 0.0;
      for (double v : g.grid.density) peak = std::max(peak, v);
      at = {{"cell", g.grid.cell}, {"cells", g.grid.count.size()}, {"peak_density", peak}};
      return;
    }
    case FigureShape::exceedance: {
      const auto& x = g.energy_exceedance;
      at["threshold"] = x.threshold;
      at["exceed"] = json_number(x.share);
      at["exceed_lower"] = json_number(x.lower);
      at["exceed_upper"] = json_number(x.upper);
      return;
    }
    case FigureShape::sensitivity:
      at = sensitivity_json(g.sensitivity);
      return;
  }
}

nlohmann::json group_json(const GroupFootprint& g) {
  nlohmann::json j = nlohmann::json::object();
  for (const FigureDescription& d : kGroupFigures) figure_json(j, d, g);
  return j;
}

std::string rule_statement(const RuleCheck& r) {
  char text[400];
  const char* what = r.rule == "zone_radius" ? "landing outside" : "an impact energy above";
  const char* unit = r.rule == "zone_radius" ? "m" : "J";
  const char* verdict = r.status == RuleStatus::within    ? "is at or below"
                        : r.status == RuleStatus::exceeds ? "is above"
                                                          : "cannot yet be placed against";
  std::snprintf(text, sizeof text,
                "the probability of %s %g %s is estimated at %.3g (%.0f%% bounds %.3g to %.3g); "
                "it %s the accepted %g entered from local rules. The responsible authority "
                "decides.",
                what, r.threshold, unit, r.value, 100.0 * r.confidence, r.lower, r.upper, verdict,
                r.accepted);
  return text;
}

}  // namespace

nlohmann::json record_json(const StudyRecord& r, bool provenance) {
  nlohmann::json j{{"samples", r.samples}, {"completed", r.completed}, {"failed", r.failed},
                   {"seed", r.seed},       {"sampling", r.sampling},   {"title", r.title}};
  if (!r.case_label.empty()) j["case"] = r.case_label;
  if (provenance) {
    j["provenance"] = {{"file", r.file},
                       {"engine_version", r.engine_version},
                       {"created", r.created},
                       {"threads", r.threads},
                       {"scenario_sha256", r.scenario_sha256}};
  }
  const Footprint& f = r.footprint;
  j["confidence"] = f.confidence;
  j["centre"] = f.centre;
  j["downrange_bearing"] = f.downrange_bearing;
  j["convergence"] = {{"rounds", r.rounds},
                      {"widest_relative_width", json_number(f.widest_relative_width())}};
  if (r.target_width) {
    j["convergence"]["target_width"] = *r.target_width;
    j["convergence"]["max_samples"] = r.max_samples;
    j["convergence"]["met"] = f.widest_relative_width() <= *r.target_width;
  }
  const SiteFrame site(r);
  nlohmann::json footprint = nlohmann::json::object();
  for (const auto& g : f.groups) {
    footprint[g.name] = group_json(g);
    if (const auto at = site.locate(g.centre)) {
      footprint[g.name]["centre"]["latitude"] = at->latitude;
      footprint[g.name]["centre"]["longitude"] = at->longitude;
    }
  }
  j["footprint"] = footprint;
  nlohmann::json rules = nlohmann::json::array();
  for (const auto& k : f.rules) {
    nlohmann::json item{{"rule", k.rule},
                        {"group", k.group},
                        {"threshold", k.threshold},
                        {"limit", k.accepted},
                        {"count", k.count},
                        {"rows", k.rows},
                        {"value", json_number(k.value)},
                        {"lower", k.lower},
                        {"upper", k.upper},
                        {"confidence", k.confidence},
                        {"status", to_string(k.status)},
                        {"statement", rule_statement(k)}};
    if (k.samples_needed) item["samples_needed"] = k.samples_needed;
    rules.push_back(item);
  }
  j["rules"] = rules;
  j["warnings"] = record_warnings(r);
  nlohmann::json ranges = nlohmann::json::array();
  for (const auto& w : r.range_warnings)
    ranges.push_back(
        {{"group", w.group},
         {"kind", w.kind},
         {"count", w.count},
         {"rows", w.rows},
         {"share", w.rows ? static_cast<double>(w.count) / static_cast<double>(w.rows) : 0.0},
         {"extreme", json_number(w.extreme)},
         {"limit", json_number(w.limit)}});
  j["model_ranges"] = ranges;
  j["cautions"] = cautions();
  return j;
}

std::vector<const GroupFootprint*> shown_groups(const Footprint& f) {
  std::vector<const GroupFootprint*> out;
  for (const auto& g : f.groups)
    if (g.name != "all" || f.groups.size() > 2) out.push_back(&g);
  return out;
}

std::string centre_text(const StudyRecord& r, const GroupFootprint& g) {
  const Footprint& f = r.footprint;
  const bool release = g.name == "all" && f.groups.size() > 2;
  const std::string name = g.name == "all" && !release ? f.groups.front().name : g.name;
  std::string what;
  if (f.centre == "mean")
    what = release ? "the mean impact of one object of the release (bodies weighted by their "
                     "objects per release)"
                   : "the mean impact of " + name;
  else if (f.centre == "nominal")
    what = release ? "the nominal impacts of the bodies, weighted by their objects per release"
                   : "the nominal impact of " + name + " (every input at its median)";
  else
    what = "the point given in study.centre";
  if (!std::isfinite(g.centre.east) || !std::isfinite(g.centre.north))
    return what + ", undetermined: no flight landed";
  what += printf_text(", east %.1f m, north %.1f m", g.centre.east, g.centre.north);
  const SiteFrame site(r);
  if (const auto at = site.locate(g.centre))
    what +=
        printf_text(" (%.6f %s, %.6f %s)", std::abs(at->latitude), at->latitude < 0.0 ? "S" : "N",
                    std::abs(at->longitude), at->longitude < 0.0 ? "W" : "E");
  return what;
}

namespace {
std::string metres(double v) {
  if (std::isnan(v)) return "-";
  if (std::isinf(v)) return "unbounded";  // failed flights reach it (they count as infinitely far)
  // Decimetres for field studies; three significant digits below 10 m (a laboratory tank).
  return std::abs(v) >= 10.0 || v == 0.0 ? printf_text("%.1f", v) : printf_text("%.3g", v);
}

// The opening lines: title, case, counts, sampling, confidence and how many warnings follow.
void text_header(std::ostream& out, const StudyRecord& r,
                 const std::vector<std::string>& warnings) {
  out << "strewn: " << (r.title.empty() ? std::string("study") : r.title) << "\n";
  if (!r.case_label.empty()) out << r.case_label << "\n";
  out << r.samples << " samples, " << r.completed << " flights landed, " << r.failed
      << " failed (seed " << r.seed << ", " << r.sampling << " sampling";
  if (r.rounds > 1) out << ", grown in " << r.rounds << " parts";
  out << "); bounds at " << r.footprint.confidence * 100.0 << "% confidence\n";
  if (!warnings.empty())
    out << "warnings  " << warnings.size() << ", listed below: read them before the figures\n";
  else
    out << "warnings  none: every sample stayed within its models' ranges and assumptions\n";
}

// One line of a group's containment table: level k's radius, bound, polygon and ellipse.
std::string containment_line(const GroupFootprint& g, std::size_t k) {
  const auto& c = g.containment[k];
  const std::string upper =
      c.radius_upper ? metres(*c.radius_upper) : "needs " + std::to_string(c.samples_needed);
  std::string polygon = "-";
  if (k < g.polygons.size() && g.polygons[k].determined) {
    char p[64];
    std::snprintf(p, sizeof p, g.polygons[k].area >= 100.0 ? "%.0f (%.4f)" : "%.3g (%.4f)",
                  g.polygons[k].area, g.polygons[k].coverage);
    polygon = p;
  }
  std::string ellipse = "-";
  if (k < g.ellipses.size() && g.landed >= 2) {
    char e[64];
    std::snprintf(e, sizeof e, "%s x %s", metres(g.ellipses[k].semi_major).c_str(),
                  metres(g.ellipses[k].semi_minor).c_str());
    ellipse = e;
  }
  char line[256];
  std::snprintf(line, sizeof line, "  %-6g %10s   %13s   %21s   %s\n", c.level,
                metres(c.radius).c_str(), upper.c_str(), polygon.c_str(), ellipse.c_str());
  return line;
}

// One group's block: its name, mean, CEP and centre, the containment table, energy and time.
void text_group(std::ostream& out, const StudyRecord& r, const GroupFootprint& g) {
  char line[256];
  out << "\n";
  if (g.name == "all")
    out << "all bodies, one release (each body weighted by its objects per release, "
        << g.objects_per_release << " in all)";
  else
    out << g.name;
  out << ": mean impact east " << metres(g.mean.east) << " m, north " << metres(g.mean.north)
      << " m; CEP " << metres(g.cep) << " m (Gaussian " << metres(g.cep_gaussian) << " m)\n"
      << "  centre: " << centre_text(r, g) << "\n";
  out << "  level   radius m   upper bound m   polygon m^2 (counted)   ellipse semi-axes m "
         "(Gaussian)\n";
  for (std::size_t k = 0; k < g.containment.size(); ++k) out << containment_line(g, k);
  const auto& x = g.energy_exceedance;
  std::snprintf(line, sizeof line,
                "  impact energy above %g J: share %.4g, upper bound %.4g; time of flight %s to "
                "%s s\n",
                x.threshold, x.share, x.upper, metres(g.time_min).c_str(),
                metres(g.time_max).c_str());
  out << line;
}

// The inputs that move each body's impact most: by the largest of their rank correlations with
// downrange, crossrange, distance and energy (a shift of the footprint shows in the first two,
// a widening in the third), body by body: bodies respond differently to the same input.
void text_sensitivity(std::ostream& out, const Footprint& f) {
  bool heading = false;
  auto rho = [](double v, bool categorical) {
    if (std::isnan(v)) return std::string("    -");
    return printf_text(categorical ? " %.2f" : "%+.2f", v);
  };
  for (const GroupFootprint* group : shown_groups(f)) {
    const GroupFootprint& g = *group;
    if (g.sensitivity.empty()) continue;
    if (!heading)
      out << "\nwhat drives the spread, strongest first (Spearman rank correlation of each input "
             "with the impact's\nposition and energy; for a category, such as an ensemble member, "
             "the correlation ratio):\n";
    heading = true;
    out << "  " << g.name << "\n     down  cross  dist.  energy  input\n";
    for (std::size_t k = 0; k < std::min<std::size_t>(6, g.sensitivity.size()); ++k) {
      const auto& x = g.sensitivity[k];
      out << "    " << rho(x.downrange, x.categorical) << "  " << rho(x.crossrange, x.categorical)
          << "  " << rho(x.distance, x.categorical) << "   " << rho(x.energy, x.categorical) << "  "
          << x.input << "\n";
    }
    if (g.sensitivity.size() > 6)
      out << "    (" << g.sensitivity.size() - 6 << " more in the JSON and HTML)\n";
  }
}

// The criteria of [rules], each with its statement (and a zone's centre); nothing without rules.
void text_rules(std::ostream& out, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  if (f.rules.empty()) return;
  out << "\nagainst the criteria entered in [rules] (reported, not decided):\n";
  for (const auto& k : f.rules) {
    // With one body, "all" is that body.
    const std::string group =
        k.group == "all" && f.groups.size() == 2 ? f.groups.front().name : k.group;
    out << "  " << to_string(k.status) << "  " << group << " " << k.rule << ": "
        << rule_statement(k) << "\n";
    if (k.rule == "zone_radius")
      for (const auto& g : f.groups)
        if (g.name == k.group) out << "      the zone is about " << centre_text(r, g) << "\n";
  }
}

}  // namespace

void write_record_text(std::ostream& out, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  const std::vector<std::string> warnings = record_warnings(r);
  text_header(out, r, warnings);
  for (const GroupFootprint* group : shown_groups(f)) text_group(out, r, *group);
  text_sensitivity(out, f);
  text_rules(out, r);
  if (!warnings.empty()) {
    out << "\nwarnings (" << warnings.size() << "):\n";
    for (const auto& w : warnings) out << "  - " << w << "\n";
  }
  if (!r.file.empty()) out << "\nresults   " << r.file << "\n";
  out << "\n";
  for (const auto& c : cautions()) out << "caution   " << c << "\n";
}

}  // namespace strewn
