#include "footprint/planar.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <stdexcept>

namespace strewn {

PlanarMoments PlanarMoments::of(std::span<const double> east, std::span<const double> north) {
  constexpr std::size_t kBlock = 4096;
  PlanarMoments total;
  for (std::size_t first = 0; first < east.size(); first += kBlock) {
    const std::size_t end = std::min(east.size(), first + kBlock);
    PlanarMoments block;
    block.count_ = end - first;
    double se = 0.0, sn = 0.0;
    for (std::size_t i = first; i < end; ++i) {
      se += east[i];
      sn += north[i];
    }
    block.mean_e_ = se / static_cast<double>(block.count_);
    block.mean_n_ = sn / static_cast<double>(block.count_);
    for (std::size_t i = first; i < end; ++i) {
      const double de = east[i] - block.mean_e_, dn = north[i] - block.mean_n_;
      block.m_ee_ += de * de;
      block.m_en_ += de * dn;
      block.m_nn_ += dn * dn;
    }
    total.merge(block);
  }
  return total;
}

void PlanarMoments::add(double east, double north) {
  // Welford (1962): update the mean, then the co-moments with the old and new deviations.
  ++count_;
  const double n = static_cast<double>(count_);
  const double de = east - mean_e_, dn = north - mean_n_;
  mean_e_ += de / n;
  mean_n_ += dn / n;
  m_ee_ += de * (east - mean_e_);
  m_en_ += de * (north - mean_n_);
  m_nn_ += dn * (north - mean_n_);
}

void PlanarMoments::merge(const PlanarMoments& o) {
  // Chan, Golub and LeVeque (1979): M = M_a + M_b + d d^T n_a n_b / n.
  if (o.count_ == 0) return;
  if (count_ == 0) {
    *this = o;
    return;
  }
  const double na = static_cast<double>(count_), nb = static_cast<double>(o.count_);
  const double n = na + nb;
  const double de = o.mean_e_ - mean_e_, dn = o.mean_n_ - mean_n_;
  m_ee_ += o.m_ee_ + de * de * na * nb / n;
  m_en_ += o.m_en_ + de * dn * na * nb / n;
  m_nn_ += o.m_nn_ + dn * dn * na * nb / n;
  mean_e_ += de * nb / n;
  mean_n_ += dn * nb / n;
  count_ += o.count_;
}

std::array<double, 3> PlanarMoments::covariance() const {
  if (count_ < 2) return {0.0, 0.0, 0.0};
  const double d = static_cast<double>(count_ - 1);
  return {m_ee_ / d, m_en_ / d, m_nn_ / d};
}

namespace {
double cross(const PlanePoint& o, const PlanePoint& a, const PlanePoint& b) {
  return (a.east - o.east) * (b.north - o.north) - (a.north - o.north) * (b.east - o.east);
}
}  // namespace

std::vector<PlanePoint> convex_hull(std::vector<PlanePoint> p) {
  if (p.size() > 64) {
    // Akl-Toussaint: the extreme points in the eight directions bound a convex octagon; a point
    // strictly inside it cannot be a hull vertex.
    std::array<PlanePoint, 8> x{};
    std::array<double, 8> best;
    best.fill(-std::numeric_limits<double>::infinity());
    const double dirs[8][2] = {{1, 0},  {1, 1},   {0, 1},  {-1, 1},
                               {-1, 0}, {-1, -1}, {0, -1}, {1, -1}};
    for (const auto& q : p)
      for (int k = 0; k < 8; ++k) {
        const double s = dirs[k][0] * q.east + dirs[k][1] * q.north;
        if (s > best[k]) {
          best[k] = s;
          x[k] = q;
        }
      }
    std::vector<PlanePoint> ring;  // counter-clockwise by construction of the directions
    for (const auto& q : x)
      if (ring.empty() || q.east != ring.back().east || q.north != ring.back().north)
        ring.push_back(q);
    while (ring.size() > 1 && ring.front().east == ring.back().east &&
           ring.front().north == ring.back().north)
      ring.pop_back();
    if (ring.size() >= 3 && polygon_area(ring) > 0.0) {
      auto strictly_inside = [&](const PlanePoint& q) {
        for (std::size_t i = 0; i < ring.size(); ++i)
          if (cross(ring[i], ring[(i + 1) % ring.size()], q) <= 0.0) return false;
        return true;
      };
      p.erase(std::remove_if(p.begin(), p.end(), strictly_inside), p.end());
    }
  }
  std::sort(p.begin(), p.end(), [](const PlanePoint& a, const PlanePoint& b) {
    return a.east < b.east || (a.east == b.east && a.north < b.north);
  });
  p.erase(std::unique(p.begin(), p.end(),
                      [](const PlanePoint& a, const PlanePoint& b) {
                        return a.east == b.east && a.north == b.north;
                      }),
          p.end());
  if (p.size() < 3) return p;
  std::vector<PlanePoint> h(2 * p.size());
  std::size_t k = 0;
  for (std::size_t i = 0; i < p.size(); ++i) {  // lower chain
    while (k >= 2 && cross(h[k - 2], h[k - 1], p[i]) <= 0.0) --k;
    h[k++] = p[i];
  }
  for (std::size_t i = p.size() - 1, t = k + 1; i > 0; --i) {  // upper chain
    while (k >= t && cross(h[k - 2], h[k - 1], p[i - 1]) <= 0.0) --k;
    h[k++] = p[i - 1];
  }
  h.resize(k - 1);  // the last point repeats the first
  return h;
}

std::vector<PlanePoint> grow_hull(const std::vector<PlanePoint>& hull, double margin) {
  std::vector<PlanePoint> corners;
  corners.reserve(4 * hull.size());
  for (const auto& q : hull)
    for (double se : {-margin, margin})
      for (double sn : {-margin, margin}) corners.push_back({q.east + se, q.north + sn});
  return convex_hull(std::move(corners));
}

std::vector<PlanePoint> bounded_hull(const std::vector<PlanePoint>& hull, std::size_t most) {
  if (hull.size() <= most || most < 3) return hull;
  const std::size_t h = hull.size();
  auto dot = [&](std::size_t i, double ue, double un) {
    return hull[i].east * ue + hull[i].north * un;
  };
  // Support values in directions theta_j = 2 pi j / most, the support vertex advancing
  // counter-clockwise with the direction.
  std::vector<double> support(most);
  std::size_t at = 0;
  for (std::size_t i = 1; i < h; ++i)
    if (dot(i, 1.0, 0.0) > dot(at, 1.0, 0.0)) at = i;
  for (std::size_t j = 0; j < most; ++j) {
    const double theta =
        2.0 * std::numbers::pi * static_cast<double>(j) / static_cast<double>(most);
    const double ue = std::cos(theta), un = std::sin(theta);
    for (std::size_t steps = 0; steps < h && dot((at + 1) % h, ue, un) >= dot(at, ue, un); ++steps)
      at = (at + 1) % h;
    support[j] = dot(at, ue, un);
  }
  // Vertices: where the supporting lines of neighbouring directions meet.
  std::vector<PlanePoint> outer;
  outer.reserve(most);
  for (std::size_t j = 0; j < most; ++j) {
    const std::size_t k = (j + 1) % most;
    const double a = 2.0 * std::numbers::pi * static_cast<double>(j) / static_cast<double>(most);
    const double b = 2.0 * std::numbers::pi * static_cast<double>(k) / static_cast<double>(most);
    // cos a x + sin a y = s_j and cos b x + sin b y = s_k (Cramer's rule; det = sin(b - a)).
    const double det = std::sin(b - a);
    outer.push_back({(support[j] * std::sin(b) - support[k] * std::sin(a)) / det,
                     (std::cos(a) * support[k] - std::cos(b) * support[j]) / det});
  }
  return convex_hull(std::move(outer));
}

double polygon_area(std::span<const PlanePoint> r) {
  double twice = 0.0;
  for (std::size_t i = 0; i < r.size(); ++i) {
    const auto& a = r[i];
    const auto& b = r[(i + 1) % r.size()];
    twice += a.east * b.north - b.east * a.north;
  }
  return 0.5 * twice;
}

ConvexPolygon::ConvexPolygon(std::vector<PlanePoint> v) : v_(std::move(v)) {
  if (v_.size() < 3 || !(polygon_area(v_) > 0.0))
    throw std::invalid_argument("ConvexPolygon needs 3 or more counter-clockwise vertices");
  min_e_ = max_e_ = v_[0].east;
  min_n_ = max_n_ = v_[0].north;
  for (const auto& q : v_) {
    min_e_ = std::min(min_e_, q.east);
    max_e_ = std::max(max_e_, q.east);
    min_n_ = std::min(min_n_, q.north);
    max_n_ = std::max(max_n_, q.north);
  }
}

bool ConvexPolygon::contains(double e, double n) const {
  if (e < min_e_ || e > max_e_ || n < min_n_ || n > max_n_) return false;
  const PlanePoint q{e, n};
  const std::size_t m = v_.size();
  // Outside the wedge at v0 spanned by v1 and v_{m-1}?
  if (cross(v_[0], v_[1], q) < 0.0 || cross(v_[0], v_[m - 1], q) > 0.0) return false;
  // Binary search the fan triangle (v0, v_i, v_{i+1}) holding the direction of q.
  std::size_t low = 1, high = m - 1;
  while (high - low > 1) {
    const std::size_t mid = (low + high) / 2;
    if (cross(v_[0], v_[mid], q) >= 0.0)
      low = mid;
    else
      high = mid;
  }
  return cross(v_[low], v_[low + 1], q) >= 0.0;
}

}  // namespace strewn
