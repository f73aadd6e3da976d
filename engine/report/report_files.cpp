#include "report/report_files.hpp"

#include <fcntl.h>
#include <unistd.h>

#include <GeographicLib/LocalCartesian.hpp>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <numbers>
#include <stdexcept>
#include <string_view>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "footprint/figures.hpp"
#include "report/cautions.hpp"
#include "report/footprint_report.hpp"
#include "report/geojson_rings.hpp"
#include "report/json_text.hpp"
#include "store/output_file.hpp"
#include "store/results_file.hpp"

namespace strewn {

std::string escape_markup(const std::string& text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const auto [code, length] = decode_utf8(text, i);
    switch (code) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        // Bytes that are not UTF-8 (a damaged file) and U+FFFE, U+FFFF, which XML 1.0 (section
        // 2.2, Char) does not admit, are shown as U+FFFD. Control characters (of which XML admits
        // only tab, line feed and carriage return) and the marks that reorder text (a
        // right-to-left override would show "exe.fdp" as "pdf.exe") are shown as \uXXXX, inert,
        // as on a terminal.
        if (length == 0 || code == 0xFFFE || code == 0xFFFF)
          out += "\xEF\xBF\xBD";
        else if (code != '\r' && acts_on_text(code))
          out += printf_text("\\u%04X", static_cast<unsigned>(code));
        else
          out.append(text, i, length);
    }
    i += length == 0 ? 1 : length;
  }
  return out;
}

namespace {

// The blocks a streamed file is written in: large enough that the system calls cost nothing
// beside the text's making, small beside any memory limit.
constexpr std::size_t kWriteBlock = 1 << 16;

// A file's descriptor written in blocks; a failed write throws IoError naming `path`.
class BlockWriter {
 public:
  BlockWriter(int fd, const std::string& path) : fd_(fd), path_(path) {
    block_.reserve(kWriteBlock);
  }

  void append(std::string_view piece) {
    if (block_.size() + piece.size() > kWriteBlock) flush();
    if (piece.size() >= kWriteBlock)
      write_all(piece);
    else
      block_.append(piece);
  }

  void flush() {
    write_all(block_);
    block_.clear();
  }

 private:
  void write_all(std::string_view text) const {
    std::size_t written = 0;
    while (written < text.size()) {
      const ssize_t n = ::write(fd_, text.data() + written, text.size() - written);
      if (n < 0 && errno == EINTR) continue;
      if (n <= 0) throw IoError(path_ + ": writing failed (" + std::strerror(errno) + ")");
      written += static_cast<std::size_t>(n);
    }
  }

  int fd_;
  const std::string& path_;
  std::string block_;
};

}  // namespace

void stream_report_file(const std::string& path, const std::function<void(const TextSink&)>& write,
                        const std::vector<std::string>& reads, bool replace) {
  namespace fs = std::filesystem;
  OutputRules rules;
  rules.replace = replace;
  refuse_unsafe_output(path, "", reads, rules);
  const fs::path final_path(path);
  // A missing folder is made, as for a study's results file.
  if (const fs::path folder = final_path.parent_path(); !folder.empty()) {
    std::error_code ec;
    fs::create_directories(folder, ec);
  }
  const std::string temporary = temporary_path_of(path);
  const int fd = create_new_file(temporary);
  if (fd < 0) throw IoError(path + ": cannot write the file (" + std::strerror(errno) + ")");
  // A rank ended by a signal while it writes (a sweep's summary) leaves nothing behind.
  RemovedOnSignal removed_on_signal(temporary);
  try {
    BlockWriter file(fd, path);
    write([&file](std::string_view piece) { file.append(piece); });
    file.flush();
  } catch (...) {
    // unlink, not std::filesystem::remove: after std::bad_alloc nothing here may allocate.
    ::close(fd);
    ::unlink(temporary.c_str());
    throw;
  }
  if (::close(fd) != 0) {
    ::unlink(temporary.c_str());
    throw IoError(path + ": writing failed (cannot close the file)");
  }
  durable_rename(temporary, path, replace);
  removed_on_signal.release();
}

void write_report_file(const std::string& path, const std::string& text,
                       const std::vector<std::string>& reads, bool replace) {
  stream_report_file(
      path, [&text](const TextSink& out) { out(text); }, reads, replace);
}

