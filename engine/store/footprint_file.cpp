#include "store/footprint_file.hpp"

#include <array>
#include <cmath>
#include <limits>

#include "core/errors.hpp"
#include "footprint/figures.hpp"
#include "store/hdf5_support.hpp"

namespace strewn {

using namespace hdf5;

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double or_nan(const std::optional<double>& v) {
  return v ? *v : kNaN;
}
std::optional<double> from_nan(double v) {
  return std::isnan(v) ? std::nullopt : std::optional<double>(v);
}

// The attributes of the footprint and of the run the footprint group holds, each list for both
// writing and reading. A body group's figures are described in footprint/figures.hpp.
constexpr auto footprint_fields() {
  return std::make_tuple(std::pair{"levels", &Footprint::levels},
                         std::pair{"confidence", &Footprint::confidence},
                         std::pair{"centre", &Footprint::centre},
                         std::pair{"downrange_bearing", &Footprint::downrange_bearing},
                         std::pair{"energy_threshold", &Footprint::energy_threshold},
                         std::pair{"releases", &Footprint::releases});
}
constexpr auto record_fields() {
  return std::make_tuple(
      std::pair{"title", &StudyRecord::title}, std::pair{"sampling", &StudyRecord::sampling},
      std::pair{"ground", &StudyRecord::ground},
      std::pair{"release_altitude", &StudyRecord::release_altitude},
      std::pair{"release_track", &StudyRecord::release_track},
      std::pair{"max_samples", &StudyRecord::max_samples},
      std::pair{"rounds", &StudyRecord::rounds}, std::pair{"tolerance", &StudyRecord::tolerance});
}

// The energy exceedance's attributes of the energy group, for writing and reading.
constexpr auto exceedance_fields() {
  return std::make_tuple(
      std::pair{"threshold", &Exceedance::threshold}, std::pair{"exceed_count", &Exceedance::count},
      std::pair{"rows", &Exceedance::rows}, std::pair{"exceed", &Exceedance::share},
      std::pair{"exceed_lower", &Exceedance::lower}, std::pair{"exceed_upper", &Exceedance::upper});
}

template <class Item, class F>
std::vector<double> column(const std::vector<Item>& items, F field) {
  std::vector<double> out;
  for (const auto& i : items) out.push_back(field(i));
  return out;
}

void write_bounded(H5::Group& parent, const FigureDescription& d,
                   const std::vector<Containment>& c) {
  H5::Group g = parent.createGroup(std::string(d.hdf5));
  write_vector(g, "level", column(c, [](const auto& k) { return k.level; }));
  write_vector(g, std::string(d.estimate), column(c, [](const auto& k) { return k.radius; }));
  write_vector(g, std::string(d.bound),
               column(c, [](const auto& k) { return k.radius_upper ? *k.radius_upper : kNaN; }));
  std::vector<std::uint64_t> needed;
  for (const auto& k : c) needed.push_back(k.samples_needed);
  write_vector(g, "samples_needed", needed);
  write_vector(g, "interval_lower", column(c, [](const auto& k) { return k.interval_lower; }));
  write_vector(g, "interval_upper", column(c, [](const auto& k) { return k.interval_upper; }));
  write_vector(g, "relative_width", column(c, [](const auto& k) { return k.relative_width(); }));
}

std::vector<Containment> read_bounded(const H5::Group& parent, const FigureDescription& d,
                                      double confidence) {
  H5::Group g = parent.openGroup(std::string(d.hdf5));
  const auto level = read_vector<double>(g, "level");
  const auto value = read_vector<double>(g, std::string(d.estimate));
  const auto upper = read_vector<double>(g, std::string(d.bound));
  const auto needed = read_vector<std::uint64_t>(g, "samples_needed");
  const auto lower_i = read_vector<double>(g, "interval_lower");
  const auto upper_i = read_vector<double>(g, "interval_upper");
  std::vector<Containment> out(level.size());
  for (std::size_t k = 0; k < level.size(); ++k) {
    out[k].level = level[k];
    out[k].radius = value.at(k);
    if (!std::isnan(upper.at(k))) out[k].radius_upper = upper[k];
    out[k].samples_needed = needed.at(k);
    out[k].interval_lower = lower_i.at(k);
    out[k].interval_upper = upper_i.at(k);
    out[k].confidence = confidence;
  }
  return out;
}

void write_quantiles(H5::Group& parent, const std::string& name,
                     const std::vector<QuantileEstimate>& q) {
  H5::Group g = parent.createGroup(name);
  write_vector(g, "probability", column(q, [](const auto& k) { return k.probability; }));
  write_vector(g, "value", column(q, [](const auto& k) { return k.value; }));
  write_vector(g, "lower", column(q, [](const auto& k) { return k.lower; }));
  write_vector(g, "upper", column(q, [](const auto& k) { return k.upper; }));
}

std::vector<QuantileEstimate> read_quantiles(const H5::Group& parent, const std::string& name) {
  H5::Group g = parent.openGroup(name);
  const auto p = read_vector<double>(g, "probability"), v = read_vector<double>(g, "value"),
             l = read_vector<double>(g, "lower"), u = read_vector<double>(g, "upper");
  std::vector<QuantileEstimate> out(p.size());
  for (std::size_t k = 0; k < p.size(); ++k) out[k] = {p[k], v.at(k), l.at(k), u.at(k)};
  return out;
}

// The covariance as a full, symmetric 2 x 2 matrix (east, north), m^2.
void write_covariance(H5::Group& g, const std::string& name, const GroupFootprint& f) {
  const hsize_t dims[2] = {2, 2};
  H5::DataSpace space(2, dims);
  const double c[4] = {f.covariance[0], f.covariance[1], f.covariance[1], f.covariance[2]};
  g.createDataSet(name, type_of<double>(), space).write(c, type_of<double>());
}

void write_ellipses(H5::Group& g, const std::string& name,
                    const std::vector<DispersionEllipse>& el) {
  H5::Group e = g.createGroup(name);
  write_attribute(e, "approximation", std::string("gaussian"));
  write_vector(e, "level", column(el, [](const auto& k) { return k.level; }));
  write_vector(e, "scale", column(el, [](const auto& k) { return k.scale; }));
  write_vector(e, "semi_major", column(el, [](const auto& k) { return k.semi_major; }));
  write_vector(e, "semi_minor", column(el, [](const auto& k) { return k.semi_minor; }));
  write_vector(e, "bearing", column(el, [](const auto& k) { return k.bearing; }));
  write_vector(e, "counted", column(el, [](const auto& k) { return k.counted; }));
}

// The hazard polygons, a row each; their rings' vertices all in two columns, each polygon's
// run of them given by its first vertex and vertex count.
void write_polygons(H5::Group& g, const std::string& name, const std::vector<HazardPolygon>& ps) {
  H5::Group p = g.createGroup(name);
  write_vector(p, "level", column(ps, [](const auto& k) { return k.level; }));
  std::vector<std::uint64_t> rank, needed, first, count;
  std::vector<std::uint8_t> determined;
  std::vector<double> ve, vn;
  std::vector<std::string> reason;
  for (const auto& k : ps) {
    rank.push_back(k.rank);
    needed.push_back(k.samples_needed);
    determined.push_back(k.determined ? 1 : 0);
    first.push_back(ve.size());
    count.push_back(k.ring.size());
    reason.push_back(k.reason);
    for (const auto& v : k.ring) {
      ve.push_back(v.east);
      vn.push_back(v.north);
    }
  }
  write_vector(p, "rank", rank);
  write_vector(p, "determined", determined);
  write_vector(p, "samples_needed", needed);
  write_strings(p, "reason", reason);
  write_vector(p, "coverage", column(ps, [](const auto& k) { return k.coverage; }));
  write_vector(p, "area", column(ps, [](const auto& k) { return k.area; }));
  write_vector(p, "first_vertex", first);
  write_vector(p, "vertex_count", count);
  write_vector(p, "vertices_east", ve);
  write_vector(p, "vertices_north", vn);
}

void write_grid(H5::Group& g, const std::string& name, const GroupFootprint& f) {
  H5::Group d = g.createGroup(name);
  write_attribute(d, "cell", f.grid.cell);
  write_vector(d, "east_index", f.grid.east_index);
  write_vector(d, "north_index", f.grid.north_index);
  write_vector(d, "count", f.grid.count);
  write_vector(d, "density", f.grid.density);
}

void write_sensitivity(H5::Group& g, const std::string& name, const GroupFootprint& f) {
  H5::Group s = g.createGroup(name);
  std::vector<std::string> names;
  for (const auto& k : f.sensitivity) names.push_back(k.input);
  write_strings(s, "input", names);
  write_vector(s, "downrange", column(f.sensitivity, [](const auto& k) { return k.downrange; }));
  write_vector(s, "crossrange", column(f.sensitivity, [](const auto& k) { return k.crossrange; }));
  write_vector(s, "distance", column(f.sensitivity, [](const auto& k) { return k.distance; }));
  write_vector(s, "energy", column(f.sensitivity, [](const auto& k) { return k.energy; }));
}

// One figure of a body's group, laid out by its shape (names from footprint/figures.hpp).
void write_figure(H5::Group& g, const FigureDescription& d, const GroupFootprint& f) {
  const std::string name(d.hdf5);
  switch (d.shape) {
    case FigureShape::count:
      return write_attribute(g, name, f.*d.count);
    case FigureShape::number:
      return write_attribute(g, name, f.*d.number);
    case FigureShape::point:
      return write_vector(g, name, std::vector<double>{(f.*d.point).east, (f.*d.point).north});
    case FigureShape::covariance:
      return write_covariance(g, name, f);
    case FigureShape::bounded:
      return write_bounded(g, d, f.*d.bounded);
    case FigureShape::quantiles:
      return write_quantiles(g, name, f.*d.quantiles);
    case FigureShape::ellipses:
      return write_ellipses(g, name, f.ellipses);
    case FigureShape::polygons:
      return write_polygons(g, name, f.polygons);
    case FigureShape::grid:
      return write_grid(g, name, f);
    case FigureShape::exceedance: {
      // Attributes of the group of the energy quantiles, which the table lists before it.
      H5::Group e = g.openGroup(name);
      return write_attributes(e, f.energy_exceedance, exceedance_fields());
    }
    case FigureShape::sensitivity:
      return write_sensitivity(g, name, f);
  }
}

void write_group(H5::Group& root, const GroupFootprint& f) {
  H5::Group g = root.createGroup(f.name);
  for (const FigureDescription& d : kGroupFigures) write_figure(g, d, f);
}

// The covariance's three distinct terms (east-east, east-north, north-north) from its 2 x 2.
std::array<double, 3> read_covariance(const H5::Group& g, const std::string& name) {
  H5::DataSet set = g.openDataSet(name);
  if (set.getSpace().getSimpleExtentNpoints() != 4)
    throw H5::DataSetIException("read_group", "covariance is not 2 x 2");
  double c[4];
  set.read(c, type_of<double>());
  return {c[0], c[1], c[3]};
}

std::vector<DispersionEllipse> read_ellipses(const H5::Group& g, const std::string& name) {
  H5::Group e = g.openGroup(name);
  const auto level = read_vector<double>(e, "level"), scale = read_vector<double>(e, "scale"),
             major = read_vector<double>(e, "semi_major"),
             minor = read_vector<double>(e, "semi_minor"),
             bearing = read_vector<double>(e, "bearing"),
             counted = read_vector<double>(e, "counted");
  std::vector<DispersionEllipse> out;
  for (std::size_t k = 0; k < level.size(); ++k)
    out.push_back({level[k], scale.at(k), major.at(k), minor.at(k), bearing.at(k), counted.at(k)});
  return out;
}

// The hazard polygons, each with its ring cut from the vertex columns (see write_polygons).
std::vector<HazardPolygon> read_polygons(const H5::Group& g, const std::string& name) {
  H5::Group p = g.openGroup(name);
  const auto level = read_vector<double>(p, "level");
  const auto rank = read_vector<std::uint64_t>(p, "rank");
  const auto determined = read_vector<std::uint8_t>(p, "determined");
  const auto needed = read_vector<std::uint64_t>(p, "samples_needed");
  const auto reason = read_strings(p, "reason");
  const auto coverage = read_vector<double>(p, "coverage"), area = read_vector<double>(p, "area");
  const auto first = read_vector<std::uint64_t>(p, "first_vertex");
  const auto count = read_vector<std::uint64_t>(p, "vertex_count");
  const auto ve = read_vector<double>(p, "vertices_east");
  const auto vn = read_vector<double>(p, "vertices_north");
  std::vector<HazardPolygon> out;
  for (std::size_t k = 0; k < level.size(); ++k) {
    HazardPolygon poly;
    poly.level = level[k];
    poly.rank = rank.at(k);
    poly.determined = determined.at(k) != 0;
    poly.samples_needed = needed.at(k);
    poly.reason = reason.at(k);
    poly.coverage = coverage.at(k);
    poly.area = area.at(k);
    for (std::uint64_t v = first.at(k); v < first[k] + count.at(k); ++v)
      poly.ring.push_back({ve.at(v), vn.at(v)});
    out.push_back(std::move(poly));
  }
  return out;
}

// The density grid; refuses columns of different lengths.
void read_grid(const H5::Group& g, const std::string& name, GroupFootprint& f) {
  H5::Group d = g.openGroup(name);
  f.grid.cell = read_attribute<double>(d, "cell");
  f.grid.east_index = read_vector<std::int64_t>(d, "east_index");
  f.grid.north_index = read_vector<std::int64_t>(d, "north_index");
  f.grid.count = read_vector<std::uint64_t>(d, "count");
  f.grid.density = read_vector<double>(d, "density");
  const std::size_t cells = f.grid.count.size();
  if (f.grid.east_index.size() != cells || f.grid.north_index.size() != cells ||
      f.grid.density.size() != cells)
    throw H5::DataSetIException("read_group", "grid columns differ in length");
}

void read_sensitivity(const H5::Group& g, const std::string& name, GroupFootprint& f) {
  H5::Group s = g.openGroup(name);
  const auto names = read_strings(s, "input");
  const auto d = read_vector<double>(s, "downrange"), c = read_vector<double>(s, "crossrange"),
             r = read_vector<double>(s, "distance"), e = read_vector<double>(s, "energy");
  for (std::size_t k = 0; k < names.size(); ++k)
    f.sensitivity.push_back({names[k], d.at(k), c.at(k), r.at(k), e.at(k)});
}

// One figure of a body's group, read back as write_figure laid it out.
void read_figure(const H5::Group& g, const FigureDescription& d, GroupFootprint& f,
                 double confidence) {
  const std::string name(d.hdf5);
  switch (d.shape) {
    case FigureShape::count:
      f.*d.count = read_attribute<std::uint64_t>(g, name);
      return;
    case FigureShape::number:
      f.*d.number = read_attribute<double>(g, name);
      return;
    case FigureShape::point: {
      const auto xy = read_vector<double>(g, name);
      f.*d.point = {xy.at(0), xy.at(1)};
      return;
    }
    case FigureShape::covariance:
      f.covariance = read_covariance(g, name);
      return;
    case FigureShape::bounded:
      f.*d.bounded = read_bounded(g, d, confidence);
      return;
    case FigureShape::quantiles:
      f.*d.quantiles = read_quantiles(g, name);
      return;
    case FigureShape::ellipses:
      f.ellipses = read_ellipses(g, name);
      return;
    case FigureShape::polygons:
      f.polygons = read_polygons(g, name);
      return;
    case FigureShape::grid:
      return read_grid(g, name, f);
    case FigureShape::exceedance:
      return read_attributes(g.openGroup(name), f.energy_exceedance, exceedance_fields());
    case FigureShape::sensitivity:
      return read_sensitivity(g, name, f);
  }
}

GroupFootprint read_group(const H5::Group& root, const std::string& name, double confidence) {
  H5::Group g = root.openGroup(name);
  GroupFootprint f;
  f.name = name;
  for (const FigureDescription& d : kGroupFigures) read_figure(g, d, f, confidence);
  return f;
}

}  // namespace

