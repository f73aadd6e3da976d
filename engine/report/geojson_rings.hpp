#pragma once
// The GeoJSON geometry of a ring in longitude/latitude by RFC 7946: a ring that crosses the
// antimeridian is cut there into pieces (section 3.1.9), a ring about a pole becomes a polar cap
// drawn to the pole along the antimeridian, every ring stays closed and counter-clockwise
// (section 3.1.6). Internal to the report module: report_files.cpp writes its polygons with it.
#include <nlohmann/json.hpp>
#include <vector>

namespace strewn {

struct LonLat {
  double lon = 0.0, lat = 0.0;  ///< degrees, WGS84
};

/// A GeoJSON position [longitude, latitude]: the longitude brought into [-180, 180], both rounded
/// to 1e-7 degrees.
nlohmann::json geojson_position(LonLat point);

/// The geometry of a ring given counter-clockwise, its first vertex not repeated, each edge the
/// short way round in longitude:
/// - a Polygon of the ring, closed, when it neither crosses the antimeridian nor goes round a pole
///   (exactly as written before these rules);
/// - a ring that crosses the antimeridian: its pieces on either side, cut at longitude +180 and
///   -180 (RFC 7946 3.1.9), a MultiPolygon (a Polygon if one piece only is left);
/// - a ring round a pole: the polar cap, one Polygon that runs along the ring, then along the
///   antimeridian to the pole and back (a MultiPolygon if the ring crosses the antimeridian more
///   than once and the cap falls into pieces).
nlohmann::json ring_geometry(const std::vector<LonLat>& ring);

}  // namespace strewn