namespace {

constexpr int kCircleVertices = 128;

// A closed counter-clockwise ring approximating a circle (east/north, m).
std::vector<PlanePoint> circle_ring(PlanePoint c, double r) {
  std::vector<PlanePoint> ring;
  for (int k = 0; k < kCircleVertices; ++k) {
    const double t = 2.0 * std::numbers::pi * k / kCircleVertices;
    ring.push_back({c.east + r * std::cos(t), c.north + r * std::sin(t)});
  }
  return ring;
}

// A counter-clockwise ring for an ellipse with its major axis along `bearing` (degrees from north).
std::vector<PlanePoint> ellipse_ring(PlanePoint c, double a, double b, double bearing) {
  const double beta = bearing * std::numbers::pi / 180.0;
  const double ue = std::sin(beta), un = std::cos(beta);  // major axis
  const double we = -un, wn = ue;                         // rotated a quarter turn anticlockwise
  std::vector<PlanePoint> ring;
  for (int k = 0; k < kCircleVertices; ++k) {
    const double t = 2.0 * std::numbers::pi * k / kCircleVertices;
    const double x = a * std::cos(t), y = b * std::sin(t);
    ring.push_back({c.east + x * ue + y * we, c.north + x * un + y * wn});
  }
  return ring;
}

struct GeoFrame {
  GeographicLib::LocalCartesian frame;
  LonLat lonlat(PlanePoint p) const {
    double lat = 0.0, lon = 0.0, h = 0.0;
    frame.Reverse(p.east, p.north, 0.0, lat, lon, h);
    return {lon, lat};
  }
  nlohmann::json point(PlanePoint p) const { return geojson_position(lonlat(p)); }
  // A ring cut at the antimeridian or drawn as a polar cap where it must be (RFC 7946 3.1.9).
  nlohmann::json geometry(const std::vector<PlanePoint>& ccw) const {
    std::vector<LonLat> ring;
    for (const auto& p : ccw) ring.push_back(lonlat(p));
    return ring_geometry(ring);
  }
};

nlohmann::json feature(nlohmann::json geometry, nlohmann::json properties) {
  return {{"type", "Feature"},
          {"geometry", std::move(geometry)},
          {"properties", std::move(properties)}};
}

// A closed polygon feature of a ring given counter-clockwise in east/north metres (a
// MultiPolygon when cut at the antimeridian).
nlohmann::json polygon_feature(const GeoFrame& geo, const std::vector<PlanePoint>& ccw,
                               nlohmann::json properties) {
  return feature(geo.geometry(ccw), std::move(properties));
}

// The features of a collection given to a sink one by one, each as the JSON library writes it
// on one line, separated as it separates an array's elements: the text is that of the whole
// document dumped at once.
class FeatureList {
 public:
  explicit FeatureList(const TextSink& out) : out_(out) {}

  void push_back(const nlohmann::json& feature) {
    separate();
    out_(json_text(feature, -1));
  }

  // A feature whose geometry's coordinates, an empty array in `feature`, are the positions
  // `each` gives to the function it is passed, written as they come.
  void push_back(const nlohmann::json& feature,
                 const std::function<void(const std::function<void(LonLat)>&)>& each) {
    separate();
    const std::string text = json_text(feature, -1);
    // Keys are written sorted, "geometry" first and in it "coordinates" first: the first such
    // text is the geometry's (a quote inside a string is written \").
    const std::size_t hole = text.find("\"coordinates\":[]");
    if (hole == std::string::npos) throw std::logic_error("a streamed feature without coordinates");
    const std::size_t after = hole + std::string_view("\"coordinates\":[").size();
    out_(std::string_view(text).substr(0, after));
    bool first = true;
    each([&](LonLat position) {
      if (!first) out_(",");
      first = false;
      out_(json_text(geojson_position(position), -1));
    });
    out_(std::string_view(text).substr(after));
  }

 private:
  void separate() {
    if (any_) out_(",");
    any_ = true;
  }

