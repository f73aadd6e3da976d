// The footprint map (SVG). Our own design: a square map panel in the site's east/north frame with
// north up, latitude and longitude (or metre) ticks on its frame, and a column beside it for the
// north arrow, the scale bar and the legend, so that nothing is drawn over the map but the map.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <numbers>
#include <sstream>

#include "core/text.hpp"
#include "report/footprint_report.hpp"
#include "report/graticule.hpp"
#include "report/relief.hpp"
#include "report/report_files.hpp"
#include "report/site_frame.hpp"

namespace strewn {

namespace {

constexpr double kPanel = 640.0;                 // map panel side, px
constexpr double kLeft = 92.0, kTop = 64.0;      // room for the latitude labels and the title
constexpr double kSide = kLeft + kPanel + 28.0;  // the column of the legend
constexpr double kWidth = 1000.0, kHeight = 790.0;

// Line colours per containment level (our palette: slate, sage, rust, plum, then repeats).
const char* level_colour(std::size_t k) {
  static const char* colours[] = {"#3d5a80", "#4f8a5b", "#c0622b", "#7a2e5c", "#2f6f73", "#8a6d1f"};
  return colours[k % 6];
}
constexpr const char* kInk = "#1f2933";
constexpr const char* kZone = "#111111";

// Density shading, on log10 scale: greys from near white to slate, so that no shade is mistaken
// for a level's line colour and every line (over its white halo) reads on every shade.
std::string density_colour(double t) {  // t in [0, 1], 1 the densest
  static const double stops[4][3] = {
      {236, 236, 230}, {196, 199, 197}, {140, 146, 150}, {74, 81, 90}};
  t = std::clamp(t, 0.0, 1.0) * 3.0;
  const int i = std::min(2, static_cast<int>(t));
  const double f = t - i;
  char text[8];
  std::snprintf(text, sizeof text, "#%02x%02x%02x",
                static_cast<int>(std::lround(stops[i][0] + f * (stops[i + 1][0] - stops[i][0]))),
                static_cast<int>(std::lround(stops[i][1] + f * (stops[i + 1][1] - stops[i][1]))),
                static_cast<int>(std::lround(stops[i][2] + f * (stops[i + 1][2] - stops[i][2]))));
  return text;
}

std::string fmt(double v) {
  return printf_text("%.1f", v);
}

std::string length_label(double metres) {
  return metres >= 1000.0 ? printf_text("%g km", metres / 1000.0) : printf_text("%g m", metres);
}

// A round length (1, 2 or 5 times a power of ten) at most `about`.
double round_length(double about) {
  const double power = std::pow(10.0, std::floor(std::log10(about)));
  for (double m : {5.0, 2.0, 1.0})
    if (m * power <= about) return m * power;
  return power;
}

struct View {
  double centre_e, centre_n, half;  // m
  [[nodiscard]] double scale() const { return kPanel / (2.0 * half); }
  [[nodiscard]] double x(double e) const { return kLeft + (e - (centre_e - half)) * scale(); }
  [[nodiscard]] double y(double n) const { return kTop + ((centre_n + half) - n) * scale(); }
  [[nodiscard]] double west() const { return centre_e - half; }
  [[nodiscard]] double east() const { return centre_e + half; }
  [[nodiscard]] double south() const { return centre_n - half; }
  [[nodiscard]] double north() const { return centre_n + half; }
};

std::string path_of(const View& v, const std::vector<PlanePoint>& ring) {
  std::string d;
  for (std::size_t k = 0; k < ring.size(); ++k) {
    d += k ? 'L' : 'M';
    d += fmt(v.x(ring[k].east));
    d += ' ';
    d += fmt(v.y(ring[k].north));
    d += ' ';
  }
  d += 'Z';
  return d;
}

// Text with a white halo (drawn under its letters), readable on any shading.
void label(std::ostream& s, double x, double y, const std::string& text, const char* colour,
           const char* anchor = "start", double size = 12.0, bool bold = false) {
  s << "<text x=\"" << fmt(x) << "\" y=\"" << fmt(y) << "\" font-size=\"" << size
    << (bold ? "\" font-weight=\"bold" : "") << "\" text-anchor=\"" << anchor << "\" fill=\""
    << colour
    << "\" stroke=\"#ffffff\" stroke-width=\"3.5\" stroke-linejoin=\"round\" "
       "paint-order=\"stroke\">"
    << escape_markup(text) << "</text>\n";
}

// A line drawn twice: a white halo under it, then the line, so that it reads on dark shading.
std::string haloed(const std::string& shape, const std::string& attributes, const char* colour,
                   double width, const char* dash = "") {
  std::string dashing = dash[0] ? std::string(" stroke-dasharray=\"") + dash + "\"" : "";
  return "<" + shape + " " + attributes +
         " fill=\"none\" stroke=\"#ffffff\" stroke-opacity=\"0.85\"" + " stroke-width=\"" +
         fmt(width + 2.6) + "\"" + dashing + "/>\n<" + shape + " " + attributes +
         " fill=\"none\" stroke=\"" + colour + "\" stroke-width=\"" + fmt(width) + "\"" + dashing +
         "/>\n";
}

// The rules that hold a zone about this group's centre: the group's own, or with one body, those
// of "all" (the same rows).
std::vector<const RuleCheck*> zone_rules(const Footprint& f, const GroupFootprint& g) {
  std::vector<const RuleCheck*> out;
  const bool single = f.groups.size() == 2;
  for (const auto& k : f.rules)
    if (k.rule == "zone_radius" && (k.group == g.name || (single && k.group == "all")))
      out.push_back(&k);
  return out;
}

class MapWriter {
 public:
  MapWriter(const StudyRecord& r, const GroupFootprint& g)
      : r_(r), f_(r.footprint), g_(g), site_(r) {
    view_ = fit();
    graticule_ = graticule(
        site_, MapPanel{view_.west(), view_.east(), view_.south(), view_.north(), view_.scale()});
  }

