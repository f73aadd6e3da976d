#include "report/scenario_report.hpp"

#include "report/json_text.hpp"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <limits>

namespace strewn {

namespace {
nlohmann::json number_or_null(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}
}  // namespace

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
// A file named in the scenario as it will be read: relative to the scenario's folder.
std::string as_read(const Scenario& s, const std::string& file) {
  const std::filesystem::path p(file);
  return p.is_relative()
             ? (std::filesystem::path(s.path).parent_path() / p).lexically_normal().string()
             : file;
}

// The medium: its model and the keys that model reads (a uniform medium's fixed properties).
nlohmann::json medium_json(const Scenario& s) {
  nlohmann::json m{{"model", name_of(s.medium.model)},
                   {"density_factor", uncertain_json(s.medium.density_factor)}};
  if (s.medium.model != Medium::Kind::uniform)
    m["temperature_offset"] = uncertain_json(s.medium.temperature_offset);
  if (s.medium.model == Medium::Kind::profile) m["profile"] = as_read(s, s.medium.profile_file);
  if (s.medium.model == Medium::Kind::uniform) {
    m["density"] = s.medium.density;
    m["viscosity"] = s.medium.viscosity;
    m["sound_speed"] = number_or_null(s.medium.sound_speed);
  }
  return m;
}

// The wind: its layers, its file and the keys of its uncertainty model.
nlohmann::json wind_json(const Scenario& s) {
  nlohmann::json layers = nlohmann::json::array();
  for (const auto& l : s.wind.layers)
    layers.push_back({{"altitude", l.altitude}, {"speed", l.speed}, {"from", l.from}});
  nlohmann::json wind{{"layers", layers},
                      {"uncertainty", {{"model", wind_source_name(s.wind.uncertainty)}}}};
  if (!s.wind.file.empty()) wind["file"] = as_read(s, s.wind.file);
  // The keys of the wind source, as its file writes them back.
  std::visit(
      [&](const auto& settings) {
        settings.echo(wind["uncertainty"],
                      [&](const std::string& file) { return as_read(s, file); });
      },
      s.wind.uncertainty);
  return wind;
}

// The release: where, how fast and when, with the burst when there is one.
nlohmann::json release_json(const ReleaseSpec& r) {
  nlohmann::json release{
      {r.above_ground ? "height_above_ground" : "altitude", uncertain_json(r.altitude)},
      {"east", uncertain_json(r.east)},
      {"north", uncertain_json(r.north)},
      {"speed", uncertain_json(r.speed)},
      {"track", uncertain_json(r.track)},
      {"climb", uncertain_json(r.climb)},
      {"along_error", uncertain_json(r.along_error)},
      {"cross_error", uncertain_json(r.cross_error)},
      {"delay", uncertain_json(r.delay)}};
  if (r.has_burst) release["burst"] = {{"speed", uncertain_json(r.burst_speed)}};
  return release;
}

// A body's drag: the keys its drag model reads, and its Mach table when it has one.
nlohmann::json drag_json(const BodySpec& b) {
  const DragModelFacts& law = drag_model_facts(b.drag_model);
  nlohmann::json drag{{"model", law.name}};
  for (std::size_t i = 0; i < law.inputs.size(); ++i) {
    const DragInput& input = law.inputs[i];
    const Uncertain& u = b.drag_inputs[i];
    // An optional key left at its fallback was not written: it is not reported either.
    if (input.required || !(u.is_fixed() && u.p1() == input.fallback))
      drag[input.key] = uncertain_json(u);
  }
  if (b.mach_table) {
    nlohmann::json table = nlohmann::json::array();
    for (std::size_t i = 0; i < b.mach_table->mach().size(); ++i)
      table.push_back({b.mach_table->mach()[i], b.mach_table->factor()[i]});
    drag["mach_table"] = table;
  }
  return drag;
}

// A body: name, count, mass, drag and parachute (with its trigger and partial opening).
nlohmann::json body_json(const BodySpec& b) {
  nlohmann::json body{{"name", b.name}, {"count", b.count}, {"mass", uncertain_json(b.mass)}};
  body["drag"] = drag_json(b);
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
  return body;
}

// The study's settings, with its centre as a rule's name or as a point.
nlohmann::json study_json(const StudySpec& st) {
  nlohmann::json study{{"samples", st.samples},
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
    study["centre"] = {{"east", st.centre_east}, {"north", st.centre_north}};
  else
    study["centre"] = st.centre;
  if (st.target_width) study["target_width"] = *st.target_width;
  return study;
}

// The criteria entered in [rules]: only those given.
nlohmann::json rules_json(const RulesSpec& rules_in) {
  nlohmann::json rules = nlohmann::json::object();
  if (rules_in.zone_radius) rules["zone_radius"] = *rules_in.zone_radius;
  if (rules_in.max_outside) rules["max_outside"] = *rules_in.max_outside;
  if (rules_in.energy_limit) rules["energy_limit"] = *rules_in.energy_limit;
  if (rules_in.max_exceed) rules["max_exceed"] = *rules_in.max_exceed;
  return rules;
}

}  // namespace

nlohmann::json scenario_json(const Scenario& s) {
  nlohmann::json j;
  j["title"] = s.title;
  j["site"] = nlohmann::json::object();
  for (const auto& [key, value] : ground_settings(s.site.ground)) j["site"][key] = value;
  if (!s.site.terrain.empty()) j["site"]["terrain"] = s.site.terrain;
  if (s.site.latitude) j["site"]["latitude"] = *s.site.latitude;
  if (s.site.longitude) j["site"]["longitude"] = *s.site.longitude;
  j["medium"] = medium_json(s);
  j["wind"] = wind_json(s);
  j["release"] = release_json(s.release);
  for (const auto& b : s.bodies) j["body"].push_back(body_json(b));
  for (const auto& c : s.correlations)
    j["correlation"].push_back({{"between", {c.first, c.second}}, {"rho", c.rho}});
  j["study"] = study_json(s.study);
  j["rules"] = rules_json(s.rules);
  j["output"] = {
      {"file", s.output.file}, {"samples", s.output.samples}, {"compress", s.output.compress}};
  nlohmann::json inputs = nlohmann::json::array();
  for (const auto& in : s.sampled_inputs)
    inputs.push_back({{"name", in.name},
                      {"distribution", uncertain_json(in.distribution)},
                      {"nominal", in.distribution.nominal()}});
  j["sampled_inputs"] = inputs;
  if (!s.warnings.empty()) j["warnings"] = s.warnings;
  return j;
}

void write_scenario_text(std::ostream& out, const Scenario& s) {
  out << "# " << s.path << " resolved: every key with its value or default\n"
      << json_text(scenario_json(s)) << "\n\nsampled inputs (" << s.sampled_inputs.size() << "):\n";
  for (const auto& in : s.sampled_inputs)
    out << "  " << in.name << "  " << json_text(uncertain_json(in.distribution), -1) << "  nominal "
        << in.distribution.nominal() << "\n";
  for (const auto& w : s.warnings) out << "warning: " << w << "\n";
}

}  // namespace strewn