  const TextSink& out_;
  bool any_ = false;
};

// A group's hazard polygons and containment circles (estimate and upper bound).
void add_containment_features(FeatureList& features, const GeoFrame& geo, const GroupFootprint& g) {
  for (const auto& p : g.polygons)
    if (p.determined && p.ring.size() >= 3)
      features.push_back(polygon_feature(geo, p.ring,
                                         {{"group", g.name},
                                          {"kind", "hazard_polygon"},
                                          {"level", p.level},
                                          {"coverage", p.coverage},
                                          {"area_m2", p.area}}));
  for (const auto& c : g.containment) {
    if (std::isfinite(c.radius) && c.radius > 0.0)
      features.push_back(polygon_feature(geo, circle_ring(g.centre, c.radius),
                                         {{"group", g.name},
                                          {"kind", "containment_circle"},
                                          {"level", c.level},
                                          {"radius_m", c.radius}}));
    if (c.radius_upper && std::isfinite(*c.radius_upper) && *c.radius_upper > 0.0)
      features.push_back(polygon_feature(geo, circle_ring(g.centre, *c.radius_upper),
                                         {{"group", g.name},
                                          {"kind", "containment_upper_bound_circle"},
                                          {"level", c.level},
                                          {"radius_m", *c.radius_upper},
                                          {"confidence", c.confidence}}));
  }
}

// A group's features: containment, Gaussian ellipses, then its centre and mean impact points.
void add_group_features(FeatureList& features, const GeoFrame& geo, const StudyRecord& r,
                        const GroupFootprint& g) {
  add_containment_features(features, geo, g);
  for (const auto& e : g.ellipses)
    if (std::isfinite(e.semi_major) && e.semi_major > 0.0 && e.semi_minor > 0.0)
      features.push_back(
          polygon_feature(geo, ellipse_ring(g.mean, e.semi_major, e.semi_minor, e.bearing),
                          {{"group", g.name},
                           {"kind", "dispersion_ellipse"},
                           {"approximation", "gaussian"},
                           {"level", e.level},
                           {"semi_major_m", e.semi_major},
                           {"semi_minor_m", e.semi_minor},
                           {"bearing_deg", e.bearing},
                           {"counted", json_number(e.counted)}}));
  if (std::isfinite(g.centre.east))
    features.push_back(
        feature({{"type", "Point"}, {"coordinates", geo.point(g.centre)}},
                {{"group", g.name}, {"kind", "centre"}, {"rule", r.footprint.centre}}));
  if (std::isfinite(g.mean.east))
    features.push_back(feature({{"type", "Point"}, {"coordinates", geo.point(g.mean)}},
                               {{"group", g.name}, {"kind", "mean_impact"}}));
}

// The zone of each zone rule: the planned radius about its group's centre, with its status.
void add_rule_zone_features(FeatureList& features, const GeoFrame& geo, const Footprint& f) {
  for (const auto& k : f.rules) {
    if (k.rule != "zone_radius") continue;
    for (const auto& g : f.groups)
      if (g.name == k.group && std::isfinite(g.centre.east))
        features.push_back(polygon_feature(geo, circle_ring(g.centre, k.threshold),
                                           {{"group", g.name},
                                            {"kind", "rule_zone"},
                                            {"radius_m", k.threshold},
                                            {"accepted_outside", k.accepted},
                                            {"status", to_string(k.status)},
                                            {"estimate_outside", json_number(k.value)}}));
  }
}

// One MultiPoint feature per body of the landed flights' impacts, written point by point.
void add_impact_features(FeatureList& features, const GeoFrame& geo, const StudyRecord& r,
                         const StudyColumns& impacts) {
  for (std::size_t b = 0; b < r.body_names.size(); ++b)
    features.push_back(feature({{"type", "MultiPoint"}, {"coordinates", nlohmann::json::array()}},
                               {{"group", r.body_names[b]}, {"kind", "impacts"}}),
                       [&](const std::function<void(LonLat)>& position) {
                         for (std::size_t i = 0; i < impacts.rows(); ++i)
                           if (impacts.body[i] == b && impacts.status[i] == 0)
                             position(geo.lonlat({impacts.east[i], impacts.north[i]}));
                       });
}

// Appends the CSV rows of figures_csv, quoting the group and note and giving bounded figures
// their confidence.
class FigureRows {
 public:
  FigureRows(std::string& out, double confidence) : out_(out), confidence_(confidence) {}

