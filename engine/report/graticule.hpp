#pragma once
// The graticule of a map in the site's east/north frame: meridians and parallels at round
// degrees, each a line of points placed by the site frame (GeographicLib's LocalCartesian), so
// that they converge toward a pole and bend as the true lines do, and where each meets the map's
// edges, for its ticks and labels. Longitudes are taken continuously across the antimeridian and
// written in [-180, 180]. Internal to the report module: map_svg.cpp draws it.
#include <string>
#include <vector>

#include "report/site_frame.hpp"

namespace strewn {

/// The map's panel in the site frame (m), its edges parallel to east and north.
struct MapPanel {
  double west = 0.0, east = 0.0, south = 0.0, north = 0.0;  ///< m
  double pixels_per_metre = 1.0;                            ///< for the room its labels take
};

/// Which edge of the panel a label marks (a line meets it there), or none: a parallel about a
/// pole that meets no edge is labelled on itself, at its lowest point on the map.
enum class PanelEdge { bottom, left, top, right, none };

/// A label of a meridian or parallel, at the point `at` (m) where it meets `edge`.
struct GraticuleLabel {
  bool meridian = false;
  double degrees = 0.0;  ///< longitude in [-180, 180] or latitude
  std::string text;      ///< "179.99°W", "40.02°N", "180.00°"
  PlanePoint at;
  PanelEdge edge = PanelEdge::none;
};

/// A meridian or parallel: its points (m) in order along it, reaching over the whole panel
/// (what lies beyond is for the map to clip).
struct GraticuleLine {
  bool meridian = false;
  double degrees = 0.0;  ///< longitude in [-180, 180] or latitude
  std::vector<PlanePoint> points;
};

/// Where a meridian or parallel meets an edge of the panel: ticks go at every such point.
struct GraticuleTick {
  PlanePoint at;
  PanelEdge edge = PanelEdge::bottom;
};

struct Graticule {
  std::vector<GraticuleLine> lines;
  std::vector<GraticuleTick> ticks;
  /// Longitudes on the bottom edge and latitudes on the left edge where their lines meet those
  /// edges; a line that meets neither is labelled at another edge it meets (a meridian running
  /// into a pole in the panel) or on itself (a parallel about it). Where each is written, and
  /// which are left out for running into others, is the map's to decide.
  std::vector<GraticuleLabel> labels;
};

/// The graticule of `panel` for a site with coordinates (empty without): about four or five
/// lines along each labelled edge, their labels (at 11 px) not running into each other there,
/// at most 40 of each kind; their step a round number of degrees (1, 2 or 5 times a power of ten;
/// 10, 15, 30, 45 or 90 beyond), written with as many decimals as it needs.
Graticule graticule(const SiteFrame& site, const MapPanel& panel);

}  // namespace strewn