  std::string write() {
    header();
    if (std::isfinite(g_.centre.east) || std::isfinite(r_.release.east)) {
      panel();
      legend();
    }
    s_ << "<text x=\"" << kLeft << "\" y=\"" << kHeight - 14
       << "\" font-size=\"11\" fill=\"#52606d\">Engineering estimate from the inputs given. "
          "Exclusion zones are set by the responsible authority under local rules.</text>\n";
    s_ << "</svg>\n";
    return s_.str();
  }

 private:
  // The view: centred on the centre, wide enough for every determined figure, every rule's zone,
  // every impact cell (none is cut at the frame) and the release point.
  View fit() const {
    PlanePoint c = g_.centre;
    if (!std::isfinite(c.east)) c = r_.release;
    double half = 10.0;
    auto reach = [&](double e, double n, double extra = 0.0) {
      if (std::isfinite(e) && std::isfinite(n) && std::isfinite(extra))
        half = std::max(half, std::max(std::abs(e - c.east), std::abs(n - c.north)) + extra);
    };
    for (const auto& k : g_.containment) {
      reach(g_.centre.east, g_.centre.north, k.radius);
      if (k.radius_upper) reach(g_.centre.east, g_.centre.north, *k.radius_upper);
    }
    for (const auto& p : g_.polygons)
      for (const auto& q : p.ring) reach(q.east, q.north);
    for (const RuleCheck* k : zone_rules(f_, g_))
      reach(g_.centre.east, g_.centre.north, k->threshold);
    const ImpactGrid& grid = g_.grid;
    for (std::size_t k = 0; k < grid.count.size(); ++k) {
      reach(static_cast<double>(grid.east_index[k]) * grid.cell,
            static_cast<double>(grid.north_index[k]) * grid.cell);
      reach(static_cast<double>(grid.east_index[k] + 1) * grid.cell,
            static_cast<double>(grid.north_index[k] + 1) * grid.cell);
    }
    reach(r_.release.east, r_.release.north);
    return View{c.east, c.north, half * 1.06};
  }

  void header() {
    s_ << "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    s_ << "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"map\" id=\""
       << (g_.name == "all" ? std::string("map") : "map-" + clip_id()) << "\" data-group=\""
       << escape_markup(g_.name) << "\" viewBox=\"0 0 " << kWidth << " " << kHeight << "\" width=\""
       << kWidth << "\" height=\"" << kHeight
       << "\" font-family=\"Helvetica, Arial, sans-serif\" role=\"img\" aria-label=\"footprint map "
          "of "
       << escape_markup(group_title()) << "\">\n";
    s_ << "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n";
    s_ << "<text x=\"" << kLeft << "\" y=\"26\" font-size=\"18\" font-weight=\"bold\" fill=\""
       << kInk << "\">"
       << escape_markup((r_.title.empty() ? std::string("strewn footprint") : r_.title) +
                        (r_.case_label.empty() ? "" : ", " + r_.case_label))
       << "</text>\n";
    s_ << "<text x=\"" << kLeft << "\" y=\"46\" font-size=\"13\" fill=\"#52606d\">"
       << escape_markup(group_title() + "; " + std::to_string(r_.samples) + " samples, " +
                        std::to_string(g_.failed) + " failed flights; bounds at " +
                        printf_text("%g", 100.0 * f_.confidence) + "% confidence; north up")
       << "</text>\n";
  }

