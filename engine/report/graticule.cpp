#include "report/graticule.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <optional>

#include "core/text.hpp"

namespace strewn {

namespace {

constexpr int kEdgeSamples = 256;        // intervals along an edge in which lines are looked for
constexpr int kLineSegments = 96;        // at least, along a drawn line
constexpr double kSegmentDegrees = 2.0;  // at most, of longitude along a drawn parallel
constexpr int kMostLines = 40;           // of each kind: a step is widened until no more are drawn
constexpr double kCharWidth = 6.5;       // px a character of an 11 px label (about)
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

constexpr std::array<PanelEdge, 4> kEdges = {PanelEdge::bottom, PanelEdge::left, PanelEdge::top,
                                             PanelEdge::right};

// The point at t in [0, 1] along an edge: the bottom and top from west to east, the left and
// right from south to north.
PlanePoint edge_point(const MapPanel& p, PanelEdge edge, double t) {
  switch (edge) {
    case PanelEdge::bottom:
      return {p.west + t * (p.east - p.west), p.south};
    case PanelEdge::top:
      return {p.west + t * (p.east - p.west), p.north};
    case PanelEdge::left:
      return {p.west, p.south + t * (p.north - p.south)};
    default:
      return {p.east, p.south + t * (p.north - p.south)};
  }
}

// A round step of degrees, the largest at most `about`: 1, 2 or 5 times a power of ten below 10
// degrees, then 10, 15, 30, 45 or 90 degrees, which divide the full circle (as do the smaller
// ones), so that meridians repeat the same way round it.
double round_degrees(double about) {
  for (double big : {90.0, 45.0, 30.0, 15.0, 10.0})
    if (about >= big) return big;
  const double power = std::pow(10.0, std::floor(std::log10(about)));
  for (double m : {5.0, 2.0, 1.0})
    if (m * power <= about) return m * power;
  return power;
}

// The next round step above `step`.
double wider_degrees(double step) {
  if (step >= 90.0) return 90.0;
  double wider = round_degrees(step * 1.01);
  for (double f = 1.5; wider <= step; f += 0.5) wider = round_degrees(step * f);
  return wider;
}

// Decimals that write a multiple of `step` exactly.
int places_of(double step) {
  return std::max(0, static_cast<int>(std::ceil(-std::log10(step) - 1e-9)));
}

// A label's text: a latitude north or south, a longitude east or west in [-180, 180] (180
// itself without a side, being both).
std::string degrees_text(bool meridian, double degrees, int places) {
  if (meridian && std::abs(std::abs(degrees) - 180.0) < 1e-9)
    return printf_text("%.*f\u00b0", places, 180.0);
  const char* side = meridian ? (degrees < 0 ? "W" : "E") : (degrees < 0 ? "S" : "N");
  return printf_text("%.*f\u00b0%s", places, std::abs(degrees), side);
}

// The latitudes and longitudes the panel holds, the latter continuous (they may pass +-180):
// the lowest and highest of each along the panel's edges (neither has an extreme inside the
// panel but at a pole), all longitudes when a pole lies in the panel.
struct Extent {
  double lat_low = kNaN, lat_high = kNaN, lon_low = kNaN, lon_high = kNaN;
  [[nodiscard]] bool valid() const {
    return std::isfinite(lat_low) && std::isfinite(lat_high) && std::isfinite(lon_low) &&
           std::isfinite(lon_high);
  }
};

// Continues `longitude` from `before`: the copy of it nearest to `before`.
double unwrapped(double longitude, double before) {
  return before + std::remainder(longitude - before, 360.0);
}

class GraticuleBuilder {
 public:
  GraticuleBuilder(const SiteFrame& site, const MapPanel& panel) : site_(site), panel_(panel) {
    for (std::size_t e = 0; e < kEdges.size(); ++e)
      for (int i = 0; i <= kEdgeSamples; ++i)
        samples_[e][static_cast<std::size_t>(i)] =
            site_.locate(edge_point(panel_, kEdges[e], static_cast<double>(i) / kEdgeSamples));
  }

  Graticule build() {
    Graticule out;
    const Extent extent = find_extent();
    if (!extent.valid()) return out;
    const double lon_step = step_for(span_along(PanelEdge::bottom, true),
                                     extent.lon_high - extent.lon_low, panel_.east - panel_.west);
    const double lat_step = step_for(span_along(PanelEdge::left, false),
                                     extent.lat_high - extent.lat_low, panel_.north - panel_.south);
    if (!std::isfinite(lon_step) || !std::isfinite(lat_step)) return out;
    for (double k = std::ceil(extent.lon_low / lon_step);
         k * lon_step <= extent.lon_high && k * lon_step < extent.lon_low + 360.0; ++k)
      meridian(out, extent, k * lon_step, places_of(lon_step));
    for (double k = std::ceil(extent.lat_low / lat_step); k * lat_step <= extent.lat_high; ++k)
      if (std::abs(k * lat_step) < 90.0) parallel(out, extent, k * lat_step, places_of(lat_step));
    return out;
  }

