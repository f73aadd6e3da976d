#pragma once
// Plane geometry and moments of impact points (east, north in metres).
//
// - PlanarMoments: mean and covariance by Welford's (1962) update or exact two-pass block sums,
//   merged by the pairwise formula of Chan, Golub and LeVeque (1979); no sum-of-squares
//   cancellation.
// - convex_hull: Andrew's (1979) monotone chain, after the Akl-Toussaint (1978) filter that drops
//   the points inside the octagon of extreme points (most of a footprint), so a hull of 10^6
//   points costs little more than two passes over them.
// - ConvexPolygon::contains: point location in a convex polygon by binary search over the fan of
//   triangles from its first vertex, O(log h).
#include <array>
#include <cstdint>
#include <span>
#include <vector>

namespace strewn {

struct PlanePoint {
  double east = 0.0, north = 0.0;
};

class PlanarMoments {
 public:
  /// The moments of whole columns: exact two-pass sums over blocks of 4096 points, merged in
  /// order by Chan's formula (the same figures as add() point by point, to rounding, and several
  /// times faster: no division per point).
  static PlanarMoments of(std::span<const double> east, std::span<const double> north);
  void add(double east, double north);
  void merge(const PlanarMoments& other);
  [[nodiscard]] std::uint64_t count() const { return count_; }
  [[nodiscard]] PlanePoint mean() const { return {mean_e_, mean_n_}; }
  /// Sample covariance (divisor n - 1): {var_east, cov_east_north, var_north}; zeros below 2.
  [[nodiscard]] std::array<double, 3> covariance() const;

 private:
  std::uint64_t count_ = 0;
  double mean_e_ = 0.0, mean_n_ = 0.0, m_ee_ = 0.0, m_en_ = 0.0, m_nn_ = 0.0;
};

/// Counter-clockwise convex hull without repeated first vertex; collinear points dropped. Fewer
/// than 3 vertices when the points are collinear or fewer than 3 distinct.
std::vector<PlanePoint> convex_hull(std::vector<PlanePoint> points);

/// The hull grown by a square of half-side `margin` (Minkowski sum): every point within `margin`
/// in east and in north of the hull is inside. Turns a degenerate hull into a polygon.
std::vector<PlanePoint> grow_hull(const std::vector<PlanePoint>& hull, double margin);

/// A convex polygon of at most `most` vertices that contains the counter-clockwise convex polygon
/// `hull`: the hull itself when it has that few, otherwise the polygon bounded by its supporting
/// lines in `most` equally spaced directions (an outer approximation; each vertex lies beyond the
/// hull by at most its width times (1 / cos(pi / most) - 1)). Found by rotating the support
/// vertex around the hull, O(most + vertices).
std::vector<PlanePoint> bounded_hull(const std::vector<PlanePoint>& hull, std::size_t most);

/// Signed area, positive when counter-clockwise (shoelace formula), m^2.
double polygon_area(std::span<const PlanePoint> ring);

/// A convex polygon (counter-clockwise, at least 3 vertices) prepared for point location.
class ConvexPolygon {
 public:
  explicit ConvexPolygon(std::vector<PlanePoint> ccw_vertices);
  /// True inside or on the boundary.
  [[nodiscard]] bool contains(double east, double north) const;
  [[nodiscard]] const std::vector<PlanePoint>& vertices() const { return v_; }

 private:
  std::vector<PlanePoint> v_;
  double min_e_, max_e_, min_n_, max_n_;
};

}  // namespace strewn