  [[nodiscard]] std::string group_title() const {
    if (g_.name != "all") return "body " + g_.name;
    if (f_.groups.size() == 2) return "body " + f_.groups[0].name;
    return printf_text("all bodies, one release (%g objects)", g_.objects_per_release);
  }

  void panel() {
    s_ << "<defs><clipPath id=\"panel-" << clip_id() << "\"><rect x=\"" << kLeft << "\" y=\""
       << kTop << "\" width=\"" << kPanel << "\" height=\"" << kPanel << "\"/></clipPath>\n"
       << "<marker id=\"arrow-" << clip_id()
       << "\" viewBox=\"0 0 10 10\" refX=\"9\" refY=\"5\" markerWidth=\"7\" "
          "markerHeight=\"7\" orient=\"auto-start-reverse\"><path d=\"M0 0 L10 5 L0 10 z\" "
          "fill=\""
       << kInk << "\"/></marker></defs>\n";
    s_ << "<rect x=\"" << kLeft << "\" y=\"" << kTop << "\" width=\"" << kPanel << "\" height=\""
       << kPanel << "\" fill=\"#f7f7f2\"/>\n";
    s_ << "<g clip-path=\"url(#panel-" << clip_id() << ")\">\n";
    // The ground under everything else, on terrain; its heights over the impact density.
    const ReliefDrawing relief = relief_svg(
        r_.relief, {view_.centre_e, view_.centre_n, view_.half, kLeft, kTop, view_.scale()});
    relief_interval_ = relief.interval;
    s_ << relief.ground;
    density();
    s_ << relief.labels;
    grid_lines();
    figures();
    zones();
    markers();
    s_ << "</g>\n";
    s_ << "<rect x=\"" << kLeft << "\" y=\"" << kTop << "\" width=\"" << kPanel << "\" height=\""
       << kPanel << "\" fill=\"none\" stroke=\"#9aa5b1\"/>\n";
    ticks();
  }

  // An id for this map's clip path and marker, distinct per group on one page.
  [[nodiscard]] std::string clip_id() const {
    std::string id;
    for (unsigned char ch : g_.name) id += printf_text("%02x", ch);
    return id;
  }

  // Density shading of the group, aggregated to display cells of at most 1/160 of the view.
  void density() {
    const ImpactGrid& g = g_.grid;
    const double cell = std::max(g.cell, 2.0 * view_.half / 160.0);
    std::map<std::pair<std::int64_t, std::int64_t>, double> shown;  // objects per release
    for (std::size_t k = 0; k < g.count.size(); ++k) {
      const double e = (static_cast<double>(g.east_index[k]) + 0.5) * g.cell;
      const double n = (static_cast<double>(g.north_index[k]) + 0.5) * g.cell;
      shown[{static_cast<std::int64_t>(std::floor(e / cell)),
             static_cast<std::int64_t>(std::floor(n / cell))}] += g.density[k] * g.cell * g.cell;
    }
    for (const auto& [key, objects] : shown) peak_ = std::max(peak_, objects / (cell * cell));
    low_ = peak_ * 1e-4;
    s_ << "<g class=\"density\" shape-rendering=\"crispEdges\">\n";
    for (const auto& [key, objects] : shown) {
      const double density = objects / (cell * cell);
      const double t = std::log10(std::max(density, low_) / low_) / 4.0;
      const double e0 = static_cast<double>(key.first) * cell;
      const double n1 = static_cast<double>(key.second + 1) * cell;
      s_ << "<rect x=\"" << fmt(view_.x(e0)) << "\" y=\"" << fmt(view_.y(n1)) << "\" width=\""
         << fmt(cell * view_.scale() + 0.3) << "\" height=\"" << fmt(cell * view_.scale() + 0.3)
         << "\" fill=\"" << density_colour(t) << "\"/>\n";
    }
    s_ << "</g>\n";
  }