void write_footprint(H5::H5File& file, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  H5::Group root = file.createGroup("footprint");
  write_attributes(root, f, footprint_fields());
  write_attribute(root, "widest_relative_width", f.widest_relative_width());
  write_attributes(root, r, record_fields());
  // Absent values as NaN: the site's origin and the target width are optional.
  write_attribute(root, "site_latitude", or_nan(r.latitude));
  write_attribute(root, "site_longitude", or_nan(r.longitude));
  write_attribute(root, "target_width", or_nan(r.target_width));
  write_attribute(root, "release_east", r.release.east);
  write_attribute(root, "release_north", r.release.north);
  std::vector<std::string> names;
  for (const auto& g : f.groups) names.push_back(g.name);
  write_strings_attribute(root, "groups", names);
  for (const auto& g : f.groups) write_group(root, g);
  H5::Group rules = root.createGroup("rules");
  std::vector<std::string> rule, group, status;
  std::vector<std::uint64_t> count, rows, needed;
  for (const auto& k : f.rules) {
    rule.push_back(k.rule);
    group.push_back(k.group);
    status.push_back(to_string(k.status));
    count.push_back(k.count);
    rows.push_back(k.rows);
    needed.push_back(k.samples_needed);
  }
  write_strings(rules, "rule", rule);
  write_strings(rules, "group", group);
  write_strings(rules, "status", status);
  write_vector(rules, "threshold", column(f.rules, [](const auto& k) { return k.threshold; }));
  write_vector(rules, "accepted", column(f.rules, [](const auto& k) { return k.accepted; }));
  write_vector(rules, "count", count);
  write_vector(rules, "rows", rows);
  write_vector(rules, "value", column(f.rules, [](const auto& k) { return k.value; }));
  write_vector(rules, "lower", column(f.rules, [](const auto& k) { return k.lower; }));
  write_vector(rules, "upper", column(f.rules, [](const auto& k) { return k.upper; }));
  write_vector(rules, "samples_needed", needed);
  // Where samples left their models' ranges, per body (empty when none did).
  H5::Group warnings = root.createGroup("warnings");
  const auto& w = r.range_warnings;
  std::vector<std::string> wgroup, kind, text;
  std::vector<std::uint64_t> wcount, wrows;
  for (const auto& k : w) {
    wgroup.push_back(k.group);
    kind.push_back(k.kind);
    text.push_back(k.text);
    wcount.push_back(k.count);
    wrows.push_back(k.rows);
  }
  write_strings(warnings, "group", wgroup);
  write_strings(warnings, "kind", kind);
  write_vector(warnings, "count", wcount);
  write_vector(warnings, "rows", wrows);
  write_vector(warnings, "extreme", column(w, [](const auto& k) { return k.extreme; }));
  write_vector(warnings, "limit", column(w, [](const auto& k) { return k.limit; }));
  write_strings(warnings, "text", text);
  // The ground under the map, on terrain only.
  if (!r.relief.empty()) {
    H5::Group relief = root.createGroup("relief");
    write_attribute(relief, "source", r.relief.source);
    write_attribute(relief, "nodes", static_cast<std::uint64_t>(r.relief.nodes));
    write_attribute(relief, "half_width", r.relief.half_width);
    write_attribute(relief, "spacing", r.relief.spacing);
    write_vector(relief, "heights", r.relief.heights);
  }
}

