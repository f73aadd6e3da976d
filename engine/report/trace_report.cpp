#include "report/trace_report.hpp"

#include <cmath>
#include <cstdio>
#include <iomanip>
#include <variant>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "report/cautions.hpp"

namespace strewn {

namespace {
const char* stage_name(DragStage stage) {
  switch (stage) {
    case DragStage::body:
      return "body";
    case DragStage::filling:
      return "filling";
    case DragStage::canopy:
      return "canopy";
  }
  return "?";
}

// Downrange (along the release track) and crossrange (right of it) of the impact from the
// release point.
std::pair<double, double> track_offsets(const TraceRecord& t) {
  const Eigen::Vector2d ahead = bearing_unit(t.scenario->release.track.nominal());
  const Eigen::Vector2d right(ahead.y(), -ahead.x());
  const Eigen::Vector2d d = t.result.position.head<2>() - t.inputs.release.position.head<2>();
  return {d.dot(ahead), d.dot(right)};
}

nlohmann::json range_json(const Range& r) {
  if (r.empty()) return nullptr;
  return {{"min", r.min}, {"max", r.max}};
}

// The values flown, by the scenario's key paths (a body's keys under its name).
nlohmann::json flown_inputs(const TraceRecord& t) {
  const Scenario& s = *t.scenario;
  const BodySpec& spec = s.bodies[t.body_index];
  const Body& b = t.inputs.body;
  const std::string n = spec.name + ".";
  nlohmann::json j;
  j[n + "mass"] = b.mass;
  const DragModelFacts& law = drag_model_facts(b.drag.model());
  const DragValues drag = drag_values(b.drag.law);
  for (std::size_t i = 0; i < law.inputs.size(); ++i)
    if (law.inputs[i].required || drag.value[i] != law.inputs[i].fallback)
      j[n + "drag." + law.inputs[i].key] = drag.value[i];
  if (b.has_canopy) {
    const Canopy& c = b.canopy;
    if (c.trigger == Canopy::Trigger::time)
      j[n + "parachute.deploy_after"] = c.deploy_after;
    else
      j[n + "parachute.deploy_height"] = c.deploy_height;
    j[n + "parachute.fill_time"] = c.fill_time;
    j[n + "parachute.drag_area"] = c.drag_area;
  }
  if (s.medium.model != Medium::Kind::uniform)
    j["medium.temperature_offset"] = t.inputs.conditions.temperature_offset;
  j["medium.density_factor"] = t.inputs.conditions.density_factor;
  const ReleaseSpec& r = s.release;
  const std::pair<const char*, const Uncertain*> release[] = {
      {r.above_ground ? "height_above_ground" : "altitude", &r.altitude},
      {"east", &r.east},
      {"north", &r.north},
      {"speed", &r.speed},
      {"track", &r.track},
      {"climb", &r.climb},
      {"along_error", &r.along_error},
      {"cross_error", &r.cross_error},
      {"delay", &r.delay}};
  for (const auto& [key, value] : release) j[std::string("release.") + key] = value->nominal();
  return j;
}

// A point's height above the ground under it (on terrain, the terrain's height there; NaN where
// the terrain has none).
double height_above_ground(const TraceRecord& t, const Vec3& position) {
  return position.z() -
         std::visit([&](const auto& g) { return g.height(position.x(), position.y()); },
                    t.scenario->site.ground);
}

// "477 m left of track" for a crossrange of -477 m (positive is to the right of the track).
std::string side_of_track(double crossrange) {
  return printf_text("%.2f m %s of track", std::abs(crossrange),
                     crossrange < 0.0 ? "left" : "right");
}

std::string fixed(double v, int digits) {
  return printf_text("%.*f", digits, v);
}
std::string general(double v) {
  return printf_text("%.3g", v);
}
}  // namespace

nlohmann::json impact_json(const FlightResult& r) {
  return {{"time", r.time},           {"east", r.position.x()}, {"north", r.position.y()},
          {"speed", r.speed},         {"energy", r.energy},     {"angle", r.angle},
          {"ground", r.position.z()}, {"slope", r.slope},       {"surface_angle", r.surface_angle}};
}

nlohmann::json trace_json(const TraceRecord& t) {
  const auto& r = t.result;
  const auto [downrange, crossrange] = track_offsets(t);
  nlohmann::json j;
  j["scenario"] = t.scenario->path;
  j["title"] = t.scenario->title;
  j["body"] = t.scenario->bodies[t.body_index].name;
  j["inputs"] = flown_inputs(t);
  j["flown"] = std::string("nominal: every distribution at its median") +
               (t.inputs.body.has_canopy ? ", the canopy fully open" : "") +
               (t.scenario->release.has_burst ? ", no burst velocity" : "");
  j["status"] = to_string(r.status);
  if (r.status == FlightStatus::landed) {
    j["impact"] = impact_json(r);
    j["impact"]["velocity"] = {r.velocity.x(), r.velocity.y(), r.velocity.z()};
    j["impact"]["downrange"] = downrange;
    j["impact"]["crossrange"] = crossrange;
    j["end"] = nullptr;
  } else {
    // No impact: where and when the flight ended instead.
    j["impact"] = nullptr;
    j["end"] = {{"time", r.time},
                {"east", r.position.x()},
                {"north", r.position.y()},
                {"altitude", r.position.z()},
                {"velocity", {r.velocity.x(), r.velocity.y(), r.velocity.z()}}};
  }
  const auto& rel = t.inputs.release;
  j["release"] = {{"east", rel.position.x()},
                  {"north", rel.position.y()},
                  {"altitude", rel.position.z()},
                  {"velocity", {rel.velocity.x(), rel.velocity.y(), rel.velocity.z()}}};
  j["deploy_time"] =
      std::isnan(r.deploy_time) ? nlohmann::json(nullptr) : nlohmann::json(r.deploy_time);
  j["regime"] = {{"reynolds", range_json(t.recorder.reynolds())},
                 {"mach", range_json(t.recorder.mach())},
                 {"quadratic_to_linear", range_json(t.recorder.quadratic_to_linear())},
                 {"drag_model", drag_model_name(t.inputs.body.drag.model())},
                 {"quasi_steady", r.quasi_steady},
                 {"warnings", t.warnings}};
  j["integration"] = {
      {"tolerance", t.tolerance}, {"steps", r.steps}, {"evaluations", r.evaluations}};
  nlohmann::json points = nlohmann::json::array();
  for (const auto& p : t.recorder.points()) {
    points.push_back({{"time", p.point.time},
                      {"east", p.point.position.x()},
                      {"north", p.point.position.y()},
                      {"altitude", p.point.position.z()},
                      {"height", height_above_ground(t, p.point.position)},
                      {"speed", p.point.velocity.norm()},
                      {"air_speed", p.air_speed},
                      {"reynolds", p.reynolds},
                      {"mach", p.mach},
                      {"stage", stage_name(p.point.stage)}});
  }
  j["trajectory"] = std::move(points);
  j["cautions"] = cautions();
  return j;
}

void write_trace_csv(std::ostream& out, const TraceRecord& t) {
  out << "time_s,east_m,north_m,altitude_m,height_m,speed_ms,air_speed_ms,reynolds,mach,stage\n";
  out << std::setprecision(10);
  for (const auto& p : t.recorder.points()) {
    out << p.point.time << ',' << p.point.position.x() << ',' << p.point.position.y() << ','
        << p.point.position.z() << ',' << height_above_ground(t, p.point.position) << ','
        << p.point.velocity.norm() << ',' << p.air_speed << ',' << p.reynolds << ',' << p.mach
        << ',' << stage_name(p.point.stage) << '\n';
  }
}

void write_trace_text(std::ostream& out, const TraceRecord& t) {
  const auto& r = t.result;
  const auto& body = t.scenario->bodies[t.body_index];
  const auto [downrange, crossrange] = track_offsets(t);
  out << "strewn trace: " << (t.scenario->title.empty() ? t.scenario->path : t.scenario->title)
      << "\nbody \"" << body.name << "\", every input at its median (nominal flight)\n\n";
  out << "status    " << to_string(r.status) << "\n";
  if (r.status == FlightStatus::landed) {
    out << "impact    time " << fixed(r.time, 2) << " s   east " << fixed(r.position.x(), 2)
        << " m   north " << fixed(r.position.y(), 2) << " m\n";
    out << "          downrange " << fixed(downrange, 2) << " m, " << side_of_track(crossrange)
        << " (from the release point)\n";
    out << "          speed " << readable_number(r.speed, 3) << " m/s   energy "
        << readable_number(r.energy, 3) << " J   angle " << fixed(r.angle, 1)
        << " deg below horizontal\n";
    out << "ground    " << fixed(r.position.z(), 1) << " m above mean sea level   slope "
        << fixed(r.slope, 1) << " deg   " << fixed(r.surface_angle, 1)
        << " deg to the ground's surface\n";
  } else {
    out << "no impact the flight ended at " << fixed(r.time, 2) << " s, east "
        << fixed(r.position.x(), 2) << " m, north " << fixed(r.position.y(), 2) << " m, altitude "
        << fixed(r.position.z(), 2) << " m\n";
  }
  // Where the release was: above the ground under it (given as such or not).
  const Vec3& release = t.inputs.release.position;
  out << "release   altitude " << fixed(release.z(), 1) << " m above mean sea level, "
      << fixed(height_above_ground(t, release), 1) << " m above the ground under it\n";
  if (!std::isnan(r.deploy_time))
    out << "canopy    deployed at " << fixed(r.deploy_time, 2) << " s\n";
  const auto& rec = t.recorder;
  out << "regime    drag model " << drag_model_name(t.inputs.body.drag.model());
  if (!rec.reynolds().empty())
    out << "   Reynolds " << general(rec.reynolds().min) << " .. " << general(rec.reynolds().max)
        << "   Mach " << fixed(rec.mach().min, 3) << " .. " << fixed(rec.mach().max, 3)
        << "\n          quadratic/linear drag " << general(rec.quadratic_to_linear().min) << " .. "
        << general(rec.quadratic_to_linear().max);
  out << "\nsteps     " << r.steps << " (tolerance " << t.tolerance << " m at the impact point)\n";
  for (const auto& w : t.warnings) out << "warning   " << w << "\n";
  if (!r.quasi_steady)
    out << "settling  the full equations carried the whole fall (the settling form was not "
           "used)\n";
  if (r.quasi_steady)
    out << "settling  the settling (quasi-steady) form carried the fall after the release "
           "transient\n";
  // A short trajectory table: at most about 12 rows spread over the flight.
  const auto& points = rec.points();
  if (!points.empty()) {
    out << "\n  time s    east m   north m  height m   speed m/s  stage\n";
    const std::size_t stride = std::max<std::size_t>(1, points.size() / 12);
    std::vector<std::size_t> rows;
    for (std::size_t i = 0; i < points.size(); i += stride) rows.push_back(i);
    if (rows.back() != points.size() - 1) rows.push_back(points.size() - 1);
    char line[160];
    for (std::size_t i : rows) {
      const auto& p = points[i];
      std::snprintf(line, sizeof line, "%8.2f %9.1f %9.1f %9.1f %11.2f  %s\n", p.point.time,
                    p.point.position.x(), p.point.position.y(),
                    height_above_ground(t, p.point.position), p.point.velocity.norm(),
                    stage_name(p.point.stage));
      out << line;
    }
    out << "  (" << points.size() << " points; --csv or --json for all)\n";
  }
  out << "\n";
  for (const auto& c : cautions()) out << "caution   " << c << "\n";
}

}  // namespace strewn
