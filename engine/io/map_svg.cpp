// The footprint map (SVG). Our own design: a square map panel in the site's east/north frame with
// north up, and a legend panel beside it.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <numbers>
#include <sstream>

#include "core/text.hpp"
#include "io/report_files.hpp"

namespace strewn {

namespace {

constexpr double kPanel = 680.0;  // map panel side, px
constexpr double kLeft = 20.0, kTop = 56.0;
constexpr double kWidth = 960.0, kHeight = 790.0;

// Line colours per containment level (our palette: slate, sage, rust, plum, then repeats).
const char* level_colour(std::size_t k) {
  static const char* colours[] = {"#3d5a80", "#4f8a5b", "#c0622b", "#7a2e5c", "#2f6f73", "#8a6d1f"};
  return colours[k % 6];
}

// Density shading: from pale wheat to deep plum through apricot and brick, on log10 scale.
std::string density_colour(double t) {  // t in [0, 1], 1 the densest
  static const double stops[4][3] = {
      {251, 238, 193}, {242, 184, 114}, {209, 96, 61}, {107, 45, 92}};
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

// A round length (1, 2 or 5 times a power of ten) near `about`.
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

}  // namespace

std::string map_svg(const StudyRecord& r) {
  const Footprint& f = r.footprint;
  std::ostringstream s;
  s << "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  s << "<svg xmlns=\"http://www.w3.org/2000/svg\" id=\"map\" viewBox=\"0 0 " << kWidth << " "
    << kHeight << "\" width=\"" << kWidth << "\" height=\"" << kHeight
    << "\" font-family=\"Helvetica, Arial, sans-serif\" role=\"img\" aria-label=\"footprint "
       "map\">\n";
  s << "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n";
  s << "<text x=\"" << kLeft
    << "\" y=\"26\" font-size=\"18\" font-weight=\"bold\" fill=\"#1f2933\">"
    << escape_markup(r.title.empty() ? "strewn footprint" : r.title) << "</text>\n";
  char sub[200];
  std::snprintf(sub, sizeof sub,
                "%llu samples, %llu failed; bounds at %g%% confidence; east/north from the site "
                "origin, north up",
                static_cast<unsigned long long>(r.samples),
                static_cast<unsigned long long>(r.failed), 100.0 * f.confidence);
  s << "<text x=\"" << kLeft << "\" y=\"44\" font-size=\"12\" fill=\"#52606d\">" << sub
    << "</text>\n";
  if (f.groups.empty()) {
    s << "</svg>\n";
    return s.str();
  }
  const GroupFootprint& all = f.groups.back();

  // The view: centred on the centre, wide enough for every determined figure and the release.
  PlanePoint c = all.centre;
  if (!std::isfinite(c.east)) c = r.release;
  double half = 10.0;
  auto reach = [&](double e, double n, double extra = 0.0) {
    if (std::isfinite(e) && std::isfinite(n))
      half = std::max(half, std::max(std::abs(e - c.east), std::abs(n - c.north)) + extra);
  };
  for (const auto& g : f.groups) {
    for (const auto& k : g.containment) {
      if (std::isfinite(k.radius)) reach(g.centre.east, g.centre.north, k.radius);
      if (k.radius_upper && std::isfinite(*k.radius_upper))
        reach(g.centre.east, g.centre.north, *k.radius_upper);
    }
    for (const auto& p : g.polygons)
      for (const auto& q : p.ring) reach(q.east, q.north);
  }
  reach(r.release.east, r.release.north);
  const View v{c.east, c.north, half * 1.08};

  s << "<defs><clipPath id=\"panel\"><rect x=\"" << kLeft << "\" y=\"" << kTop << "\" width=\""
    << kPanel << "\" height=\"" << kPanel << "\"/></clipPath>\n"
    << "<marker id=\"arrow\" viewBox=\"0 0 10 10\" refX=\"9\" refY=\"5\" markerWidth=\"7\" "
       "markerHeight=\"7\" orient=\"auto-start-reverse\"><path d=\"M0 0 L10 5 L0 10 z\" "
       "fill=\"#1f2933\"/></marker></defs>\n";
  s << "<rect x=\"" << kLeft << "\" y=\"" << kTop << "\" width=\"" << kPanel << "\" height=\""
    << kPanel << "\" fill=\"#f7f7f2\" stroke=\"#9aa5b1\"/>\n";
  s << "<g clip-path=\"url(#panel)\">\n";

  // Density shading of all bodies, aggregated to display cells of at most 1/170 of the view.
  double peak = 0.0, low = 0.0;
  {
    const ImpactGrid& g = all.grid;
    const double cell = std::max(g.cell, 2.0 * v.half / 170.0);
    std::map<std::pair<std::int64_t, std::int64_t>, double> shown;  // objects per release
    for (std::size_t k = 0; k < g.count.size(); ++k) {
      const double e = (static_cast<double>(g.east_index[k]) + 0.5) * g.cell;
      const double n = (static_cast<double>(g.north_index[k]) + 0.5) * g.cell;
      if (std::abs(e - v.centre_e) > v.half + cell || std::abs(n - v.centre_n) > v.half + cell)
        continue;
      shown[{static_cast<std::int64_t>(std::floor(e / cell)),
             static_cast<std::int64_t>(std::floor(n / cell))}] += g.density[k] * g.cell * g.cell;
    }
    for (const auto& [key, objects] : shown) peak = std::max(peak, objects / (cell * cell));
    low = peak * 1e-4;
    s << "<g id=\"density\" shape-rendering=\"crispEdges\">\n";
    for (const auto& [key, objects] : shown) {
      const double density = objects / (cell * cell);
      const double t = std::log10(std::max(density, low) / low) / 4.0;
      const double e0 = static_cast<double>(key.first) * cell;
      const double n1 = static_cast<double>(key.second + 1) * cell;
      s << "<rect x=\"" << fmt(v.x(e0)) << "\" y=\"" << fmt(v.y(n1)) << "\" width=\""
        << fmt(cell * v.scale() + 0.3) << "\" height=\"" << fmt(cell * v.scale() + 0.3)
        << "\" fill=\"" << density_colour(t) << "\"/>\n";
    }
    s << "</g>\n";
  }

  // Figures of all bodies together: ellipses (dotted), circles (thin, and dashed for the upper
  // bound), hazard polygons (solid).
  for (std::size_t k = 0; k < all.ellipses.size(); ++k) {
    const auto& e = all.ellipses[k];
    if (!(e.semi_major > 0.0) || !std::isfinite(e.semi_major)) continue;
    s << "<ellipse class=\"ellipse\" cx=\"" << fmt(v.x(all.mean.east)) << "\" cy=\""
      << fmt(v.y(all.mean.north)) << "\" rx=\"" << fmt(e.semi_major * v.scale()) << "\" ry=\""
      << fmt(std::max(e.semi_minor, 1e-9) * v.scale()) << "\" transform=\"rotate("
      << fmt(e.bearing - 90.0) << " " << fmt(v.x(all.mean.east)) << " " << fmt(v.y(all.mean.north))
      << ")\" fill=\"none\" stroke=\"" << level_colour(k)
      << "\" stroke-width=\"1\" stroke-dasharray=\"1.5 3\"/>\n";
  }
  for (std::size_t k = 0; k < all.containment.size(); ++k) {
    const auto& ct = all.containment[k];
    if (std::isfinite(ct.radius))
      s << "<circle class=\"containment\" cx=\"" << fmt(v.x(all.centre.east)) << "\" cy=\""
        << fmt(v.y(all.centre.north)) << "\" r=\"" << fmt(ct.radius * v.scale())
        << "\" fill=\"none\" stroke=\"" << level_colour(k) << "\" stroke-width=\"1\"/>\n";
    if (ct.radius_upper && std::isfinite(*ct.radius_upper))
      s << "<circle class=\"containment-bound\" cx=\"" << fmt(v.x(all.centre.east)) << "\" cy=\""
        << fmt(v.y(all.centre.north)) << "\" r=\"" << fmt(*ct.radius_upper * v.scale())
        << "\" fill=\"none\" stroke=\"" << level_colour(k)
        << "\" stroke-width=\"1.6\" stroke-dasharray=\"8 4\"/>\n";
  }
  for (std::size_t k = 0; k < all.polygons.size(); ++k) {
    const auto& p = all.polygons[k];
    if (!p.determined || p.ring.size() < 3) continue;
    s << "<path class=\"hazard-polygon\" d=\"" << path_of(v, p.ring) << "\" fill=\""
      << level_colour(k) << "\" fill-opacity=\"0.06\" stroke=\"" << level_colour(k)
      << "\" stroke-width=\"2.2\" stroke-linejoin=\"round\"/>\n";
  }
  // Release point and track; centre and mean impact.
  {
    const double x = v.x(r.release.east), y = v.y(r.release.north);
    const double t = r.release_track * std::numbers::pi / 180.0;
    const double length = 0.16 * kPanel;
    s << "<line class=\"release-track\" x1=\"" << fmt(x) << "\" y1=\"" << fmt(y) << "\" x2=\""
      << fmt(x + length * std::sin(t)) << "\" y2=\"" << fmt(y - length * std::cos(t))
      << "\" stroke=\"#1f2933\" stroke-width=\"1.6\" marker-end=\"url(#arrow)\"/>\n";
    s << "<path class=\"release-point\" d=\"M" << fmt(x) << " " << fmt(y - 8) << " L" << fmt(x + 7)
      << " " << fmt(y + 5) << " L" << fmt(x - 7) << " " << fmt(y + 5)
      << " Z\" fill=\"#ffffff\" stroke=\"#1f2933\" stroke-width=\"1.6\"/>\n";
    const double cx = v.x(all.centre.east), cy = v.y(all.centre.north);
    if (std::isfinite(cx) && std::isfinite(cy))
      s << "<path class=\"centre\" d=\"M" << fmt(cx - 7) << " " << fmt(cy) << " H" << fmt(cx + 7)
        << " M" << fmt(cx) << " " << fmt(cy - 7) << " V" << fmt(cy + 7)
        << "\" stroke=\"#1f2933\" stroke-width=\"2\"/>\n";
    const double mx = v.x(all.mean.east), my = v.y(all.mean.north);
    if (std::isfinite(mx) && std::isfinite(my))
      s << "<circle class=\"mean-impact\" cx=\"" << fmt(mx) << "\" cy=\"" << fmt(my)
        << "\" r=\"3\" fill=\"#1f2933\"/>\n";
  }
  s << "</g>\n";

  // North arrow (top right of the panel) and scale bar (bottom left).
  {
    const double x = kLeft + kPanel - 34, y = kTop + 24;
    s << "<g id=\"north-arrow\"><path d=\"M" << x << " " << y - 14 << " L" << x + 8 << " " << y + 12
      << " L" << x << " " << y + 6 << " L" << x - 8 << " " << y + 12
      << " Z\" fill=\"#1f2933\"/><text x=\"" << x << "\" y=\"" << y + 28
      << "\" font-size=\"13\" text-anchor=\"middle\" fill=\"#1f2933\">N</text></g>\n";
    const double metres = round_length(0.25 * 2.0 * v.half);
    const double px = metres * v.scale();
    const double sx = kLeft + 16, sy = kTop + kPanel - 18;
    s << "<g id=\"scale-bar\"><rect x=\"" << sx - 6 << "\" y=\"" << sy - 22 << "\" width=\""
      << fmt(px + 12) << "\" height=\"30\" fill=\"#ffffff\" fill-opacity=\"0.8\"/>"
      << "<path d=\"M" << sx << " " << sy - 6 << " V" << sy << " H" << fmt(sx + px) << " V"
      << sy - 6 << "\" fill=\"none\" stroke=\"#1f2933\" stroke-width=\"2\"/><text x=\""
      << fmt(sx + px / 2) << "\" y=\"" << sy - 9
      << "\" font-size=\"12\" text-anchor=\"middle\" fill=\"#1f2933\">" << length_label(metres)
      << "</text></g>\n";
  }

  // Legend.
  {
    const double x = kLeft + kPanel + 24;
    double y = kTop + 10;
    s << "<g id=\"legend\" font-size=\"12\" fill=\"#1f2933\">\n";
    s << "<text x=\"" << x << "\" y=\"" << y << "\" font-weight=\"bold\">All bodies</text>\n";
    y += 20;
    for (std::size_t k = 0; k < all.containment.size(); ++k) {
      s << "<rect x=\"" << x << "\" y=\"" << y - 10 << "\" width=\"22\" height=\"12\" fill=\""
        << level_colour(k) << "\"/><text x=\"" << x + 30 << "\" y=\"" << y << "\">level "
        << all.containment[k].level << "</text>\n";
      y += 18;
    }
    y += 6;
    auto line_entry = [&](const char* dash, double width, const char* label) {
      s << "<line x1=\"" << x << "\" y1=\"" << y - 4 << "\" x2=\"" << x + 22 << "\" y2=\"" << y - 4
        << "\" stroke=\"#1f2933\" stroke-width=\"" << width << "\""
        << (dash[0] ? std::string(" stroke-dasharray=\"") + dash + "\"" : std::string())
        << "/><text x=\"" << x + 30 << "\" y=\"" << y << "\">" << label << "</text>\n";
      y += 18;
    };
    line_entry("", 2.2, "hazard polygon (counted)");
    line_entry("", 1.0, "containment radius");
    line_entry("8 4", 1.6, "upper confidence bound");
    line_entry("1.5 3", 1.0, "ellipse (Gaussian approx.)");
    s << "<path d=\"M" << x + 11 << " " << y - 12 << " L" << x + 18 << " " << y + 1 << " L" << x + 4
      << " " << y + 1 << " Z\" fill=\"#ffffff\" stroke=\"#1f2933\"/><text x=\"" << x + 30
      << "\" y=\"" << y << "\">release point, track</text>\n";
    y += 18;
    s << "<path d=\"M" << x + 4 << " " << y - 4 << " H" << x + 18 << " M" << x + 11 << " " << y - 11
      << " V" << y + 3 << "\" stroke=\"#1f2933\" stroke-width=\"2\"/><text x=\"" << x + 30
      << "\" y=\"" << y << "\">centre (" << escape_markup(f.centre) << ")</text>\n";
    y += 30;
    s << "<text x=\"" << x << "\" y=\"" << y << "\" font-weight=\"bold\">Impact density</text>\n";
    y += 8;
    for (int k = 0; k < 40; ++k)
      s << "<rect x=\"" << x + k * 4.5 << "\" y=\"" << y << "\" width=\"4.6\" height=\"14\" fill=\""
        << density_colour(k / 39.0) << "\"/>\n";
    char lo[32], hi[32];
    std::snprintf(lo, sizeof lo, "%.1e", low);
    std::snprintf(hi, sizeof hi, "%.1e", peak);
    s << "<text x=\"" << x << "\" y=\"" << y + 28 << "\" font-size=\"11\">" << lo
      << "</text><text x=\"" << x + 180 << "\" y=\"" << y + 28
      << "\" font-size=\"11\" text-anchor=\"end\">" << hi << "</text>\n";
    s << "<text x=\"" << x << "\" y=\"" << y + 44
      << "\" font-size=\"11\">objects per m\u00b2 per release (log scale)</text>\n";
    s << "</g>\n";
  }
  s << "<text x=\"" << kLeft << "\" y=\"" << kTop + kPanel + 22
    << "\" font-size=\"11\" fill=\"#52606d\">Engineering estimate from the inputs given. "
       "Exclusion zones are set by the responsible authority under local rules.</text>\n";
  s << "</svg>\n";
  return s.str();
}

}  // namespace strewn