  // Containment circles labelled with their level (the upper bound dashed over a white halo,
  // the estimate thin beneath it) and hazard polygons (solid). The Gaussian ellipses are left to
  // the tables and the GeoJSON: sixteen curves over four levels would hide the footprint.
  void figures() {
    const GroupFootprint& g = g_;
    const double cx = view_.x(g.centre.east), cy = view_.y(g.centre.north);
    for (std::size_t k = 0; k < g.containment.size(); ++k) {
      const auto& ct = g.containment[k];
      const bool bounded = ct.radius_upper && std::isfinite(*ct.radius_upper);
      if (std::isfinite(ct.radius) && std::isfinite(cx))
        s_ << "<circle class=\"containment\" cx=\"" << fmt(cx) << "\" cy=\"" << fmt(cy) << "\" r=\""
           << fmt(ct.radius * view_.scale()) << "\" fill=\"none\" stroke=\"" << level_colour(k)
           << "\" stroke-width=\"" << (bounded ? "0.8" : "1.4") << "\" stroke-opacity=\""
           << (bounded ? "0.55" : "1") << "\"/>\n";
      if (bounded && std::isfinite(cx))
        s_ << haloed("circle",
                     "class=\"containment-bound\" cx=\"" + fmt(cx) + "\" cy=\"" + fmt(cy) +
                         "\" r=\"" + fmt(*ct.radius_upper * view_.scale()) + "\"",
                     level_colour(k), 1.6, "8 4");
      // The level beside its outer circle (the bound, or the estimate while the bound needs more
      // samples), on a ray that differs per level so that the labels do not stack.
      const double outer = bounded ? *ct.radius_upper : ct.radius;
      if (std::isfinite(outer) && std::isfinite(cx)) {
        const double radius = outer * view_.scale();
        const double angle = (30.0 + 14.0 * static_cast<double>(k)) * std::numbers::pi / 180.0;
        label(s_, cx + radius * std::cos(angle) + 4.0, cy - radius * std::sin(angle) - 3.0,
              printf_text("%g %%", 100.0 * ct.level), level_colour(k), "start", 13.0, true);
      }
    }
    for (std::size_t k = 0; k < g.polygons.size(); ++k) {
      const auto& p = g.polygons[k];
      if (!p.determined || p.ring.size() < 3) continue;
      s_ << "<path class=\"hazard-polygon\" d=\"" << path_of(view_, p.ring) << "\" fill=\""
         << level_colour(k)
         << "\" fill-opacity=\"0.06\" stroke=\"#ffffff\" stroke-opacity=\"0.85\" "
         << "stroke-width=\"4.6\" stroke-linejoin=\"round\"/>\n"
         << "<path class=\"hazard-polygon\" d=\"" << path_of(view_, p.ring)
         << "\" fill=\"none\" stroke=\"" << level_colour(k)
         << "\" stroke-width=\"2.2\" stroke-linejoin=\"round\"/>\n";
    }
  }

  // Each rule's zone: the planned radius about its centre, labelled with the radius and where
  // the figures stand against it.
  void zones() {
    const double cx = view_.x(g_.centre.east), cy = view_.y(g_.centre.north);
    if (!std::isfinite(cx)) return;
    for (const RuleCheck* k : zone_rules(f_, g_)) {
      const double radius = k->threshold * view_.scale();
      s_ << haloed("circle",
                   "class=\"rule-zone\" cx=\"" + fmt(cx) + "\" cy=\"" + fmt(cy) + "\" r=\"" +
                       fmt(radius) + "\"",
                   kZone, 2.4, "14 4 2 4");
      // Inside the circle, under its top: above it, the label could leave the panel.
      label(s_, cx, radius > 40.0 ? cy - radius + 18.0 : cy - radius - 6.0,
            "zone " + length_label(k->threshold) + ": " + to_string(k->status) +
                printf_text(" (accepted outside %g)", k->accepted),
            kZone, "middle", 13.0, true);
    }
  }

