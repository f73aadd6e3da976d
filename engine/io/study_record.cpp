#include "io/study_record.hpp"

#include "core/version.hpp"
#include "io/trace_report.hpp"

namespace strewn {

FootprintSettings footprint_settings(const Scenario& s, const World& world,
                                     std::uint64_t releases) {
  FootprintSettings f;
  f.levels = s.study.levels;
  f.confidence = s.study.confidence;
  f.centre = s.study.centre == "mean"      ? CentreRule::mean
             : s.study.centre == "nominal" ? CentreRule::nominal
                                           : CentreRule::point;
  f.centre_point = {s.study.centre_east, s.study.centre_north};
  if (f.centre == CentreRule::nominal)
    for (const auto& b : s.bodies) {
      const TraceRecord nominal = trace_body(s, world, b.name);
      f.nominal_impacts.push_back({nominal.result.position.x(), nominal.result.position.y()});
    }
  f.downrange_bearing = s.release.track.nominal();
  f.energy_threshold = s.study.energy_threshold;
  f.grid_cell = s.study.grid;
  f.polygon_margin = s.study.tolerance;
  for (const auto& b : s.bodies) {
    f.body_names.push_back(b.name);
    f.body_counts.push_back(static_cast<double>(b.count));
  }
  f.releases = releases;
  f.rules = {s.rules.zone_radius, s.rules.max_outside, s.rules.energy_limit, s.rules.max_exceed};
  return f;
}

ImpactTable impact_table(const StudyColumns& c) {
  ImpactTable t;
  t.body = c.body;
  t.east = c.east;
  t.north = c.north;
  t.time = c.time;
  t.speed = c.speed;
  t.energy = c.energy;
  t.status = c.status;
  t.input_names = c.input_names;
  for (const auto& column : c.inputs) t.inputs.emplace_back(column);
  return t;
}

StudyRecord make_record(const Scenario& s, const StudyResult& result, Footprint footprint,
                        std::uint64_t seed, int threads) {
  StudyRecord r;
  r.title = s.title;
  r.sampling = to_string(s.study.sampling);
  r.engine_version = kEngineVersion;
  r.scenario_text = s.text;
  r.seed = seed;
  r.samples = result.samples;
  r.completed = result.completed;
  r.failed = result.failed;
  r.threads = threads;
  r.latitude = s.site.latitude;
  r.longitude = s.site.longitude;
  r.ground = s.site.ground;
  r.release = {s.release.east.nominal(), s.release.north.nominal()};
  r.release_altitude = s.release.altitude.nominal();
  r.release_track = s.release.track.nominal();
  r.target_width = s.study.target_width;
  r.max_samples = static_cast<std::uint64_t>(s.study.max_samples);
  for (const auto& b : s.bodies) r.body_names.push_back(b.name);
  r.footprint = std::move(footprint);
  return r;
}

}  // namespace strewn
