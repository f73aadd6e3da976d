#include "report/geojson_rings.hpp"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <utility>

namespace strewn {

nlohmann::json geojson_position(LonLat point) {
  // The IEEE 754 remainder is exact and leaves a longitude already in [-180, 180] as it is: its
  // quotient is rounded half to even, so +180 and -180 stay (C11 7.12.10.2, from memory).
  const double lon = std::remainder(point.lon, 360.0);
  // 1e-7 degrees is about a centimetre: enough, and RFC 7946 (11.2) advises no more.
  return {std::round(lon * 1e7) / 1e7, std::round(point.lat * 1e7) / 1e7};
}

namespace {

// A vertex in the plane of unwrapped longitude x (degrees, continuous along the ring, so that it
// may pass +-180) and latitude y; `lon` is its longitude in [-180, 180] (180 for a cut vertex),
// kept so that a cut latitude comes out the same in every 360-degree copy of an edge.
struct Node {
  double x = 0.0, y = 0.0, lon = 0.0;
};
using Ring = std::vector<Node>;  // first vertex not repeated

constexpr std::size_t kNone = std::numeric_limits<std::size_t>::max();

// The latitude where the edge p-q meets the antimeridian (a line x = 180 + 360 k of the plane).
// Linear in longitude, which the short edges of the 128-vertex rings allow: for an edge of
// length s at latitude phi, a great circle bulges poleward of the straight line in
// longitude/latitude by about s^2 tan(phi) / (8 R) (the great circle through two points of one
// parallel, expanded to second order in their longitude difference, on a sphere of radius R),
// about a millimetre for a ring of 5 km radius at 40 degrees, a metre a few kilometres from a
// pole: small beside the figures drawn.
// Each end's distance to the antimeridian is 180 - |lon| in every copy of the edge (an edge
// spans at most 180 degrees), so both sides of a cut and every copy get the same latitude.
double cut_latitude(const Node& p, const Node& q) {
  if (p.y == q.y) return p.y;  // along a parallel, or the pole's edge of a cap
  const double dp = 180.0 - std::abs(p.lon), dq = 180.0 - std::abs(q.lon);
  return dp + dq > 0.0 ? p.y + dp / (dp + dq) * (q.y - p.y) : p.y;
}

// The pieces of a simple counter-clockwise ring on either side of the line x = `line` (a vertex
// on the line counts as left of it), each counter-clockwise. Where an edge crosses the line a
// cut vertex is added. Sorted along the line, the crossings bound in pairs the stretches of the
// line inside the ring (going up the line one enters and leaves a simple polygon in turn: Jordan
// curve theorem); a piece follows the ring to a crossing, the line to that crossing's pair, and
// the ring again, so its inside stays on its left as the ring's does.
std::vector<Ring> split(const Ring& ring, double line) {
  struct Entry {
    Node node;
    std::size_t pair = kNone;  // a cut vertex: the other end of its stretch inside the ring
  };
  std::vector<Entry> entries;
  std::vector<std::size_t> cuts;
  for (std::size_t i = 0; i < ring.size(); ++i) {
    const Node& p = ring[i];
    const Node& q = ring[(i + 1) % ring.size()];
    entries.push_back({p});
    if ((p.x > line) != (q.x > line)) {
      cuts.push_back(entries.size());
      entries.push_back({{line, cut_latitude(p, q), 180.0}});
    }
  }
  if (cuts.empty()) return {ring};
  // A closed ring crosses the line an even number of times: every crossing changes its side.
  std::sort(cuts.begin(), cuts.end(), [&](std::size_t a, std::size_t b) {
    return std::pair(entries[a].node.y, a) < std::pair(entries[b].node.y, b);
  });
  for (std::size_t k = 0; k + 1 < cuts.size(); k += 2) {
    entries[cuts[k]].pair = cuts[k + 1];
    entries[cuts[k + 1]].pair = cuts[k];
  }
  std::vector<bool> taken(entries.size(), false);
  std::vector<Ring> pieces;
  for (std::size_t start = 0; start < entries.size(); ++start) {
    if (taken[start] || entries[start].pair != kNone) continue;
    Ring piece;
    std::size_t i = start;
    do {
      taken[i] = true;
      piece.push_back(entries[i].node);
      if (entries[i].pair != kNone) {
        i = entries[i].pair;
        piece.push_back(entries[i].node);
      }
      i = (i + 1) % entries.size();
    } while (i != start && piece.size() <= 2 * entries.size());
    pieces.push_back(std::move(piece));
  }
  return pieces;
}

// The 360-degree strip [360 k - 180, 360 k + 180] of the plane that holds a piece: k.
double strip_of(const Ring& piece) {
  double sum = 0.0;
  for (const Node& n : piece) sum += n.x;
  return std::round(sum / static_cast<double>(piece.size()) / 360.0);
}

// A ring that crosses the antimeridian, unwrapped: cut at every line x = 180 + 360 k it spans
// and each piece moved into [-180, 180], so the cut vertices land on +180 and -180 exactly.
std::vector<Ring> cut_at_antimeridian(const Ring& ring) {
  const auto [low, high] = std::minmax_element(
      ring.begin(), ring.end(), [](const Node& a, const Node& b) { return a.x < b.x; });
  std::vector<Ring> pieces{ring};
  for (double k = std::ceil((low->x - 180.0) / 360.0); 180.0 + 360.0 * k < high->x; ++k) {
    std::vector<Ring> next;
    for (const Ring& piece : pieces)
      for (Ring& part : split(piece, 180.0 + 360.0 * k)) next.push_back(std::move(part));
    pieces = std::move(next);
  }
  for (Ring& piece : pieces) {
    const double shift = 360.0 * strip_of(piece);
    for (Node& n : piece) n.x -= shift;
  }
  return pieces;
}

// A ring round a pole, unwrapped: its longitude turns once, eastward (turn = +1) about the north
// pole or westward (-1) about the south one, both counter-clockwise seen from above the pole.
// In the plane the cap is the region between the ring, repeated every 360 degrees, and the
// pole's latitude; four repeats and the pole's edge close it with its sides beyond +-540, and
// its part between the lines -180 and 180 is the cap as GIS tools draw it in plate carree: the
// ring, up the antimeridian at +180 to the pole, along the pole to -180, and down again.
std::vector<Ring> polar_cap(const Ring& ring, double turn) {
  Ring region;
  for (double period = -2.0; period < 2.0; ++period)
    for (const Node& n : ring) region.push_back({n.x + 360.0 * turn * period, n.y, n.lon});
  const Node& first = ring.front();
  const double end = first.x + 720.0 * turn, pole = 90.0 * turn;
  region.push_back({end, first.y, first.lon});
  region.push_back({end, pole, first.lon});
  region.push_back({first.x - 720.0 * turn, pole, first.lon});
  std::vector<Ring> pieces;
  for (const Ring& part : split(region, -180.0))
    for (Ring& piece : split(part, 180.0))
      if (strip_of(piece) == 0.0) pieces.push_back(std::move(piece));
  return pieces;
}

// Twice the signed area of a ring in longitude/latitude (shoelace): positive counter-clockwise.
double twice_area(const std::vector<LonLat>& ring) {
  double twice = 0.0;
  for (std::size_t i = 0; i < ring.size(); ++i) {
    const LonLat& p = ring[i];
    const LonLat& q = ring[(i + 1) % ring.size()];
    twice += p.lon * q.lat - q.lon * p.lat;
  }
  return twice;
}

// A piece as a closed GeoJSON ring of rounded positions, or null when rounding leaves it
// without area (a ring that touches a cut line at a vertex, or a sliver narrower than 1e-7
// degrees). Along the pole's edge of a cap a vertex every 90 degrees, so that no edge spans more
// than 180 degrees of longitude: a reader that takes each edge the short way round, as RFC 7946
// (3.1.9) lets it, would otherwise draw that edge backwards.
nlohmann::json closed_ring(const Ring& piece) {
  std::vector<LonLat> ring;
  for (const Node& n : piece) {
    const nlohmann::json at = geojson_position({n.x, n.y});
    const LonLat p{at[0].get<double>(), at[1].get<double>()};
    if (ring.empty() || p.lon != ring.back().lon || p.lat != ring.back().lat) ring.push_back(p);
  }
  while (ring.size() > 1 && ring.back().lon == ring.front().lon &&
         ring.back().lat == ring.front().lat)
    ring.pop_back();
  if (ring.size() < 3 || twice_area(ring) <= 0.0) return nullptr;
  nlohmann::json out = nlohmann::json::array();
  for (std::size_t i = 0; i < ring.size(); ++i) {
    const LonLat& p = ring[i];
    const LonLat& q = ring[(i + 1) % ring.size()];
    out.push_back({p.lon, p.lat});
    if (std::abs(p.lat) == 90.0 && q.lat == p.lat) {
      const double step = std::copysign(90.0, q.lon - p.lon);
      for (double lon = p.lon + step; (q.lon - lon) * step > 0.0; lon += step)
        out.push_back({lon, p.lat});
    }
  }
  out.push_back(out.front());  // closed (RFC 7946 3.1.6)
  return out;
}

}  // namespace

nlohmann::json ring_geometry(const std::vector<LonLat>& ring) {
  if (ring.empty()) return {{"type", "Polygon"}, {"coordinates", nlohmann::json::array()}};
  // Unwrapped: each vertex at the copy of its longitude nearest the one before (edges are taken
  // the short way round). The ring crosses the antimeridian where a step between longitudes in
  // [-180, 180] exceeds 180 degrees; its longitude turns once round when it encloses a pole.
  Ring plane;
  bool crosses = false;
  double x = 0.0;
  for (std::size_t i = 0; i <= ring.size(); ++i) {
    const LonLat& v = ring[i % ring.size()];
    const double lon = std::remainder(v.lon, 360.0);
    x = i == 0 ? lon : lon + 360.0 * std::round((x - lon) / 360.0);
    if (i > 0) crosses = crosses || std::abs(lon - plane.back().lon) > 180.0;
    if (i < ring.size()) plane.push_back({x, v.lat, lon});
  }
  const double turns = std::round((x - plane.front().x) / 360.0);
  if (!crosses && turns == 0.0) {
    nlohmann::json closed = nlohmann::json::array();
    for (const LonLat& v : ring) closed.push_back(geojson_position(v));
    closed.push_back(geojson_position(ring.front()));  // closed (RFC 7946 3.1.6)
    return {{"type", "Polygon"}, {"coordinates", {closed}}};
  }
  const std::vector<Ring> pieces =
      turns == 0.0 ? cut_at_antimeridian(plane) : polar_cap(plane, turns > 0.0 ? 1.0 : -1.0);
  nlohmann::json polygons = nlohmann::json::array();
  for (const Ring& piece : pieces)
    if (nlohmann::json closed = closed_ring(piece); !closed.is_null())
      polygons.push_back(nlohmann::json::array({closed}));
  if (polygons.size() == 1) return {{"type", "Polygon"}, {"coordinates", polygons[0]}};
  return {{"type", "MultiPolygon"}, {"coordinates", polygons}};
}

}  // namespace strewn