  // Centre and mean impact; release point and track drawn last, on top, and half transparent,
  // so that a release point on the centre hides neither.
  void markers() {
    const double cx = view_.x(g_.centre.east), cy = view_.y(g_.centre.north);
    if (std::isfinite(cx) && std::isfinite(cy))
      s_ << "<path class=\"centre\" d=\"M" << fmt(cx - 7) << " " << fmt(cy) << " H" << fmt(cx + 7)
         << " M" << fmt(cx) << " " << fmt(cy - 7) << " V" << fmt(cy + 7)
         << "\" stroke=\"#ffffff\" stroke-width=\"4.5\"/><path class=\"centre\" d=\"M"
         << fmt(cx - 7) << " " << fmt(cy) << " H" << fmt(cx + 7) << " M" << fmt(cx) << " "
         << fmt(cy - 7) << " V" << fmt(cy + 7) << "\" stroke=\"" << kInk
         << "\" stroke-width=\"2\"/>\n";
    const double mx = view_.x(g_.mean.east), my = view_.y(g_.mean.north);
    if (std::isfinite(mx) && std::isfinite(my))
      s_ << "<circle class=\"mean-impact\" cx=\"" << fmt(mx) << "\" cy=\"" << fmt(my)
         << "\" r=\"3\" fill=\"" << kInk << "\" stroke=\"#ffffff\" stroke-width=\"1\"/>\n";
    const double x = view_.x(r_.release.east), y = view_.y(r_.release.north);
    const double t = r_.release_track * std::numbers::pi / 180.0;
    const double length = 0.14 * kPanel;
    s_ << "<line class=\"release-track\" x1=\"" << fmt(x) << "\" y1=\"" << fmt(y) << "\" x2=\""
       << fmt(x + length * std::sin(t)) << "\" y2=\"" << fmt(y - length * std::cos(t))
       << "\" stroke=\"" << kInk << "\" stroke-width=\"1.6\" marker-end=\"url(#arrow-" << clip_id()
       << ")\"/>\n";
    s_ << "<path class=\"release-point\" d=\"M" << fmt(x) << " " << fmt(y - 10) << " L"
       << fmt(x + 9) << " " << fmt(y + 6) << " L" << fmt(x - 9) << " " << fmt(y + 6)
       << " Z\" fill=\"#ffffff\" fill-opacity=\"0.55\" stroke=\"" << kInk
       << "\" stroke-width=\"1.8\"/>\n";
  }

  // Without site coordinates, the grid of round eastings and northings: their positions (m,
  // along the panel's east or north axis) and labels.
  struct Tick {
    double at;  // m
    std::string text;
  };
  [[nodiscard]] std::vector<Tick> metre_ticks(bool east_axis) const {
    std::vector<Tick> out;
    const double from = east_axis ? view_.west() : view_.south();
    const double to = east_axis ? view_.east() : view_.north();
    const double step = round_length((to - from) / 4.0);
    for (double v = std::ceil(from / step) * step; v <= to; v += step) {
      const char* side = east_axis ? (v < 0 ? "W" : "E") : (v < 0 ? "S" : "N");
      out.push_back({v, v == 0.0 ? "0" : length_label(std::abs(v)) + " " + side});
    }
    return out;
  }

  // The graticule under the figures: with site coordinates the true meridians and parallels
  // (graticule.hpp), which converge toward a pole; without, straight lines of the metre grid.
  void grid_lines() {
    s_ << "<g class=\"graticule\" fill=\"none\" stroke=\"#52606d\" stroke-opacity=\"0.18\" "
          "stroke-width=\"1\">\n";
    if (site_.geographic()) {
      for (const GraticuleLine& line : graticule_.lines) {
        // A point on the far side of the Earth (not finite) breaks the line.
        std::string d;
        bool joined = false;
        for (const PlanePoint& p : line.points) {
          const bool shown = std::isfinite(p.east) && std::isfinite(p.north);
          if (shown)
            d += (joined      ? " L"
                  : d.empty() ? "M"
                              : " M") +
                 fmt(view_.x(p.east)) + " " + fmt(view_.y(p.north));
          joined = shown;
        }
        if (!d.empty()) s_ << "<path d=\"" << d << "\"/>\n";
      }
    } else {
      for (const Tick& t : metre_ticks(true))
        s_ << "<line x1=\"" << fmt(view_.x(t.at)) << "\" y1=\"" << kTop << "\" x2=\""
           << fmt(view_.x(t.at)) << "\" y2=\"" << kTop + kPanel << "\"/>\n";
      for (const Tick& t : metre_ticks(false))
        s_ << "<line x1=\"" << kLeft << "\" y1=\"" << fmt(view_.y(t.at)) << "\" x2=\""
           << kLeft + kPanel << "\" y2=\"" << fmt(view_.y(t.at)) << "\"/>\n";
    }
    s_ << "</g>\n";
  }

  void ticks() {
    s_ << "<g class=\"ticks\" font-size=\"11\" fill=\"#52606d\">\n";
    if (site_.geographic())
      degree_ticks();
    else
      metre_tick_marks();
    s_ << "</g>\n";
  }

