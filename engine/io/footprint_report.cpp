#include "io/footprint_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "core/text.hpp"
#include "io/cautions.hpp"

namespace strewn {

nlohmann::json json_number(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}

namespace {

nlohmann::json upper_quantiles_json(const std::vector<Containment>& list, const char* value,
                                    const char* upper) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& k : list) {
    nlohmann::json item{
        {"level", k.level},
        {value, json_number(k.radius)},
        {upper, k.radius_upper ? json_number(*k.radius_upper) : nullptr},
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

nlohmann::json group_json(const GroupFootprint& g) {
  nlohmann::json j{
      {"rows", g.rows},
      {"landed", g.landed},
      {"failed", g.failed},
      {"objects_per_release", g.objects_per_release},
      {"mean", {{"east", json_number(g.mean.east)}, {"north", json_number(g.mean.north)}}},
      {"centre", {{"east", json_number(g.centre.east)}, {"north", json_number(g.centre.north)}}},
      {"covariance",
       {{"east_east", g.covariance[0]},
        {"east_north", g.covariance[1]},
        {"north_north", g.covariance[2]}}},
      {"containment", upper_quantiles_json(g.containment, "radius", "radius_upper")},
      {"cep", {{"counted", json_number(g.cep)}, {"gaussian", json_number(g.cep_gaussian)}}}};
  nlohmann::json ellipses = nlohmann::json::array();
  for (const auto& e : g.ellipses)
    ellipses.push_back({{"level", e.level},
                        {"approximation", "gaussian"},
                        {"scale", e.scale},
                        {"semi_major", json_number(e.semi_major)},
                        {"semi_minor", json_number(e.semi_minor)},
                        {"bearing", json_number(e.bearing)},
                        {"counted", json_number(e.counted)}});
  j["ellipses"] = ellipses;
  j["downrange"] = quantiles_json(g.downrange);
  j["crossrange"] = quantiles_json(g.crossrange);
  nlohmann::json polygons = nlohmann::json::array();
  for (const auto& p : g.polygons) {
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
    polygons.push_back(item);
  }
  j["polygons"] = polygons;
  double peak = 0.0;
  for (double d : g.grid.density) peak = std::max(peak, d);
  j["grid"] = {{"cell", g.grid.cell}, {"cells", g.grid.count.size()}, {"peak_density", peak}};
  j["speed"] = upper_quantiles_json(g.speed, "value", "upper");
  const auto& x = g.energy_exceedance;
  j["energy"] = {{"threshold", x.threshold},
                 {"exceed", json_number(x.share)},
                 {"exceed_lower", json_number(x.lower)},
                 {"exceed_upper", json_number(x.upper)},
                 {"quantiles", upper_quantiles_json(g.energy, "value", "upper")}};
  j["time"] = {{"min", json_number(g.time_min)},
               {"max", json_number(g.time_max)},
               {"quantiles", quantiles_json(g.time)}};
  nlohmann::json sensitivity = nlohmann::json::array();
  for (const auto& s : g.sensitivity)
    sensitivity.push_back({{"input", s.input},
                           {"downrange", json_number(s.downrange)},
                           {"crossrange", json_number(s.crossrange)},
                           {"distance", json_number(s.distance)},
                           {"energy", json_number(s.energy)}});
  j["sensitivity"] = sensitivity;
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
  nlohmann::json footprint = nlohmann::json::object();
  for (const auto& g : f.groups) footprint[g.name] = group_json(g);
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
  nlohmann::json warnings = nlohmann::json::array();
  if (r.sampling != "random")
    warnings.push_back(
        "the confidence bounds assume independent random sampling; this study used \"" +
        r.sampling + "\"");
  if (r.failed > 0)
    warnings.push_back(std::to_string(r.failed) +
                       " flights failed; they count as landing infinitely far away");
  if (r.target_width && f.widest_relative_width() > *r.target_width)
    warnings.push_back("the target width was not met within study.max_samples");
  if (!warnings.empty()) j["warnings"] = warnings;
  j["cautions"] = cautions();
  return j;
}

namespace {
std::string metres(double v) {
  if (std::isnan(v)) return "-";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  // Decimetres for field studies; three significant digits below 10 m (a laboratory tank).
  return std::abs(v) >= 10.0 || v == 0.0 ? printf_text("%.1f", v) : printf_text("%.3g", v);
}
}  // namespace

void write_record_text(std::ostream& out, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  out << "strewn: " << (r.title.empty() ? std::string("study") : r.title) << "\n"
      << r.samples << " samples, " << r.completed << " flights landed, " << r.failed
      << " failed (seed " << r.seed << ", " << r.sampling << " sampling";
  if (r.rounds > 1) out << ", grown in " << r.rounds << " parts";
  out << "); bounds at " << f.confidence * 100.0 << "% confidence, centre " << f.centre << "\n";
  for (const auto& g : f.groups) {
    char line[256];
    out << "\n"
        << g.name << ": mean impact east " << metres(g.mean.east) << " m, north "
        << metres(g.mean.north) << " m; CEP " << metres(g.cep) << " m (Gaussian "
        << metres(g.cep_gaussian) << " m)\n";
    out << "  level   radius m   upper bound m   polygon m^2 (counted)   ellipse m (Gaussian)\n";
    for (std::size_t k = 0; k < g.containment.size(); ++k) {
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
      if (k < g.ellipses.size()) {
        char e[64];
        std::snprintf(e, sizeof e, "%s x %s", metres(g.ellipses[k].semi_major).c_str(),
                      metres(g.ellipses[k].semi_minor).c_str());
        ellipse = e;
      }
      std::snprintf(line, sizeof line, "  %-6g %10s   %13s   %21s   %s\n", c.level,
                    metres(c.radius).c_str(), upper.c_str(), polygon.c_str(), ellipse.c_str());
      out << line;
    }
    const auto& x = g.energy_exceedance;
    std::snprintf(line, sizeof line,
                  "  impact energy above %g J: share %.4g, upper bound %.4g; time of flight %s to "
                  "%s s\n",
                  x.threshold, x.share, x.upper, metres(g.time_min).c_str(),
                  metres(g.time_max).c_str());
    out << line;
  }
  if (!f.groups.empty()) {
    // The inputs that move the impact most: by the largest of their rank correlations with
    // downrange, crossrange and distance (a shift of the footprint shows in the first two, a
    // widening in the third).
    auto sensitivity = f.groups.back().sensitivity;
    auto strength = [](const InputSensitivity& x) {
      double most = 0.0;
      for (double v : {x.downrange, x.crossrange, x.distance})
        if (std::isfinite(v)) most = std::max(most, std::abs(v));
      return most;
    };
    std::stable_sort(sensitivity.begin(), sensitivity.end(),
                     [&](const auto& a, const auto& b) { return strength(a) > strength(b); });
    if (!sensitivity.empty()) {
      out << "\nwhat drives the spread (Spearman rank correlation of each input with the impact's "
             "position and energy, all bodies):\n   down  cross  dist.  energy  input\n";
      auto rho = [](double v) {
        char text[16];
        if (std::isnan(v)) return std::string("    -");
        std::snprintf(text, sizeof text, "%+.2f", v);
        return std::string(text);
      };
      for (std::size_t k = 0; k < std::min<std::size_t>(6, sensitivity.size()); ++k) {
        const auto& x = sensitivity[k];
        out << "  " << rho(x.downrange) << "  " << rho(x.crossrange) << "  " << rho(x.distance)
            << "   " << rho(x.energy) << "  " << x.input << "\n";
      }
    }
  }
  if (!f.rules.empty()) {
    out << "\nagainst the criteria entered in [rules] (reported, not decided):\n";
    for (const auto& k : f.rules)
      out << "  " << to_string(k.status) << "  " << k.group << " " << k.rule << ": "
          << rule_statement(k) << "\n";
  }
  const nlohmann::json summary = record_json(r, false);
  if (summary.contains("warnings"))
    for (const auto& w : summary["warnings"]) out << "\nwarning   " << w.get<std::string>() << "\n";
  if (!r.file.empty()) out << "\nresults   " << r.file << "\n";
  out << "\n";
  for (const auto& c : cautions()) out << "caution   " << c << "\n";
}

}  // namespace strewn