 private:
  using Samples = std::array<std::optional<GeoPoint>, kEdgeSamples + 1>;

  [[nodiscard]] const Samples& samples(PanelEdge edge) const {
    return samples_[static_cast<std::size_t>(std::find(kEdges.begin(), kEdges.end(), edge) -
                                             kEdges.begin())];
  }

  // True when a pole's point lies in the panel, or within two sample spacings of its edges
  // (where the longitudes along the edges turn too fast to be followed between samples).
  [[nodiscard]] bool holds_pole(double latitude) const {
    const PlanePoint p = site_.local({latitude, 0.0});  // not finite on the far side
    const double margin_e = 2.0 * (panel_.east - panel_.west) / kEdgeSamples;
    const double margin_n = 2.0 * (panel_.north - panel_.south) / kEdgeSamples;
    return p.east >= panel_.west - margin_e && p.east <= panel_.east + margin_e &&
           p.north >= panel_.south - margin_n && p.north <= panel_.north + margin_n;
  }

  // Round the panel's edges (bottom, right, top, left: counter-clockwise), longitudes followed
  // continuously from the first.
  [[nodiscard]] Extent find_extent() const {
    Extent x;
    double lon = kNaN;
    const auto visit = [&](const std::optional<GeoPoint>& g) {
      if (!g) return;
      lon = std::isfinite(lon) ? unwrapped(g->longitude, lon) : g->longitude;
      x.lat_low = std::isfinite(x.lat_low) ? std::min(x.lat_low, g->latitude) : g->latitude;
      x.lat_high = std::isfinite(x.lat_high) ? std::max(x.lat_high, g->latitude) : g->latitude;
      x.lon_low = std::isfinite(x.lon_low) ? std::min(x.lon_low, lon) : lon;
      x.lon_high = std::isfinite(x.lon_high) ? std::max(x.lon_high, lon) : lon;
    };
    for (const auto& g : samples(PanelEdge::bottom)) visit(g);
    for (const auto& g : samples(PanelEdge::right)) visit(g);
    for (auto g = samples(PanelEdge::top).rbegin(); g != samples(PanelEdge::top).rend(); ++g)
      visit(*g);
    for (auto g = samples(PanelEdge::left).rbegin(); g != samples(PanelEdge::left).rend(); ++g)
      visit(*g);
    const bool north = holds_pole(90.0), south = holds_pole(-90.0);
    if (north) x.lat_high = 90.0;
    if (south) x.lat_low = -90.0;
    if (north || south) x.lon_high = x.lon_low + 360.0;
    // The extremes fall between samples by a little: lines just beyond are drawn (and clipped).
    const double lat_margin = 0.01 * (x.lat_high - x.lat_low);
    x.lat_low = std::max(-90.0, x.lat_low - lat_margin);
    x.lat_high = std::min(90.0, x.lat_high + lat_margin);
    if (!north && !south) {
      const double lon_margin = 0.01 * (x.lon_high - x.lon_low);
      x.lon_low -= lon_margin;
      x.lon_high += lon_margin;
    }
    return x;
  }

  // The degrees an edge spans: its longitudes (followed continuously) or latitudes.
  [[nodiscard]] double span_along(PanelEdge edge, bool longitude) const {
    double low = kNaN, high = kNaN, before = kNaN;
    for (const auto& g : samples(edge)) {
      if (!g) continue;
      double v = g->latitude;
      if (longitude)
        v = before = std::isfinite(before) ? unwrapped(g->longitude, before) : g->longitude;
      low = std::isfinite(low) ? std::min(low, v) : v;
      high = std::isfinite(high) ? std::max(high, v) : v;
    }
    return high - low;
  }

  // A round step giving at most five labels along an edge of `span` degrees and `metres`, whose
  // labels (about 6.5 px a character at 11 px) do not run into each other, and at most
  // kMostLines lines over the `range` of degrees the panel holds.
  [[nodiscard]] double step_for(double span, double range, double metres) const {
    if (!(span > 0.0)) span = range;
    if (!(span > 0.0) || !std::isfinite(span)) return kNaN;
    const double length = metres * panel_.pixels_per_metre;
    // 1e-7 degrees (about a centimetre) at the finest; each wider step is larger, up to 90.
    double step = round_degrees(std::max(span / 4.0, 1e-7));
    while (step < 90.0) {
      const double width = kCharWidth * (static_cast<double>(places_of(step)) + 6.0);
      if (step / span * length >= width + 14.0 && range / step <= kMostLines) break;
      step = wider_degrees(step);
    }
    return step;
  }