  void metre_tick_marks() {
    for (const Tick& t : metre_ticks(true)) {
      const double x = view_.x(t.at);
      s_ << "<line x1=\"" << fmt(x) << "\" y1=\"" << kTop + kPanel << "\" x2=\"" << fmt(x)
         << "\" y2=\"" << kTop + kPanel + 6 << "\" stroke=\"#52606d\"/><line x1=\"" << fmt(x)
         << "\" y1=\"" << kTop << "\" x2=\"" << fmt(x) << "\" y2=\"" << kTop - 6
         << "\" stroke=\"#52606d\"/><text x=\"" << fmt(x) << "\" y=\"" << kTop + kPanel + 19
         << "\" text-anchor=\"middle\">" << escape_markup(t.text) << "</text>\n";
    }
    for (const Tick& t : metre_ticks(false)) {
      const double y = view_.y(t.at);
      s_ << "<line x1=\"" << kLeft - 6 << "\" y1=\"" << fmt(y) << "\" x2=\"" << kLeft << "\" y2=\""
         << fmt(y) << "\" stroke=\"#52606d\"/><line x1=\"" << kLeft + kPanel << "\" y1=\"" << fmt(y)
         << "\" x2=\"" << kLeft + kPanel + 6 << "\" y2=\"" << fmt(y)
         << "\" stroke=\"#52606d\"/><text x=\"" << kLeft - 9 << "\" y=\"" << fmt(y + 4)
         << "\" text-anchor=\"end\">" << escape_markup(t.text) << "</text>\n";
    }
  }

  // A tick label's place: its anchor point and the box its letters take (px), from the point of
  // the panel's edge (or of its line) that it marks.
  struct Placed {
    double x, y;
    const char* anchor;
    double left, right, top, bottom;
  };
  static Placed placed(const GraticuleLabel& l, double px, double py) {
    double x = px, y = py - 4.0;
    const char* anchor = "middle";
    if (l.meridian && l.edge == PanelEdge::bottom) {
      y = kTop + kPanel + 19;  // below the panel
    } else if (!l.meridian && l.edge == PanelEdge::left) {
      x = kLeft - 9, y = py + 4, anchor = "end";  // left of the panel
    } else if (l.edge == PanelEdge::left) {
      x = kLeft + 5, y = py + 4, anchor = "start";  // inside, along the edge it meets
    } else if (l.edge == PanelEdge::right) {
      x = kLeft + kPanel - 5, y = py + 4, anchor = "end";
    } else if (l.edge == PanelEdge::top) {
      y = kTop + 15;
    } else if (l.edge == PanelEdge::bottom) {
      y = kTop + kPanel - 6;
    }
    // About 6.5 px a character at 11 px; "°" is two bytes of UTF-8 and one character.
    const double width = 6.5 * static_cast<double>(l.text.size() - 1);
    const double left = anchor[0] == 's' ? x : anchor[0] == 'e' ? x - width : x - width / 2;
    return {x, y, anchor, left, left + width, y - 9, y + 3};
  }
  [[nodiscard]] static bool outside(const GraticuleLabel& l) {
    return (l.meridian && l.edge == PanelEdge::bottom) ||
           (!l.meridian && l.edge == PanelEdge::left);
  }

  // Ticks at every point where a meridian or parallel meets the panel's edges; their labels,
  // those outside the panel first, each left out when it would run into one already placed.
  // Every label says in data-point which point (px) it marks.
  void degree_ticks() {
    for (const GraticuleTick& t : graticule_.ticks) {
      const double x = view_.x(t.at.east), y = view_.y(t.at.north);
      const double dx = t.edge == PanelEdge::left ? -6 : t.edge == PanelEdge::right ? 6 : 0;
      const double dy = t.edge == PanelEdge::bottom ? 6 : t.edge == PanelEdge::top ? -6 : 0;
      s_ << "<line x1=\"" << fmt(x) << "\" y1=\"" << fmt(y) << "\" x2=\"" << fmt(x + dx)
         << "\" y2=\"" << fmt(y + dy) << "\" stroke=\"#52606d\"/>\n";
    }
    std::vector<Placed> taken;
    for (const bool inside : {false, true})
      for (const GraticuleLabel& l : graticule_.labels) {
        if (outside(l) == inside) continue;
        const double px = view_.x(l.at.east), py = view_.y(l.at.north);
        const Placed p = placed(l, px, py);
        // Inside, where meridians fan out from a pole, a label needs more room above and below
        // to be read as its own line's.
        const double gap = inside ? 8.0 : 2.0;
        const bool overlaps = std::any_of(taken.begin(), taken.end(), [&](const Placed& q) {
          return p.left < q.right + 4 && q.left < p.right + 4 && p.top < q.bottom + gap &&
                 q.top < p.bottom + gap;
        });
        if (overlaps) continue;
        taken.push_back(p);
        // Inside the panel with a white halo under the letters, as the figures' labels.
        s_ << "<text x=\"" << fmt(p.x) << "\" y=\"" << fmt(p.y) << "\" data-point=\"" << fmt(px)
           << " " << fmt(py) << "\""
           << (inside ? " stroke=\"#ffffff\" stroke-width=\"3.5\" stroke-linejoin=\"round\" "
                        "paint-order=\"stroke\""
                      : "")
           << " text-anchor=\"" << p.anchor << "\">" << escape_markup(l.text) << "</text>\n";
      }
  }