  void add(const std::string& group, const std::string& figure, double level, double estimate,
           double lower, double upper, double bound, const std::string& unit,
           const std::string& note) const {
    const auto number = csv_number;
    // The confidence belongs to a figure that has bounds; a mean or a CEP has none.
    const bool bounded = !(std::isnan(lower) && std::isnan(upper) && std::isnan(bound));
    out_ += quoted(group) + "," + figure + "," + number(level) + "," + number(estimate) + "," +
            number(lower) + "," + number(upper) + "," + number(bound) + "," +
            (bounded ? number(confidence_) : std::string()) + "," + unit + "," + quoted(note) +
            "\n";
  }

 private:
  // Always quoted, and defused when a spreadsheet would read it as a formula (csv_text).
  static std::string quoted(const std::string& text) {
    const std::string cell = csv_text(text);
    return !cell.empty() && cell.front() == '"' ? cell : "\"" + cell + "\"";
  }

  std::string& out_;
  double confidence_;
};

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The CSV note of a one-row figure or of a level: the description's fixed note, and what its
// kind adds.
std::string csv_note(const FigureDescription& d, const Footprint& f, const Containment* level) {
  switch (d.note_kind) {
    case CsvNote::text:
      break;
    case CsvNote::centre_rule:
      return f.centre;
    case CsvNote::along_bearing:
      return "along " + csv_number(f.downrange_bearing) + " deg";
    case CsvNote::samples_needed:
      if (level && !level->radius_upper)
        return "bound needs " + std::to_string(level->samples_needed) + " samples";
      break;
  }
  return std::string(d.note);
}

// The rows of a figure of several columns: the ellipses' semi-axes, the polygons' areas, the
// exceedance and the sensitivities.
void compound_rows(const FigureRows& rows, const FigureDescription& d, const GroupFootprint& g) {
  const auto number = csv_number;
  const std::string csv(d.csv), unit(d.unit);
  if (d.shape == FigureShape::polygons)
    for (const auto& p : g.polygons)
      rows.add(g.name, csv, p.level, p.determined ? p.area : kNaN, kNaN, kNaN, kNaN, unit,
               p.determined ? "counted coverage " + number(p.coverage) : p.reason);
  if (d.shape == FigureShape::ellipses)
    for (const auto& e : g.ellipses) {
      rows.add(g.name, csv + "semi_major", e.level, e.semi_major, kNaN, kNaN, kNaN, unit,
               "Gaussian approximation; bearing " + number(e.bearing) + " deg");
      rows.add(g.name, csv + "semi_minor", e.level, e.semi_minor, kNaN, kNaN, kNaN, unit,
               "Gaussian approximation; counted " + number(e.counted));
    }
  if (d.shape == FigureShape::exceedance) {
    const auto& x = g.energy_exceedance;
    rows.add(g.name, csv, kNaN, x.share, x.lower, kNaN, x.upper, unit,
             "above " + number(x.threshold) + " J; Clopper-Pearson");
  }
  if (d.shape == FigureShape::sensitivity)
    for (const auto& s : g.sensitivity) {
      rows.add(g.name, csv + "downrange", kNaN, s.downrange, kNaN, kNaN, kNaN, unit, s.input);
      rows.add(g.name, csv + "crossrange", kNaN, s.crossrange, kNaN, kNaN, kNaN, unit, s.input);
      rows.add(g.name, csv + "distance", kNaN, s.distance, kNaN, kNaN, kNaN, unit, s.input);
      rows.add(g.name, csv + "energy", kNaN, s.energy, kNaN, kNaN, kNaN, unit, s.input);
    }
}

// The rows of one figure of a group, laid out by its shape; none for a figure without a CSV name.
void figure_rows(const FigureRows& rows, const FigureDescription& d, const Footprint& f,
                 const GroupFootprint& g) {
  if (d.csv.empty()) return;
  const std::string csv(d.csv), unit(d.unit);
  switch (d.shape) {
    case FigureShape::count:
      return rows.add(g.name, csv, d.level, static_cast<double>(g.*d.count), kNaN, kNaN, kNaN, unit,
                      csv_note(d, f, nullptr));
    case FigureShape::number:
      return rows.add(g.name, csv, d.level, g.*d.number, kNaN, kNaN, kNaN, unit,
                      csv_note(d, f, nullptr));
    case FigureShape::point:
      rows.add(g.name, csv + "_east", d.level, (g.*d.point).east, kNaN, kNaN, kNaN, unit,
               csv_note(d, f, nullptr));
      return rows.add(g.name, csv + "_north", d.level, (g.*d.point).north, kNaN, kNaN, kNaN, unit,
                      csv_note(d, f, nullptr));
    case FigureShape::bounded:
      for (const auto& c : g.*d.bounded)
        rows.add(g.name, csv, c.level, c.radius, c.interval_lower, c.interval_upper,
                 c.radius_upper ? *c.radius_upper : kNaN, unit, csv_note(d, f, &c));
      return;
    case FigureShape::quantiles:
      for (const auto& q : g.*d.quantiles)
        rows.add(g.name, csv, q.probability, q.value, q.lower, q.upper, kNaN, unit,
                 csv_note(d, f, nullptr));
      return;
    case FigureShape::covariance:
    case FigureShape::grid:
      return;  // no CSV form: a matrix and a map
    default:
      return compound_rows(rows, d, g);
  }
}

}  // namespace