  // How far a point lies past a line, in degrees: its longitude past the meridian (the short way
  // round) or its latitude past the parallel.
  [[nodiscard]] static double past(const std::optional<GeoPoint>& g, bool meridian,
                                   double degrees) {
    if (!g) return kNaN;
    return meridian ? std::remainder(g->longitude - degrees, 360.0) : g->latitude - degrees;
  }

  // Where a meridian or parallel meets an edge: the samples between which it changes side (a
  // longitude passing the opposite meridian, 180 degrees away, is no crossing), each found
  // exactly by bisection on the site frame's own coordinates.
  [[nodiscard]] std::vector<PlanePoint> crossings(PanelEdge edge, bool meridian,
                                                  double degrees) const {
    std::vector<PlanePoint> out;
    const Samples& s = samples(edge);
    for (int i = 0; i < kEdgeSamples; ++i) {
      const double a = past(s[static_cast<std::size_t>(i)], meridian, degrees);
      const double b = past(s[static_cast<std::size_t>(i) + 1], meridian, degrees);
      if (!std::isfinite(a) || !std::isfinite(b) || std::abs(a - b) > 90.0) continue;
      if (a == 0.0) {
        out.push_back(edge_point(panel_, edge, static_cast<double>(i) / kEdgeSamples));
        continue;
      }
      if ((a < 0.0) == (b < 0.0) || b == 0.0) {
        if (b == 0.0 && i + 1 == kEdgeSamples) out.push_back(edge_point(panel_, edge, 1.0));
        continue;
      }
      double low = static_cast<double>(i) / kEdgeSamples, high = low + 1.0 / kEdgeSamples;
      for (int k = 0; k < 40; ++k) {  // 2^-40 of a sample interval
        const double mid = 0.5 * (low + high);
        const double m = past(site_.locate(edge_point(panel_, edge, mid)), meridian, degrees);
        if ((m < 0.0) == (a < 0.0))
          low = mid;
        else
          high = mid;
      }
      out.push_back(edge_point(panel_, edge, 0.5 * (low + high)));
    }
    return out;
  }

  // The ticks of a line at every edge it meets, and its labels: on `own` edge (the bottom for a
  // meridian, the left for a parallel) where it meets it, else at the first other edge it
  // meets. Returns false when it meets no edge.
  bool mark_edges(Graticule& out, bool meridian, double degrees, const std::string& text,
                  PanelEdge own) const {
    std::vector<GraticuleLabel> others;
    bool labelled = false;
    for (PanelEdge edge : kEdges)
      for (const PlanePoint& at : crossings(edge, meridian, degrees)) {
        out.ticks.push_back({at, edge});
        if (edge == own) {
          out.labels.push_back({meridian, degrees, text, at, edge});
          labelled = true;
        } else if (others.empty()) {
          others.push_back({meridian, degrees, text, at, edge});
        }
      }
    if (!labelled && !others.empty()) out.labels.push_back(others.front());
    return labelled || !others.empty();
  }

  void meridian(Graticule& out, const Extent& x, double unwrapped_lon, int places) const {
    const double lon = std::remainder(unwrapped_lon, 360.0);
    GraticuleLine line{true, lon, {}};
    for (int i = 0; i <= kLineSegments; ++i)
      line.points.push_back(
          site_.local({x.lat_low + (x.lat_high - x.lat_low) * i / kLineSegments, lon}));
    out.lines.push_back(std::move(line));
    mark_edges(out, true, lon, degrees_text(true, lon, places), PanelEdge::bottom);
  }

  // A parallel; one that meets no edge (a circle about a pole inside the panel) is labelled on
  // itself, at its lowest point in the panel.
  void parallel(Graticule& out, const Extent& x, double lat, int places) const {
    const double span = x.lon_high - x.lon_low;
    const int segments =
        std::clamp(static_cast<int>(std::ceil(span / kSegmentDegrees)), kLineSegments, 720);
    GraticuleLine line{false, lat, {}};
    for (int i = 0; i <= segments; ++i)
      line.points.push_back(site_.local({lat, x.lon_low + span * i / segments}));
    const std::string text = degrees_text(false, lat, places);
    if (!mark_edges(out, false, lat, text, PanelEdge::left)) {
      const PlanePoint* lowest = nullptr;
      for (const PlanePoint& p : line.points)
        if (p.east >= panel_.west && p.east <= panel_.east && p.north >= panel_.south &&
            p.north <= panel_.north && (!lowest || p.north < lowest->north))
          lowest = &p;
      if (lowest) out.labels.push_back({false, lat, text, *lowest, PanelEdge::none});
    }
    out.lines.push_back(std::move(line));
  }

  const SiteFrame& site_;
  MapPanel panel_;
  std::array<Samples, kEdges.size()> samples_{};
};

}  // namespace

Graticule graticule(const SiteFrame& site, const MapPanel& panel) {
  if (!site.geographic()) return {};
  return GraticuleBuilder(site, panel).build();
}

}  // namespace strewn