  // North arrow, scale bar and legend, beside the panel.
  void legend() {
    const double x = kSide;
    double y = kTop + 6;
    s_ << "<g class=\"north-arrow\"><path d=\"M" << x + 10 << " " << y << " L" << x + 18 << " "
       << y + 26 << " L" << x + 10 << " " << y + 20 << " L" << x + 2 << " " << y + 26
       << " Z\" fill=\"" << kInk << "\"/><text x=\"" << x + 26 << "\" y=\"" << y + 20
       << "\" font-size=\"13\" fill=\"" << kInk << "\">N (true north up)</text></g>\n";
    y += 48;
    const double metres = round_length(0.22 * 2.0 * view_.half);
    const double px = metres * view_.scale();
    s_ << "<g class=\"scale-bar\"><path d=\"M" << x << " " << y - 6 << " V" << y << " H"
       << fmt(x + px) << " V" << y - 6 << "\" fill=\"none\" stroke=\"" << kInk
       << "\" stroke-width=\"2\"/><text x=\"" << fmt(x + px / 2) << "\" y=\"" << y - 9
       << "\" font-size=\"12\" text-anchor=\"middle\" fill=\"" << kInk << "\">"
       << length_label(metres) << "</text></g>\n";
    y += 34;
    s_ << "<g class=\"legend\" font-size=\"12\" fill=\"" << kInk << "\">\n";
    s_ << "<text x=\"" << x << "\" y=\"" << y << "\" font-weight=\"bold\">"
       << escape_markup(g_.name == "all" && f_.groups.size() > 2 ? "All bodies" : group_title())
       << "</text>\n";
    y += 20;
    for (std::size_t k = 0; k < g_.containment.size(); ++k) {
      s_ << "<rect x=\"" << x << "\" y=\"" << y - 10 << "\" width=\"22\" height=\"12\" fill=\""
         << level_colour(k) << "\"/><text x=\"" << x + 30 << "\" y=\"" << y << "\">level "
         << printf_text("%g %%", 100.0 * g_.containment[k].level) << "</text>\n";
      y += 18;
    }
    y += 6;
    auto line_entry = [&](const char* dash, double width, const char* colour,
                          const std::string& text) {
      s_ << "<line x1=\"" << x << "\" y1=\"" << y - 4 << "\" x2=\"" << x + 22 << "\" y2=\"" << y - 4
         << "\" stroke=\"" << colour << "\" stroke-width=\"" << width << "\""
         << (dash[0] ? std::string(" stroke-dasharray=\"") + dash + "\"" : std::string())
         << "/><text x=\"" << x + 30 << "\" y=\"" << y << "\">" << escape_markup(text)
         << "</text>\n";
      y += 18;
    };
    line_entry("", 2.2, kInk, "hazard polygon (counted)");
    line_entry("", 1.0, kInk, "containment radius");
    line_entry("8 4", 1.6, kInk, "its upper confidence bound");
    if (!zone_rules(f_, g_).empty()) line_entry("14 4 2 4", 2.4, kZone, "zone of a rule ([rules])");
    s_ << "<path d=\"M" << x + 11 << " " << y - 12 << " L" << x + 18 << " " << y + 1 << " L"
       << x + 4 << " " << y + 1 << " Z\" fill=\"#ffffff\" stroke=\"" << kInk << "\"/><text x=\""
       << x + 30 << "\" y=\"" << y << "\">release point, track</text>\n";
    y += 18;
    s_ << "<path d=\"M" << x + 4 << " " << y - 4 << " H" << x + 18 << " M" << x + 11 << " "
       << y - 11 << " V" << y + 3 << "\" stroke=\"" << kInk << "\" stroke-width=\"2\"/><text x=\""
       << x + 30 << "\" y=\"" << y << "\">centre (" << escape_markup(f_.centre) << ")</text>\n";
    y += 18;
    s_ << "<circle cx=\"" << x + 11 << "\" cy=\"" << y - 4 << "\" r=\"3\" fill=\"" << kInk
       << "\"/><text x=\"" << x + 30 << "\" y=\"" << y << "\">mean impact</text>\n";
    y += 30;
    s_ << "<text x=\"" << x << "\" y=\"" << y << "\" font-weight=\"bold\">Impact density</text>\n";
    y += 8;
    for (int k = 0; k < 40; ++k)
      s_ << "<rect x=\"" << x + k * 4.5 << "\" y=\"" << y
         << "\" width=\"4.6\" height=\"14\" fill=\"" << density_colour(k / 39.0) << "\"/>\n";
    s_ << "<text x=\"" << x << "\" y=\"" << y + 28 << "\" font-size=\"11\">"
       << printf_text("%.1e", low_) << "</text><text x=\"" << x + 180 << "\" y=\"" << y + 28
       << "\" font-size=\"11\" text-anchor=\"end\">" << printf_text("%.1e", peak_) << "</text>\n";
    s_ << "<text x=\"" << x << "\" y=\"" << y + 44
       << "\" font-size=\"11\">objects per m\u00b2 per release (log scale)</text>\n";
    if (relief_interval_ > 0.0) relief_legend(x, y + 70);
    s_ << "</g>\n";
  }