void write_geojson(const StudyRecord& r, const StudyColumns* impacts, const TextSink& out) {
  if (!r.latitude || !r.longitude)
    throw UsageError(
        "GeoJSON needs the site's coordinates: the scenario gives no site.latitude and "
        "site.longitude (the local east/north figures are in the JSON, CSV and SVG outputs)");
  const GeoFrame geo{GeographicLib::LocalCartesian(*r.latitude, *r.longitude, r.ground)};
  // The collection with no features, cut where they go: its keys are written sorted, so its
  // first text "features":[] is its own.
  nlohmann::json collection{{"type", "FeatureCollection"}, {"features", nlohmann::json::array()}};
  collection["properties"] = {{"title", r.title},
                              {"samples", r.samples},
                              {"confidence", r.footprint.confidence},
                              {"cautions", cautions()}};
  const std::string shell = json_text(collection, -1);
  const std::size_t hole = shell.find("\"features\":[]");
  if (hole == std::string::npos) throw std::logic_error("a collection without its features");
  const std::size_t after = hole + std::string_view("\"features\":[").size();
  out(std::string_view(shell).substr(0, after));
  FeatureList features(out);
  for (const auto& g : r.footprint.groups) add_group_features(features, geo, r, g);
  add_rule_zone_features(features, geo, r.footprint);
  features.push_back(feature({{"type", "Point"}, {"coordinates", geo.point(r.release)}},
                             {{"kind", "release_point"},
                              {"altitude_m", r.release_altitude},
                              {"track_deg", r.release_track}}));
  if (impacts) add_impact_features(features, geo, r, *impacts);
  out(std::string_view(shell).substr(after));
  out("\n");
}

std::string geojson_text(const StudyRecord& r, const StudyColumns* impacts) {
  std::string text;
  write_geojson(r, impacts, [&text](std::string_view piece) { text.append(piece); });
  return text;
}

std::string figures_csv(const StudyRecord& r) {
  std::string out =
      "group,figure,level,estimate,interval_lower,interval_upper,bound_upper,confidence,unit,"
      "note\n";
  const auto number = csv_number;
  const FigureRows rows(out, r.footprint.confidence);
  for (const auto& g : r.footprint.groups)
    for (const FigureDescription& d : kGroupFigures) figure_rows(rows, d, r.footprint, g);
  // A rule's row holds the probability of its event (no level, no unit): the estimate, its lower
  // bound and its upper bound; the note says the threshold, the accepted probability and the
  // status.
  for (const auto& k : r.footprint.rules)
    rows.add(
        k.group, "rule_" + k.rule, kNaN, k.value, k.lower, kNaN, k.upper, "",
        std::string(to_string(k.status)) + " against the accepted probability " +
            number(k.accepted) + " of " +
            (k.rule == "zone_radius" ? "landing outside " + number(k.threshold) + " m"
                                     : "an impact energy above " + number(k.threshold) + " J") +
            " (reported, not decided)");
  for (const auto& w : r.range_warnings)
    rows.add(w.group, "model_range_" + w.kind, kNaN,
             w.rows ? static_cast<double>(w.count) / static_cast<double>(w.rows) : kNaN, kNaN, kNaN,
             kNaN, "", w.text);
  return out;
}

}  // namespace strewn
