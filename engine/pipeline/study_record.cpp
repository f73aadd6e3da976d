#include "pipeline/study_record.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <functional>
#include <limits>

#include "core/text.hpp"
#include "core/version.hpp"
#include "flight/grounds/terrain_surface.hpp"
#include "pipeline/nominal_flight.hpp"

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
  t.categorical.assign(c.input_names.size(), false);
  for (std::size_t d = c.sampled_inputs(); d < c.input_names.size(); ++d)
    t.categorical[d] = c.input_names[d] == "wind.member";
  // The canopy state ranks too when it varies (a canopy that may open partly or fail): its codes
  // full, partial, failed follow the drag area down, an order Spearman can rank.
  if (std::adjacent_find(c.canopy.begin(), c.canopy.end(), std::not_equal_to<>()) !=
      c.canopy.end()) {
    t.storage.emplace_back(c.canopy.begin(), c.canopy.end());
    t.input_names.push_back("canopy");
    t.inputs.emplace_back(t.storage.back());
    t.categorical.push_back(false);
  }
  return t;
}

namespace {
// A share in percent to three figures, never rounded to 0 or 100 unless it is that.
std::string percent_text(std::uint64_t count, std::uint64_t rows) {
  if (rows == 0) return "-";
  const double p = 100.0 * static_cast<double>(count) / static_cast<double>(rows);
  std::string text = printf_text("%.3g", p);
  for (int digits = 4;
       digits <= 9 && ((text == "100" && count < rows) || (text == "0" && count > 0)); ++digits)
    text = printf_text("%.*g", digits, p);
  return text;
}
}  // namespace

namespace {

// Per flag: the rows flagged, and the most extreme value among them (and the second figure of
// the frame offsets).
struct Tally {
  std::uint64_t count = 0;
  double extreme = std::numeric_limits<double>::quiet_NaN(), second = extreme;
};
// Per body: the tallies of each flag (and last, of the floating rows and of the rows that came
// down off the terrain) and its rows.
constexpr std::size_t kFloatsTally = kModelRangeFlagCount, kOffTerrainTally = kFloatsTally + 1;
struct BodyTallies {
  std::vector<std::array<Tally, kModelRangeFlagCount + 2>> tally;
  std::vector<std::uint64_t> rows;
};

BodyTallies tally_flags(const StudyColumns& c, std::size_t bodies) {
  std::vector<std::array<Tally, kModelRangeFlagCount + 2>> tally(bodies);
  std::vector<std::uint64_t> rows(bodies, 0);
  auto most = [](double& into, double v) {
    if (!(v <= into)) into = v;  // NaN-safe maximum
  };
  for (std::size_t i = 0; i < c.rows(); ++i) {
    const std::size_t b = c.body[i];
    if (b >= bodies) continue;
    ++rows[b];
    const std::uint8_t flags = c.regime_flags[i];
    for (int bit = 0; bit < kModelRangeFlagCount && flags; ++bit) {
      const auto flag = static_cast<ModelRangeFlag>(1u << bit);
      if (!(flags & flag)) continue;
      Tally& t = tally[b][static_cast<std::size_t>(bit)];
      ++t.count;
      switch (flag) {
        case kReynoldsBelowLaw:
          if (!(c.reynolds_beyond[i] >= t.extreme)) t.extreme = c.reynolds_beyond[i];
          break;
        case kReynoldsAboveLaw:
          most(t.extreme, c.reynolds_beyond[i]);
          break;
        case kMachBeyondTable:
        case kMachWithoutTable:
          most(t.extreme, c.mach_beyond[i]);
          break;
        case kAboveMedium:
        case kAboveWind:
          most(t.extreme, c.altitude_max[i]);
          break;
        case kLongFlight:
          most(t.extreme, c.time[i]);
          break;
        case kFrameOffset:
          most(t.extreme, c.curvature_offset[i]);
          most(t.second, c.rotation_offset[i]);
          break;
      }
    }
    if (c.status[i] == static_cast<std::uint8_t>(FlightStatus::floats))
      ++tally[b][kFloatsTally].count;
    if (c.status[i] == static_cast<std::uint8_t>(FlightStatus::off_terrain))
      ++tally[b][kOffTerrainTally].count;
  }
  return {std::move(tally), std::move(rows)};
}

}  // namespace

