#include "io/study_report.hpp"

#include <boost/math/distributions/beta.hpp>
#include <cmath>
#include <cstdio>
#include <limits>

#include "footprint/containment.hpp"
#include "io/cautions.hpp"
#include "io/trace_report.hpp"

namespace strewn {

namespace {

nlohmann::json number_or_null(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}

// Exact one-sided Clopper-Pearson (1934) upper bound of a binomial proportion: the c-quantile
// of Beta(x + 1, n - x) (1 when x = n), from Boost.Math.
double clopper_pearson_upper(std::uint64_t x, std::uint64_t n, double c) {
  if (n == 0 || x >= n) return 1.0;
  const boost::math::beta_distribution<double> beta(static_cast<double>(x) + 1.0,
                                                    static_cast<double>(n - x));
  return boost::math::quantile(beta, c);
}

nlohmann::json group_summary(const Scenario& s, const StudyColumns& c, int body, double centre_east,
                             double centre_north, bool centre_is_mean) {
  std::vector<double> distances;
  double sum_e = 0.0, sum_n = 0.0;
  std::uint64_t landed = 0, rows = 0, exceed = 0;
  for (std::size_t i = 0; i < c.rows(); ++i) {
    if (body >= 0 && c.body[i] != body) continue;
    ++rows;
    if (c.status[i] == 0) {
      ++landed;
      sum_e += c.east[i];
      sum_n += c.north[i];
      if (c.energy[i] > s.study.energy_threshold) ++exceed;
    } else {
      ++exceed;  // a failed flight counts as exceeding
    }
  }
  const double mean_e = landed ? sum_e / static_cast<double>(landed) : std::nan("");
  const double mean_n = landed ? sum_n / static_cast<double>(landed) : std::nan("");
  const double ce = centre_is_mean ? mean_e : centre_east,
               cn = centre_is_mean ? mean_n : centre_north;
  for (std::size_t i = 0; i < c.rows(); ++i) {
    if (body >= 0 && c.body[i] != body) continue;
    distances.push_back(c.status[i] == 0 ? std::hypot(c.east[i] - ce, c.north[i] - cn)
                                         : std::numeric_limits<double>::infinity());
  }
  nlohmann::json containment_json = nlohmann::json::array();
  for (const auto& k : containment(distances, s.study.levels, s.study.confidence)) {
    nlohmann::json item{
        {"level", k.level}, {"radius", number_or_null(k.radius)}, {"confidence", k.confidence}};
    item["radius_upper"] =
        k.radius_upper ? number_or_null(*k.radius_upper) : nlohmann::json(nullptr);
    if (!k.radius_upper) item["samples_needed"] = k.samples_needed;
    containment_json.push_back(item);
  }
  const double share =
      rows ? static_cast<double>(exceed) / static_cast<double>(rows) : std::nan("");
  return {{"rows", rows},
          {"mean", {{"east", number_or_null(mean_e)}, {"north", number_or_null(mean_n)}}},
          {"centre", {{"east", number_or_null(ce)}, {"north", number_or_null(cn)}}},
          {"containment", containment_json},
          {"energy",
           {{"threshold", s.study.energy_threshold},
            {"exceed", number_or_null(share)},
            {"exceed_upper", clopper_pearson_upper(exceed, rows, s.study.confidence)}}}};
}

}  // namespace

nlohmann::json study_summary(const Scenario& s, const World& world, const StudyResult& r) {
  nlohmann::json j{{"samples", r.samples},
                   {"completed", r.completed},
                   {"failed", r.failed},
                   {"seed", s.study.seed},
                   {"sampling", to_string(s.study.sampling)}};
  if (s.study.sampling != SamplingPlan::random)
    j["warnings"] = {
        "the confidence bounds assume independent random sampling; this study used \"" +
        std::string(to_string(s.study.sampling)) + "\""};
  nlohmann::json footprint;
  for (std::size_t b = 0; b < s.bodies.size(); ++b) {
    double ce = s.study.centre_east, cn = s.study.centre_north;
    if (s.study.centre == "nominal") {
      const TraceRecord nominal = trace_body(s, world, s.bodies[b].name);
      ce = nominal.result.position.x();
      cn = nominal.result.position.y();
    }
    footprint[s.bodies[b].name] =
        group_summary(s, r.columns, static_cast<int>(b), ce, cn, s.study.centre == "mean");
  }
  double ce = s.study.centre_east, cn = s.study.centre_north;
  if (s.study.centre == "nominal" && !s.bodies.empty()) {
    ce = footprint[s.bodies[0].name]["centre"]["east"].get<double>();
    cn = footprint[s.bodies[0].name]["centre"]["north"].get<double>();
  }
  footprint["all"] = group_summary(s, r.columns, -1, ce, cn, s.study.centre == "mean");
  j["footprint"] = footprint;
  j["cautions"] = cautions();
  return j;
}

void write_study_text(std::ostream& out, const nlohmann::json& j, const std::string& file) {
  out << "strewn run: " << j["samples"] << " samples, " << j["completed"] << " flights landed, "
      << j["failed"] << " failed (seed " << j["seed"] << ", " << j["sampling"].get<std::string>()
      << " sampling)\n";
  auto metres = [](const nlohmann::json& v) {
    if (v.is_null()) return std::string("-");
    char text[32];
    std::snprintf(text, sizeof text, "%.1f", v.get<double>());
    return std::string(text);
  };
  for (const auto& [name, g] : j["footprint"].items()) {
    out << "\n"
        << name << ": mean impact east " << metres(g["mean"]["east"]) << " m, north "
        << metres(g["mean"]["north"]) << " m\n  level   radius m   upper bound m (confidence)\n";
    for (const auto& k : g["containment"]) {
      char line[160];
      const std::string upper =
          k["radius_upper"].is_null()
              ? "needs " + std::to_string(k.value("samples_needed", 0ULL)) + " samples"
              : metres(k["radius_upper"]);
      std::snprintf(line, sizeof line, "  %-6g %10.1f   %s (%g)\n", k["level"].get<double>(),
                    k["radius"].is_null() ? std::nan("") : k["radius"].get<double>(), upper.c_str(),
                    k["confidence"].get<double>());
      out << line;
    }
    out << "  impact energy above " << g["energy"]["threshold"] << " J: share "
        << g["energy"]["exceed"] << ", upper bound " << g["energy"]["exceed_upper"] << "\n";
  }
  if (j.contains("warnings"))
    for (const auto& w : j["warnings"]) out << "\nwarning   " << w.get<std::string>() << "\n";
  if (!file.empty()) out << "\nresults   " << file << "\n";
  out << "\n";
  for (const auto& c : cautions()) out << "caution   " << c << "\n";
}

namespace {
nlohmann::json uncertain_json(const Uncertain& u) {
  switch (u.kind()) {
    case DistributionKind::fixed:
      return u.p1();
    case DistributionKind::normal: {
      nlohmann::json j{{"dist", "normal"}, {"mean", u.p1()}, {"sd", u.p2()}};
      if (std::isfinite(u.lower())) j["min"] = u.lower();
      if (std::isfinite(u.upper())) j["max"] = u.upper();
      return j;
    }
    case DistributionKind::lognormal: {
      nlohmann::json j{{"dist", "lognormal"}, {"median", u.p1()}, {"sigma", u.p2()}};
      if (u.lower() > 0.0) j["min"] = u.lower();
      if (std::isfinite(u.upper())) j["max"] = u.upper();
      return j;
    }
    case DistributionKind::uniform:
      return {{"dist", "uniform"}, {"min", u.p1()}, {"max", u.p2()}};
    case DistributionKind::triangular:
      return {{"dist", "triangular"}, {"min", u.p1()}, {"mode", u.p2()}, {"max", u.p3()}};
    case DistributionKind::choice: {
      nlohmann::json j{{"dist", "choice"}, {"values", u.values()}};
      if (!u.weights().empty()) j["weights"] = u.weights();
      return j;
    }
  }
  return nullptr;
}
const char* medium_name(Medium::Kind k) {
  return k == Medium::Kind::us1976 ? "us1976" : k == Medium::Kind::profile ? "profile" : "uniform";
}
}  // namespace

nlohmann::json scenario_json(const Scenario& s) {
  nlohmann::json j;
  j["title"] = s.title;
  j["site"] = {{"ground", s.site.ground}};
  if (s.site.latitude) j["site"]["latitude"] = *s.site.latitude;
  if (s.site.longitude) j["site"]["longitude"] = *s.site.longitude;
  auto& m = j["medium"];
  m = {{"model", medium_name(s.medium.model)},
       {"density_factor", uncertain_json(s.medium.density_factor)}};
  if (s.medium.model != Medium::Kind::uniform)
    m["temperature_offset"] = uncertain_json(s.medium.temperature_offset);
  if (s.medium.model == Medium::Kind::profile) m["profile"] = s.medium.profile_file;
  if (s.medium.model == Medium::Kind::uniform) {
    m["density"] = s.medium.density;
    m["viscosity"] = s.medium.viscosity;
    m["sound_speed"] = number_or_null(s.medium.sound_speed);
  }
  nlohmann::json layers = nlohmann::json::array();
  for (const auto& l : s.wind.layers)
    layers.push_back({{"altitude", l.altitude}, {"speed", l.speed}, {"from", l.from}});
  j["wind"] = {{"layers", layers}, {"uncertainty", {{"model", to_string(s.wind.uncertainty)}}}};
  if (!s.wind.file.empty()) j["wind"]["file"] = s.wind.file;
  auto& wu = j["wind"]["uncertainty"];
  if (s.wind.uncertainty == WindUncertaintyModel::bias ||
      s.wind.uncertainty == WindUncertaintyModel::layered)
    wu["speed_sd"] = s.wind.speed_sd;
  if (s.wind.uncertainty == WindUncertaintyModel::layered)
    wu["correlation_length"] = s.wind.correlation_length;
  if (s.wind.uncertainty == WindUncertaintyModel::ensemble) wu["members"] = s.wind.members;
  const auto& r = s.release;
  j["release"] = {{"altitude", uncertain_json(r.altitude)},
                  {"east", uncertain_json(r.east)},
                  {"north", uncertain_json(r.north)},
                  {"speed", uncertain_json(r.speed)},
                  {"track", uncertain_json(r.track)},
                  {"climb", uncertain_json(r.climb)},
                  {"along_error", uncertain_json(r.along_error)},
                  {"cross_error", uncertain_json(r.cross_error)},
                  {"delay", uncertain_json(r.delay)}};
  if (r.has_burst) j["release"]["burst"] = {{"speed", uncertain_json(r.burst_speed)}};
  for (const auto& b : s.bodies) {
    nlohmann::json body{{"name", b.name}, {"count", b.count}, {"mass", uncertain_json(b.mass)}};
    nlohmann::json drag{{"model", to_string(b.drag_model)}};
    if (b.drag_model == DragModel::area) {
      drag["cd"] = uncertain_json(b.cd);
      drag["area"] = uncertain_json(b.area);
      if (!(b.volume.is_fixed() && b.volume.p1() == 0.0)) drag["volume"] = uncertain_json(b.volume);
    } else {
      drag["diameter"] = uncertain_json(b.diameter);
      if (b.drag_model == DragModel::shape) drag["sphericity"] = uncertain_json(b.sphericity);
    }
    if (b.mach_table) {
      nlohmann::json table = nlohmann::json::array();
      for (std::size_t i = 0; i < b.mach_table->mach().size(); ++i)
        table.push_back({b.mach_table->mach()[i], b.mach_table->factor()[i]});
      drag["mach_table"] = table;
    }
    body["drag"] = drag;
    if (b.parachute) {
      const auto& p = *b.parachute;
      nlohmann::json chute{{"fill_time", uncertain_json(p.fill_time)},
                           {"drag_area", uncertain_json(p.drag_area)},
                           {"partial_probability", p.partial_probability},
                           {"failure_probability", p.failure_probability}};
      if (p.trigger == Canopy::Trigger::time)
        chute["deploy_after"] = uncertain_json(p.deploy_after);
      else
        chute["deploy_height"] = uncertain_json(p.deploy_height);
      if (p.partial_probability > 0.0)
        chute["partial_drag_area"] = uncertain_json(p.partial_drag_area);
      body["parachute"] = chute;
    }
    j["body"].push_back(body);
  }
  for (const auto& c : s.correlations)
    j["correlation"].push_back({{"between", {c.first, c.second}}, {"rho", c.rho}});
  const auto& st = s.study;
  j["study"] = {{"samples", st.samples},
                {"seed", st.seed},
                {"sampling", to_string(st.sampling)},
                {"levels", st.levels},
                {"confidence", st.confidence},
                {"tolerance", st.tolerance},
                {"energy_threshold", st.energy_threshold},
                {"grid", st.grid},
                {"max_samples", st.max_samples},
                {"max_failed", st.max_failed}};
  if (st.centre == "point")
    j["study"]["centre"] = {{"east", st.centre_east}, {"north", st.centre_north}};
  else
    j["study"]["centre"] = st.centre;
  if (st.target_width) j["study"]["target_width"] = *st.target_width;
  nlohmann::json rules = nlohmann::json::object();
  if (s.rules.zone_radius) rules["zone_radius"] = *s.rules.zone_radius;
  if (s.rules.max_outside) rules["max_outside"] = *s.rules.max_outside;
  if (s.rules.energy_limit) rules["energy_limit"] = *s.rules.energy_limit;
  if (s.rules.max_exceed) rules["max_exceed"] = *s.rules.max_exceed;
  j["rules"] = rules;
  j["output"] = {{"file", s.output.file}, {"samples", s.output.samples}};
  nlohmann::json inputs = nlohmann::json::array();
  for (const auto& in : s.sampled_inputs)
    inputs.push_back({{"name", in.name},
                      {"distribution", uncertain_json(in.distribution)},
                      {"nominal", in.distribution.nominal()}});
  j["sampled_inputs"] = inputs;
  return j;
}

void write_scenario_text(std::ostream& out, const Scenario& s) {
  out << "# " << s.path << " resolved: every key with its value or default\n"
      << scenario_json(s).dump(2) << "\n\nsampled inputs (" << s.sampled_inputs.size() << "):\n";
  for (const auto& in : s.sampled_inputs)
    out << "  " << in.name << "  " << uncertain_json(in.distribution).dump() << "  nominal "
        << in.distribution.nominal() << "\n";
}

}  // namespace strewn