namespace {

// The relief, checked to be a square grid of finite, positive spacing: a file that says otherwise
// is refused rather than drawn.
void read_relief(const H5::Group& root, const std::string& where, Relief& relief) {
  if (!root.nameExists("relief")) return;
  H5::Group g = root.openGroup("relief");
  relief.source = read_string_attribute(g, "source");
  const auto nodes = read_attribute<std::uint64_t>(g, "nodes");
  relief.half_width = read_attribute<double>(g, "half_width");
  relief.spacing = read_attribute<double>(g, "spacing");
  relief.heights = read_vector<float>(g, "heights");
  if (nodes < 2 || nodes > kReliefNodes || relief.heights.size() != nodes * nodes ||
      !(relief.spacing > 0.0) || !(relief.half_width > 0.0) ||
      std::abs(relief.spacing * static_cast<double>(nodes - 1) - 2.0 * relief.half_width) >
          1e-6 * relief.half_width)
    throw InputFileError(where + ": the relief of the footprint is not a square grid");
  relief.nodes = static_cast<std::size_t>(nodes);
}

}  // namespace

void read_footprint(const H5::Group& file, StudyRecord& r) {
  H5::Group root = file.openGroup("footprint");
  Footprint& f = r.footprint;
  read_attributes(root, f, footprint_fields());
  read_attributes(root, r, record_fields());
  r.latitude = from_nan(read_attribute<double>(root, "site_latitude"));
  r.longitude = from_nan(read_attribute<double>(root, "site_longitude"));
  r.target_width = from_nan(read_attribute<double>(root, "target_width"));
  r.release = {read_attribute<double>(root, "release_east"),
               read_attribute<double>(root, "release_north")};
  for (const auto& name : read_strings_attribute(root, "groups"))
    f.groups.push_back(read_group(root, name, f.confidence));
  H5::Group rules = root.openGroup("rules");
  const auto rule = read_strings(rules, "rule"), group = read_strings(rules, "group"),
             status = read_strings(rules, "status");
  const auto threshold = read_vector<double>(rules, "threshold"),
             accepted = read_vector<double>(rules, "accepted"),
             value = read_vector<double>(rules, "value"),
             lower = read_vector<double>(rules, "lower"),
             upper = read_vector<double>(rules, "upper");
  const auto count = read_vector<std::uint64_t>(rules, "count"),
             rows = read_vector<std::uint64_t>(rules, "rows"),
             needed = read_vector<std::uint64_t>(rules, "samples_needed");
  for (std::size_t k = 0; k < rule.size(); ++k) {
    RuleCheck c;
    c.rule = rule[k];
    c.group = group.at(k);
    c.status = status.at(k) == "within"    ? RuleStatus::within
               : status.at(k) == "exceeds" ? RuleStatus::exceeds
                                           : RuleStatus::undetermined;
    c.threshold = threshold.at(k);
    c.accepted = accepted.at(k);
    c.count = count.at(k);
    c.rows = rows.at(k);
    c.value = value.at(k);
    c.lower = lower.at(k);
    c.upper = upper.at(k);
    c.confidence = f.confidence;
    c.samples_needed = needed.at(k);
    f.rules.push_back(c);
  }
  H5::Group warnings = root.openGroup("warnings");
  const auto wgroup = read_strings(warnings, "group"), kind = read_strings(warnings, "kind"),
             text = read_strings(warnings, "text");
  const auto wcount = read_vector<std::uint64_t>(warnings, "count"),
             wrows = read_vector<std::uint64_t>(warnings, "rows");
  const auto extreme = read_vector<double>(warnings, "extreme"),
             limit = read_vector<double>(warnings, "limit");
  for (std::size_t k = 0; k < wgroup.size(); ++k)
    r.range_warnings.push_back(
        {wgroup[k], kind.at(k), wcount.at(k), wrows.at(k), extreme.at(k), limit.at(k), text.at(k)});
  read_relief(root, r.file.empty() ? std::string("results file") : r.file, r.relief);
}

}  // namespace strewn