std::vector<RangeWarning> range_warnings(const Scenario& s, const World& world,
                                         const StudyColumns& c, const Footprint& footprint) {
  const std::size_t bodies = s.bodies.size();
  // Named, not a structured binding: the lambda below captures them.
  const BodyTallies tallies = tally_flags(c, bodies);
  const auto& tally = tallies.tally;
  const auto& rows = tallies.rows;
  // The limits of each body, from its nominal flight in the scenario's medium and wind (for an
  // ensemble, the lowest top among the members).
  double wind_top = std::numeric_limits<double>::infinity();
  const auto own_profiles = own_wind_profiles(s.wind.uncertainty);
  for (const auto& layers : own_profiles)
    if (layers.size() >= 2) wind_top = std::min(wind_top, layers.back().altitude);
  std::vector<RangeWarning> out;
  for (std::size_t b = 0; b < bodies; ++b) {
    const FlightInputs nominal = nominal_flight(s, b);
    const Environment environment{&world.medium, nominal.conditions, &world.wind, world.ground};
    ModelLimits limits = model_limits(nominal.body, environment);
    if (!own_profiles.empty()) limits.wind_top = wind_top;
    auto counted = [&](std::uint64_t count) {
      return printf_text("%s: %llu of %llu samples (%s %%): ", s.bodies[b].name.c_str(),
                         static_cast<unsigned long long>(count),
                         static_cast<unsigned long long>(rows[b]),
                         percent_text(count, rows[b]).c_str());
    };
    for (int bit = 0; bit < kModelRangeFlagCount; ++bit) {
      const Tally& t = tally[b][static_cast<std::size_t>(bit)];
      if (t.count == 0) continue;
      const auto flag = static_cast<ModelRangeFlag>(1u << bit);
      RangeWarning w{s.bodies[b].name, to_string(flag),        t.count, rows[b],
                     t.extreme,        limit_of(flag, limits), ""};
      if (flag == kLongFlight) {
        w.limit = kLongFlightTime;
        w.text = counted(t.count) + describe_long_flight(t.extreme);
      } else if (flag == kFrameOffset) {
        w.limit = s.study.tolerance;
        w.extreme = std::max(t.extreme, t.second);  // the larger offset
        w.text = counted(t.count) + describe_frame_offset(t.extreme, t.second, s.study.tolerance);
        // Beside the footprint it is small or not: say how wide the footprint is.
        for (const auto& g : footprint.groups)
          if (g.name == s.bodies[b].name && !g.containment.empty() &&
              std::isfinite(g.containment.back().radius))
            w.text += printf_text(", against the body's %g %% containment radius of %.0f m",
                                  100.0 * g.containment.back().level, g.containment.back().radius);
      } else {
        w.text = counted(t.count) + describe(flag, t.extreme, w.limit, limits.drag_model);
      }
      out.push_back(std::move(w));
    }
    // The statuses a body's flights ended with instead of landing, each with its count.
    auto status_warning = [&](std::size_t tally_index, const char* kind, const char* words) {
      const std::uint64_t count = tally[b][tally_index].count;
      if (count == 0) return;
      constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
      out.push_back({s.bodies[b].name, kind, count, rows[b], kNaN, kNaN, counted(count) + words});
    };
    status_warning(kOffTerrainTally, "off_terrain",
                   "came down where the terrain read has no height (beyond the raster or the "
                   "reach read, site.terrain_reach, or on posts without data): where they land is "
                   "not known (status off_terrain; counted as failed)");
    status_warning(kFloatsTally, "floats",
                   "the body is lighter than the medium at the ground: it would rise or hover, "
                   "never land (status floats; counted as failed)");
  }
  return out;
}

double Relief::height(double east, double north) const {
  if (!(spacing > 0.0)) return std::numeric_limits<double>::quiet_NaN();
  std::array<double, 2> gradient{};
  return bilinear_on_grid(heights, nodes, nodes, (east + half_width) / spacing,
                          (north + half_width) / spacing, gradient);
}

Relief relief_of(const Scenario& s) {
  Relief relief;
  const auto* terrain = std::get_if<TerrainGround>(&s.site.ground);
  if (terrain == nullptr || !terrain->surface) return relief;
  const TerrainSurface& surface = *terrain->surface;
  relief.source = s.site.terrain;
  relief.half_width = surface.frame().half_width;
  // Nodes no closer than 10 m (finer than a map of the footprint shows), at most kReliefNodes.
  relief.nodes = std::clamp<std::size_t>(
      static_cast<std::size_t>(2.0 * relief.half_width / 10.0) + 1, 2, kReliefNodes);
  relief.spacing = 2.0 * relief.half_width / static_cast<double>(relief.nodes - 1);
  relief.heights.resize(relief.nodes * relief.nodes);
  for (std::size_t j = 0; j < relief.nodes; ++j)
    for (std::size_t i = 0; i < relief.nodes; ++i)
      relief.heights[j * relief.nodes + i] = static_cast<float>(
          surface.height(-relief.half_width + relief.spacing * static_cast<double>(i),
                         -relief.half_width + relief.spacing * static_cast<double>(j)));
  return relief;
}

StudyRecord make_record(const Scenario& s, const World& world, const StudyResult& result,
                        Footprint footprint, std::uint64_t seed, int threads) {
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
  r.ground = s.site.frame_height();
  r.release = {s.release.east.nominal(), s.release.north.nominal()};
  // Above mean sea level: a height above the ground is taken above the ground under the nominal
  // release point.
  r.release_altitude =
      s.bodies.empty() ? s.release.altitude.nominal() : nominal_flight(s, 0).release.position.z();
  r.release_track = s.release.track.nominal();
  r.target_width = s.study.target_width;
  r.max_samples = static_cast<std::uint64_t>(s.study.max_samples);
  for (const auto& b : s.bodies) r.body_names.push_back(b.name);
  r.tolerance = s.study.tolerance;
  r.range_warnings = range_warnings(s, world, result.columns, footprint);
  r.relief = relief_of(s);
  r.footprint = std::move(footprint);
  return r;
}

std::vector<std::string> record_warnings(const StudyRecord& r) {
  std::vector<std::string> out;
  if (r.sampling != "random")
    out.push_back("the confidence bounds assume independent random sampling; this study used \"" +
                  r.sampling + "\"");
  if (r.failed > 0)
    out.push_back(std::to_string(r.failed) +
                  " flights failed; they count as landing infinitely far away");
  if (r.target_width && r.footprint.widest_relative_width() > *r.target_width)
    out.push_back("the target width was not met within study.max_samples");
  for (const auto& w : r.range_warnings) out.push_back(w.text);
  return out;
}

}  // namespace strewn