  // The legend's entry for the ground, on terrain: the contour interval and the raster's name.
  void relief_legend(double x, double y) {
    s_ << "<text x=\"" << x << "\" y=\"" << y << "\" font-weight=\"bold\">Ground</text>\n";
    y += 18;
    s_ << "<line x1=\"" << x << "\" y1=\"" << y - 4 << "\" x2=\"" << x + 22 << "\" y2=\"" << y - 4
       << "\" stroke=\"#8a6a3f\" stroke-width=\"1.1\"/><text x=\"" << x + 30 << "\" y=\"" << y
       << "\">" << printf_text("contours every %g m", relief_interval_) << "</text>\n";
    y += 18;
    s_ << "<text x=\"" << x << "\" y=\"" << y << "\" font-size=\"11\">"
       << printf_text("labelled every %g m (m above sea level)", 5.0 * relief_interval_)
       << "</text>\n";
    y += 16;
    // The raster's file name (its folder left out), shortened to the legend's width.
    std::string source = r_.relief.source.substr(r_.relief.source.find_last_of('/') + 1);
    if (source.size() > 28) {
      std::size_t from = source.size() - 27;
      while (from < source.size() && (static_cast<unsigned char>(source[from]) & 0xC0) == 0x80)
        ++from;  // not inside a UTF-8 character
      source = "\u2026" + source.substr(from);
    }
    s_ << "<text x=\"" << x << "\" y=\"" << y << "\" font-size=\"11\">hillshade of "
       << escape_markup(printable(source)) << "</text>\n";
  }

  const StudyRecord& r_;
  const Footprint& f_;
  const GroupFootprint& g_;
  const SiteFrame site_;
  View view_{};
  Graticule graticule_;
  double peak_ = 0.0, low_ = 0.0;
  double relief_interval_ = 0.0;  // m between contour lines; 0: no relief drawn
  std::ostringstream s_;
};

const GroupFootprint* group_named(const Footprint& f, const std::string& name) {
  for (const auto& g : f.groups)
    if (g.name == name) return &g;
  return nullptr;
}

}  // namespace

std::string map_svg(const StudyRecord& r, const std::string& group) {
  const GroupFootprint* g = group_named(r.footprint, group);
  if (!g && !r.footprint.groups.empty()) g = &r.footprint.groups.back();
  if (!g) {
    GroupFootprint empty;
    empty.name = "all";
    empty.centre = {std::nan(""), std::nan("")};
    return MapWriter(r, empty).write();
  }
  return MapWriter(r, *g).write();
}

std::string map_svg(const StudyRecord& r) {
  return map_svg(r, "all");
}

}  // namespace strewn
