#include "footprint/footprint.hpp"

#include <algorithm>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/tools/roots.hpp>
#include <boost/sort/spreadsort/integer_sort.hpp>
#include <cmath>
#include <limits>
#include <numbers>
#include <stdexcept>

#include <tbb/enumerable_thread_specific.h>
#include <tbb/parallel_for.h>
#include <tbb/task_group.h>

#include "footprint/mixture.hpp"
#include "footprint/ranks.hpp"

namespace strewn {

namespace {
constexpr double kInfinity = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// Hazard polygons keep at most this many vertices (an outer approximation beyond it, within
// 3e-4 of the footprint's width): a footprint on a curve would otherwise have every impact as a
// vertex.
constexpr std::size_t kPolygonVertices = 128;

// The one distance on the plane every figure uses: the containment radii, the rows counted
// outside a zone and the release's weighted figures must round alike, or a sample lying exactly
// at a radius is inside for one and outside for another.
double planar_distance(double de, double dn) {
  return std::sqrt(de * de + dn * dn);
}

// Eigen-decomposition of the symmetric 2x2 covariance {a, b, c} = [[a, b], [b, c]] in closed form.
struct Principal {
  double major = 0.0, minor = 0.0;  // variances along the axes, major >= minor >= 0
  double bearing = 0.0;             // degrees clockwise from north of the major axis, [0, 180)
};
Principal principal_axes(const std::array<double, 3>& cov) {
  const double a = cov[0], b = cov[1], c = cov[2];
  const double mid = 0.5 * (a + c), half = std::hypot(0.5 * (a - c), b);
  Principal p;
  p.major = std::max(0.0, mid + half);
  p.minor = std::max(0.0, mid - half);
  // Major-axis direction (east, north) = (cos t, sin t) with t = atan2(2b, a - c) / 2 from east.
  const double t = 0.5 * std::atan2(2.0 * b, a - c);
  double bearing = 90.0 - t * 180.0 / std::numbers::pi;  // from east-counter-clockwise to bearing
  bearing = std::fmod(bearing, 180.0);
  if (bearing < 0.0) bearing += 180.0;
  p.bearing = bearing;
  return p;
}

// Value at a 1-based rank among n = landed + failed rows, with the failed rows placed at -inf
// (failures_low) or +inf.
double ranked_value(const std::vector<double>& sorted_landed, std::uint64_t failed,
                    std::uint64_t rank, bool failures_low) {
  const std::uint64_t landed = sorted_landed.size();
  if (rank == 0) return -kInfinity;
  if (rank > landed + failed) return kInfinity;
  if (failures_low) return rank <= failed ? -kInfinity : sorted_landed[rank - failed - 1];
  return rank > landed ? kInfinity : sorted_landed[rank - 1];
}

// Quantiles of a signed quantity (downrange, crossrange, time) with two-sided intervals. Failures
// stand at the nearer infinity of each tail, so both tails are conservative.
QuantileEstimate signed_quantile(const std::vector<double>& sorted_landed, std::uint64_t failed,
                                 double q, double confidence) {
  const std::uint64_t n = sorted_landed.size() + failed;
  const bool low = q < 0.5;
  QuantileEstimate e;
  e.probability = q;
  if (n == 0) {
    e.value = e.lower = e.upper = kNaN;
    return e;
  }
  e.value = ranked_value(sorted_landed, failed, quantile_rank(n, q), low);
  const IntervalRanks r = quantile_interval_ranks(n, q, confidence);
  e.lower = ranked_value(sorted_landed, failed, r.lower, low);
  e.upper = ranked_value(sorted_landed, failed, r.upper, low);
  return e;
}

std::vector<double> tail_probabilities(const std::vector<double>& levels) {
  std::vector<double> q{0.5};
  for (double p : levels) {
    q.push_back(0.5 * (1.0 - p));
    q.push_back(0.5 * (1.0 + p));
  }
  std::sort(q.begin(), q.end());
  q.erase(std::unique(q.begin(), q.end()), q.end());
  return q;
}

// Sorted sparse grid of one body's landed impacts. Cells are keyed by their two indices packed
// into one 64-bit word (32 bits each) for a radix sort; impacts farther than 2^31 cells from the
// origin (a grid of millimetres over a long range) take the general sort of index pairs instead,
// never a failure after every flight.
ImpactGrid grid_of(std::span<const double> east, std::span<const double> north, double cell,
                   double objects, std::uint64_t releases) {
  ImpactGrid g;
  g.cell = cell;
  const std::size_t n = east.size();
  std::vector<std::pair<std::int64_t, std::int64_t>> cells(n);
  // An index beyond what 64 bits hold (4e15 km at the smallest cell, 1 mm) is held at the edge.
  constexpr double kLargest = 4e18;
  bool packable = true;
  constexpr std::int64_t kOffset = std::int64_t{1} << 31;
  for (std::size_t i = 0; i < n; ++i) {
    const double e = std::clamp(std::floor(east[i] / cell), -kLargest, kLargest);
    const double o = std::clamp(std::floor(north[i] / cell), -kLargest, kLargest);
    cells[i] = {static_cast<std::int64_t>(e), static_cast<std::int64_t>(o)};
    packable = packable && cells[i].first > -kOffset && cells[i].first < kOffset &&
               cells[i].second > -kOffset && cells[i].second < kOffset;
  }
  if (packable) {
    std::vector<std::uint64_t> keys(n);
    for (std::size_t i = 0; i < n; ++i)
      keys[i] = (static_cast<std::uint64_t>(cells[i].first + kOffset) << 32) |
                static_cast<std::uint64_t>(cells[i].second + kOffset);
    boost::sort::spreadsort::integer_sort(keys.begin(), keys.end());
    for (std::size_t i = 0; i < n; ++i)
      cells[i] = {static_cast<std::int64_t>(keys[i] >> 32) - kOffset,
                  static_cast<std::int64_t>(keys[i] & 0xffffffffULL) - kOffset};
  } else {
    std::sort(cells.begin(), cells.end());
  }
  const double per_hit = releases ? objects / (static_cast<double>(releases) * cell * cell) : kNaN;
  for (std::size_t i = 0; i < n;) {
    std::size_t j = i + 1;
    while (j < n && cells[j] == cells[i]) ++j;
    g.east_index.push_back(cells[i].first);
    g.north_index.push_back(cells[i].second);
    g.count.push_back(j - i);
    g.density.push_back(static_cast<double>(j - i) * per_hit);
    i = j;
  }
  return g;
}

// Merges sorted sparse grids cell by cell (counts and densities add).
ImpactGrid merge_grids(const ImpactGrid& a, const ImpactGrid& b) {
  ImpactGrid m;
  m.cell = a.cell;
  std::size_t i = 0, j = 0;
  auto take = [&](const ImpactGrid& g, std::size_t k) {
    m.east_index.push_back(g.east_index[k]);
    m.north_index.push_back(g.north_index[k]);
    m.count.push_back(g.count[k]);
    m.density.push_back(g.density[k]);
  };
  while (i < a.count.size() || j < b.count.size()) {
    if (j == b.count.size()) {
      take(a, i++);
    } else if (i == a.count.size()) {
      take(b, j++);
    } else {
      const auto ka = std::make_pair(a.east_index[i], a.north_index[i]);
      const auto kb = std::make_pair(b.east_index[j], b.north_index[j]);
      if (ka < kb) {
        take(a, i++);
      } else if (kb < ka) {
        take(b, j++);
      } else {
        take(a, i++);
        m.count.back() += b.count[j];
        m.density.back() += b.density[j];
        ++j;
      }
    }
  }
  return m;
}

// The correlation ratio (Pearson 1903) of each outcome's mid-ranks over the categories of
// `column`: eta = sqrt(sum_g n_g (mean_g - mean)^2 / sum (r - mean)^2), in [0, 1]; NaN when there
// are fewer than two categories or an outcome is constant.
void correlation_ratios(std::span<const double> column,
                        std::span<const std::span<const double>> outcomes, std::span<double> out) {
  const std::size_t n = column.size();
  std::vector<std::uint32_t> order(n);
  for (std::size_t k = 0; k < n; ++k) order[k] = static_cast<std::uint32_t>(k);
  std::stable_sort(order.begin(), order.end(),
                   [&](std::uint32_t a, std::uint32_t b) { return column[a] < column[b]; });
  for (std::size_t o = 0; o < outcomes.size(); ++o) {
    const auto& r = outcomes[o];
    const double mean = 0.5 * (static_cast<double>(n) + 1.0);  // of mid-ranks 1..n
    double total = 0.0, between = 0.0;
    std::size_t groups = 0;
    for (std::size_t a = 0; a < n;) {
      std::size_t b = a;
      double sum = 0.0;
      while (b < n && column[order[b]] == column[order[a]]) sum += r[order[b++]];
      const double size = static_cast<double>(b - a), group_mean = sum / size;
      between += size * (group_mean - mean) * (group_mean - mean);
      ++groups;
      a = b;
    }
    for (std::size_t k = 0; k < n; ++k) total += (r[k] - mean) * (r[k] - mean);
    out[o] = groups >= 2 && total > 0.0 ? std::sqrt(between / total) : kNaN;
  }
}

// Whether an input can move the impacts of group `group`: every input but another body's own
// (named "<other body>.", as "crate.mass" cannot move the straps).
bool concerns(const std::string& input, const std::string& group,
              const std::vector<std::string>& bodies) {
  for (const auto& body : bodies)
    if (body != group && input.size() > body.size() && input.compare(0, body.size(), body) == 0 &&
        input[body.size()] == '.')
      return false;
  return true;
}

struct GroupRows {
  std::vector<std::uint32_t> landed;  // row indices, in row order
  std::uint64_t rows = 0;
};

// Rank buffers per thread, reused by every task that thread runs (a fresh buffer per task would
// spend more time faulting in pages than sorting).
using ScratchPerThread = tbb::enumerable_thread_specific<RankScratch>;

// The landed impacts of a group and what every section of its statistics reads.
struct GroupImpacts {
  const ImpactTable& table;
  const FootprintSettings& settings;
  const GroupRows& rows;
  std::vector<double> e, n;  // east and north of the landed rows, in row order
  std::size_t m = 0;         // landed rows
};

// Containment about the centre; failed rows at +inf.
void containment_section(const GroupImpacts& in, GroupFootprint& f, std::vector<double>& r_dist,
                         RankScratch& scratch) {
  const auto& [t, s, g, e, n, m] = in;
  std::vector<double> sorted, distance(m);
  for (std::size_t k = 0; k < m; ++k) {
    distance[k] = planar_distance(e[k] - f.centre.east, n[k] - f.centre.north);
  }
  sort_and_rank(distance, &sorted, r_dist, scratch);
  sorted.resize(g.rows, kInfinity);
  f.containment = containment_sorted(sorted, s.levels, s.confidence);
}

// CEP: the median distance about the mean impact point, and its Gaussian counterpart.
void circular_error_section(const GroupImpacts& in, GroupFootprint& f) {
  const auto& [t, s, g, e, n, m] = in;
  std::vector<double> about_mean(m);
  for (std::size_t k = 0; k < m; ++k) {
    about_mean[k] = planar_distance(e[k] - f.mean.east, n[k] - f.mean.north);
  }
  about_mean.resize(g.rows, kInfinity);
  if (g.rows == 0) {
    f.cep = kNaN;
  } else {
    const std::uint64_t rank = quantile_rank(g.rows, 0.5);
    std::nth_element(about_mean.begin(), about_mean.begin() + static_cast<long>(rank - 1),
                     about_mean.end());
    f.cep = about_mean[rank - 1];
  }
  f.cep_gaussian = m >= 2 ? gaussian_circle_radius(f.covariance, 0.5) : kNaN;
}

// The squared scale of the dispersion ellipse holding `level` of a Gaussian footprint: the
// chi-square quantile with 2 degrees of freedom, -2 ln(1 - level). Bodies and releases count
// their impacts against this same number.
double ellipse_scale2(double level) {
  return -2.0 * std::log1p(-level);
}

// The dispersion ellipse of `level` (Gaussian approximation) on the principal axes of the
// covariance; without a spread to measure (fewer than two landed rows), its axes are NaN. The
// share of the rows counted inside is the caller's.
DispersionEllipse gaussian_ellipse(double level, const Principal& axes, bool spread) {
  DispersionEllipse el;
  el.level = level;
  el.scale = std::sqrt(ellipse_scale2(level));
  el.semi_major = el.scale * std::sqrt(axes.major);
  el.semi_minor = el.scale * std::sqrt(axes.minor);
  el.bearing = axes.bearing;
  if (!spread) el.semi_major = el.semi_minor = el.bearing = kNaN;
  return el;
}

// Ellipses (Gaussian approximation) and the share of the rows counted inside each, in one pass.
void ellipse_section(const GroupImpacts& in, const Principal& axes, GroupFootprint& f) {
  const auto& [t, s, g, e, n, m] = in;
  const double a = f.covariance[0], b = f.covariance[1], c = f.covariance[2];
  const double det = a * c - b * b;
  std::vector<std::uint64_t> inside(s.levels.size(), 0);
  std::vector<double> scale2(s.levels.size());
  for (std::size_t l = 0; l < s.levels.size(); ++l) scale2[l] = ellipse_scale2(s.levels[l]);
  if (det > 0.0)
    for (std::size_t k = 0; k < m; ++k) {
      const double de = e[k] - f.mean.east, dn = n[k] - f.mean.north;
      const double d2 = (c * de * de - 2.0 * b * de * dn + a * dn * dn) / det;
      for (std::size_t l = 0; l < scale2.size(); ++l) inside[l] += d2 <= scale2[l] ? 1 : 0;
    }
  for (std::size_t l = 0; l < s.levels.size(); ++l) {
    DispersionEllipse el = gaussian_ellipse(s.levels[l], axes, m >= 2);
    el.counted = g.rows ? static_cast<double>(inside[l]) / static_cast<double>(g.rows) : kNaN;
    f.ellipses.push_back(el);
  }
}

// Downrange (along the bearing) and crossrange (to its right) about the centre.
void range_section(const GroupImpacts& in, GroupFootprint& f, std::vector<double>& r_down,
                   std::vector<double>& r_cross, RankScratch& scratch) {
  const auto& [t, s, g, e, n, m] = in;
  const double th = s.downrange_bearing * std::numbers::pi / 180.0;
  const double ue = std::sin(th), un = std::cos(th);  // downrange unit vector
  std::vector<double> down(m), cross(m), sd, sc;
  for (std::size_t k = 0; k < m; ++k) {
    const double de = e[k] - f.centre.east, dn = n[k] - f.centre.north;
    down[k] = de * ue + dn * un;
    cross[k] = de * un - dn * ue;
  }
  sort_and_rank(down, &sd, r_down, scratch);
  sort_and_rank(cross, &sc, r_cross, scratch);
  for (double q : tail_probabilities(s.levels)) {
    f.downrange.push_back(signed_quantile(sd, f.failed, q, s.confidence));
    f.crossrange.push_back(signed_quantile(sc, f.failed, q, s.confidence));
  }
}

// Hazard polygons: the convex hull of the k impacts nearest the mean in Mahalanobis distance,
// k the rank of the distribution-free upper bound at the level, grown by the margin. The k
// impacts it is built on lie inside by construction; every other impact is tested.
void polygon_section(const GroupImpacts& in, const Principal& axes, GroupFootprint& f,
                     RankScratch& scratch) {
  // Named references, not a structured binding: the lambdas below capture them.
  const FootprintSettings& s = in.settings;
  const GroupRows& g = in.rows;
  const std::vector<double>& e = in.e;
  const std::vector<double>& n = in.n;
  const std::size_t m = in.m;
  // Mahalanobis distances (squared) about the mean, with the covariance made positive definite
  // by the polygon margin when the impacts are degenerate (all on a line or a point).
  const double floor =
      std::max(1e-12 * (axes.major + axes.minor), s.polygon_margin * s.polygon_margin);
  const double a = f.covariance[0] + floor, b = f.covariance[1], c = f.covariance[2] + floor;
  const double det = a * c - b * b;
  auto& keyed = scratch.keyed;
  keyed.resize(m);
  for (std::size_t k = 0; k < m; ++k) {
    const double de = e[k] - f.mean.east, dn = n[k] - f.mean.north;
    keyed[k] = {(c * de * de - 2.0 * b * de * dn + a * dn * dn) / det,
                static_cast<std::uint32_t>(k)};
  }
  // Rank k of each level, and why a level has none.
  f.polygons.resize(s.levels.size());
  std::vector<std::size_t> order;  // determined levels, by rank ascending
  for (std::size_t l = 0; l < s.levels.size(); ++l) {
    HazardPolygon& poly = f.polygons[l];
    poly.level = s.levels[l];
    poly.rank = upper_bound_rank(g.rows, poly.level, s.confidence);
    if (poly.rank > g.rows) {
      poly.samples_needed = samples_for_bound(poly.level, s.confidence);
      poly.reason = "too few samples for the bound";
    } else if (poly.rank > m) {
      poly.reason = "failed flights reach the bound (they count as landing infinitely far)";
    } else {
      order.push_back(l);
    }
  }
  std::sort(order.begin(), order.end(),
            [&](std::size_t x, std::size_t y) { return f.polygons[x].rank < f.polygons[y].rank; });
  // Selections from the largest rank down make every nearest set a prefix of keyed.
  auto by_distance = [](const auto& x, const auto& y) { return x.first < y.first; };
  std::size_t prefix = m;
  for (auto l = order.rbegin(); l != order.rend(); ++l) {
    const auto k = static_cast<std::size_t>(f.polygons[*l].rank);
    if (k < prefix) {
      std::nth_element(keyed.begin(), keyed.begin() + static_cast<long>(k),
                       keyed.begin() + static_cast<long>(prefix), by_distance);
      prefix = k;
    }
  }
  // Hulls from the smallest set up: the hull of a larger prefix is the hull of the smaller
  // prefix's hull vertices and the points added, so each point enters one hull computation.
  std::vector<PlanePoint> hull;
  std::size_t done = 0;
  for (std::size_t l : order) {
    HazardPolygon& poly = f.polygons[l];
    const auto k = static_cast<std::size_t>(poly.rank);
    std::vector<PlanePoint> candidates = hull;
    candidates.reserve(hull.size() + (k - done));
    for (std::size_t j = done; j < k; ++j)
      candidates.push_back({e[keyed[j].second], n[keyed[j].second]});
    // Bounded before it seeds the next level: impacts on a curve are all hull vertices, and the
    // outer approximation only ever adds area (docs/statistics.md).
    hull = bounded_hull(convex_hull(std::move(candidates)), kPolygonVertices);
    done = k;
    poly.ring = grow_hull(hull, s.polygon_margin);
    const ConvexPolygon convex(poly.ring);
    std::uint64_t inside = k;  // the points the hull was built on lie inside it
    for (std::size_t j = k; j < m; ++j)
      inside += convex.contains(e[keyed[j].second], n[keyed[j].second]) ? 1 : 0;
    poly.coverage = static_cast<double>(inside) / static_cast<double>(g.rows);
    poly.area = polygon_area(poly.ring);
    poly.determined = true;
  }
}

// Speed and energy: upper quantiles with one-sided bounds (failures at +inf); exceedance.
void energy_section(const GroupImpacts& in, GroupFootprint& f, std::vector<double>& r_energy,
                    RankScratch& scratch) {
  const auto& [t, s, g, e, n, m] = in;
  std::vector<double> sorted, values(m);
  for (std::size_t k = 0; k < m; ++k) values[k] = t.speed[g.landed[k]];
  sort_doubles(values, scratch);
  values.resize(g.rows, kInfinity);
  f.speed = containment_sorted(values, s.levels, s.confidence);

  std::uint64_t above = f.failed;
  values.resize(m);
  for (std::size_t k = 0; k < m; ++k) {
    values[k] = t.energy[g.landed[k]];
    if (values[k] > s.energy_threshold) ++above;
  }
  sort_and_rank(values, &sorted, r_energy, scratch);
  sorted.resize(g.rows, kInfinity);
  f.energy = containment_sorted(sorted, s.levels, s.confidence);
  f.energy_exceedance = {s.energy_threshold,
                         above,
                         g.rows,
                         g.rows ? static_cast<double>(above) / static_cast<double>(g.rows) : kNaN,
                         clopper_pearson_lower(above, g.rows, s.confidence),
                         clopper_pearson_upper(above, g.rows, s.confidence)};

  // Time of flight over the landed rows.
  values.resize(m);
  for (std::size_t k = 0; k < m; ++k) values[k] = t.time[g.landed[k]];
  sort_doubles(values, scratch);
  f.time_min = m ? values.front() : kNaN;
  f.time_max = m ? values.back() : kNaN;
  std::vector<double> qs{0.5};
  for (double p : s.levels) qs.push_back(p);
  std::sort(qs.begin(), qs.end());
  qs.erase(std::unique(qs.begin(), qs.end()), qs.end());
  for (double q : qs) f.time.push_back(signed_quantile(values, 0, q, s.confidence));
}

// Spearman sensitivities over the landed rows (correlation ratios for categorical inputs): each
// input of the group against the ranks of its downrange, crossrange, distance and energy.
void sensitivity_section(const GroupImpacts& in, const std::string& name, GroupFootprint& f,
                         const std::array<std::span<const double>, 4>& outputs,
                         ScratchPerThread& scratches) {
  // Named references, not a structured binding: the lambdas below capture them.
  const ImpactTable& t = in.table;
  const FootprintSettings& s = in.settings;
  const GroupRows& g = in.rows;
  const std::size_t m = in.m;
  if (m >= 3) {
    f.sensitivity.resize(t.inputs.size());
    tbb::parallel_for(std::size_t{0}, t.inputs.size(), [&](std::size_t d) {
      if (!concerns(t.input_names[d], name, s.body_names)) return;  // removed below
      RankScratch& scratch = scratches.local();
      std::vector<double> r_input(m), column(m);
      for (std::size_t k = 0; k < m; ++k) column[k] = t.inputs[d][g.landed[k]];
      std::array<double, 4> rho{};
      const bool categorical = d < t.categorical.size() && t.categorical[d];
      if (categorical) {
        correlation_ratios(column, outputs, rho);
      } else {
        mid_ranks(column, r_input, scratch);
        rank_correlations(r_input, outputs, rho);
      }
      f.sensitivity[d] = {t.input_names[d], rho[0], rho[1], rho[2], rho[3], categorical};
    });
    std::erase_if(f.sensitivity, [](const InputSensitivity& x) { return x.input.empty(); });
    // Strongest first: the input that moves the impact most leads (ties keep the inputs' order).
    std::stable_sort(f.sensitivity.begin(), f.sensitivity.end(),
                     [](const auto& a, const auto& b) { return a.strength() > b.strength(); });
  } else {
    for (std::size_t d = 0; d < t.input_names.size(); ++d)
      if (concerns(t.input_names[d], name, s.body_names))
        f.sensitivity.push_back({t.input_names[d], kNaN, kNaN, kNaN, kNaN,
                                 d < t.categorical.size() && t.categorical[d]});
  }
}

GroupFootprint compute_group(const ImpactTable& t, const FootprintSettings& s, const GroupRows& g,
                             const std::string& name, PlanePoint nominal, double objects,
                             ScratchPerThread& scratches) {
  GroupFootprint f;
  f.name = name;
  f.objects_per_release = objects;
  f.rows = g.rows;
  f.landed = g.landed.size();
  f.failed = g.rows - f.landed;
  const std::size_t m = g.landed.size();
  GroupImpacts in{t, s, g, std::vector<double>(m), std::vector<double>(m), m};
  for (std::size_t k = 0; k < m; ++k) {
    in.e[k] = t.east[g.landed[k]];
    in.n[k] = t.north[g.landed[k]];
  }
  const PlanarMoments moments = PlanarMoments::of(in.e, in.n);
  f.mean = m ? moments.mean() : PlanePoint{kNaN, kNaN};
  f.covariance = moments.covariance();
  f.centre = s.centre == CentreRule::mean    ? f.mean
             : s.centre == CentreRule::point ? s.centre_point
                                             : nominal;
  // Each column that needs both its order statistics and its ranks is sorted once for both. The
  // sections are independent tasks (TBB), each writing its own figures: the result is the same on
  // any number of threads.
  std::vector<double> r_dist(m), r_down(m), r_cross(m), r_energy(m);
  const Principal axes = principal_axes(f.covariance);
  const bool place = (s.sections & kPlaceAndSpread) != 0, shapes = (s.sections & kShapes) != 0;
  tbb::task_group tasks;
  if (place) tasks.run([&] { containment_section(in, f, r_dist, scratches.local()); });
  if (shapes) tasks.run([&] { circular_error_section(in, f); });
  if (shapes) tasks.run([&] { ellipse_section(in, axes, f); });
  if (place) tasks.run([&] { range_section(in, f, r_down, r_cross, scratches.local()); });
  if (shapes) tasks.run([&] { polygon_section(in, axes, f, scratches.local()); });
  if (place) tasks.run([&] { energy_section(in, f, r_energy, scratches.local()); });
  tasks.wait();
  // A half without the place and spread leaves the sensitivities to the other (merge_sections).
  if (place) sensitivity_section(in, name, f, {r_down, r_cross, r_dist, r_energy}, scratches);
  return f;
}

// Probability of landing outside `radius` about the group's centre, from the same rows.
std::uint64_t count_outside(const ImpactTable& t, const GroupRows& g, PlanePoint centre,
                            double radius) {
  std::uint64_t outside = g.rows - g.landed.size();
  for (std::uint32_t row : g.landed)
    if (planar_distance(t.east[row] - centre.east, t.north[row] - centre.north) > radius) ++outside;
  return outside;
}
std::uint64_t count_above(const ImpactTable& t, const GroupRows& g, double limit) {
  std::uint64_t above = g.rows - g.landed.size();
  for (std::uint32_t row : g.landed)
    if (t.energy[row] > limit) ++above;
  return above;
}

// A rule held against a share with its bounds: within, exceeds or undetermined.
RuleCheck judge_share(std::string rule, std::string group, double threshold, double accepted,
                      std::uint64_t count, std::uint64_t rows, const MixtureColumn::Share& share,
                      double confidence, std::uint64_t samples_needed) {
  RuleCheck r;
  r.rule = std::move(rule);
  r.group = std::move(group);
  r.threshold = threshold;
  r.accepted = accepted;
  r.count = count;
  r.rows = rows;
  r.confidence = confidence;
  r.value = share.value;
  r.lower = share.lower;
  r.upper = share.upper;
  r.status = r.upper <= accepted  ? RuleStatus::within
             : r.lower > accepted ? RuleStatus::exceeds
                                  : RuleStatus::undetermined;
  if (r.status == RuleStatus::undetermined) r.samples_needed = samples_needed;
  return r;
}

// The same for a count of one body's rows: Clopper-Pearson bounds, and the smallest sample count
// that would decide the rule if the observed share held.
RuleCheck judge(std::string rule, std::string group, double threshold, double accepted,
                std::uint64_t count, std::uint64_t rows, double confidence) {
  MixtureColumn::Share share;
  share.value = rows ? static_cast<double>(count) / static_cast<double>(rows) : kNaN;
  share.lower = clopper_pearson_lower(count, rows, confidence);
  share.upper = clopper_pearson_upper(count, rows, confidence);
  std::uint64_t needed = 0;
  const double value = share.value;
  auto decides = [&](std::uint64_t n) {
    const auto x = static_cast<std::uint64_t>(std::llround(value * static_cast<double>(n)));
    return value < accepted ? clopper_pearson_upper(x, n, confidence) <= accepted
                            : clopper_pearson_lower(x, n, confidence) > accepted;
  };
  if (value != accepted && rows > 0 && !(share.upper <= accepted || share.lower > accepted))
    needed = smallest_count(rows, decides);
  return judge_share(std::move(rule), std::move(group), threshold, accepted, count, rows, share,
                     confidence, needed);
}

// A column of the landed rows of several bodies as a mixture (weights: objects per release).
template <class Value>
MixtureColumn mixture_of(const std::vector<GroupRows>& bodies, const FootprintSettings& s,
                         Value value) {
  std::vector<std::vector<double>> landed(bodies.size());
  std::vector<std::uint64_t> failed(bodies.size());
  for (std::size_t b = 0; b < bodies.size(); ++b) {
    landed[b].reserve(bodies[b].landed.size());
    for (std::uint32_t row : bodies[b].landed) landed[b].push_back(value(row));
    failed[b] = bodies[b].rows - bodies[b].landed.size();
  }
  return MixtureColumn(std::move(landed), failed, s.body_counts);
}

// The rows of every body of a release and each body's weight per row (its objects per release
// over its rows), what every section of the release's statistics reads.
struct ReleaseImpacts {
  const ImpactTable& table;
  const FootprintSettings& settings;
  const std::vector<GroupRows>& bodies;
  std::vector<double> row_weight;
};

// A signed quantile of a mixture with its two-sided interval (each end at `end`); failures lie
// at the nearer infinity of each tail.
QuantileEstimate signed_estimate(const MixtureColumn& m, double q, double end) {
  const bool low = q < 0.5;
  return QuantileEstimate{q, m.quantile(q, low), m.lower_bound(q, end, low),
                          m.upper_bound(q, end, low)};
}

// Weighted mean and covariance of the landed rows, two passes in row order (the divisor
// m / (m - 1) makes equal weights give the sample covariance).
void release_moments(const ReleaseImpacts& in, GroupFootprint& f) {
  const auto& [t, s, bodies, row_weight] = in;
  double sw = 0.0, se = 0.0, sn = 0.0;
  for (std::size_t b = 0; b < bodies.size(); ++b)
    for (std::uint32_t row : bodies[b].landed) {
      sw += row_weight[b];
      se += row_weight[b] * t.east[row];
      sn += row_weight[b] * t.north[row];
    }
  f.mean = sw > 0.0 ? PlanePoint{se / sw, sn / sw} : PlanePoint{kNaN, kNaN};
  double cee = 0.0, cen = 0.0, cnn = 0.0;
  for (std::size_t b = 0; b < bodies.size(); ++b)
    for (std::uint32_t row : bodies[b].landed) {
      const double de = t.east[row] - f.mean.east, dn = t.north[row] - f.mean.north;
      cee += row_weight[b] * de * de;
      cen += row_weight[b] * de * dn;
      cnn += row_weight[b] * dn * dn;
    }
  if (f.landed >= 2) {
    const double scale = static_cast<double>(f.landed) / static_cast<double>(f.landed - 1) / sw;
    f.covariance = {cee * scale, cen * scale, cnn * scale};
  }
}

// Containment of one object of the release about the centre.
void release_containment(const ReleaseImpacts& in, GroupFootprint& f) {
  // Named references, not a structured binding: the lambdas below capture them.
  const ImpactTable& t = in.table;
  const FootprintSettings& s = in.settings;
  const std::vector<GroupRows>& bodies = in.bodies;
  const MixtureColumn distance = mixture_of(bodies, s, [&](std::uint32_t row) {
    return planar_distance(t.east[row] - f.centre.east, t.north[row] - f.centre.north);
  });
  for (double p : s.levels) f.containment.push_back(distance.containment(p, s.confidence));
}

// Downrange (along the bearing) and crossrange (to its right) about the centre.
void release_ranges(const ReleaseImpacts& in, GroupFootprint& f, double end) {
  // Named references, not a structured binding: the lambdas below capture them.
  const ImpactTable& t = in.table;
  const FootprintSettings& s = in.settings;
  const std::vector<GroupRows>& bodies = in.bodies;
  const double th = s.downrange_bearing * std::numbers::pi / 180.0;
  const double ue = std::sin(th), un = std::cos(th);
  const MixtureColumn down = mixture_of(bodies, s, [&](std::uint32_t row) {
    return (t.east[row] - f.centre.east) * ue + (t.north[row] - f.centre.north) * un;
  });
  const MixtureColumn cross = mixture_of(bodies, s, [&](std::uint32_t row) {
    return (t.east[row] - f.centre.east) * un - (t.north[row] - f.centre.north) * ue;
  });
  for (double q : tail_probabilities(s.levels)) {
    f.downrange.push_back(signed_estimate(down, q, end));
    f.crossrange.push_back(signed_estimate(cross, q, end));
  }
}

// Speed and energy: upper quantiles with their bounds; exceedance; the time of flight.
void release_energy_and_time(const ReleaseImpacts& in, GroupFootprint& f, double end) {
  // Named references, not a structured binding: the lambdas below capture them.
  const ImpactTable& t = in.table;
  const FootprintSettings& s = in.settings;
  const std::vector<GroupRows>& bodies = in.bodies;
  const MixtureColumn speed =
      mixture_of(bodies, s, [&](std::uint32_t row) { return t.speed[row]; });
  const MixtureColumn energy =
      mixture_of(bodies, s, [&](std::uint32_t row) { return t.energy[row]; });
  for (double p : s.levels) {
    f.speed.push_back(speed.containment(p, s.confidence));
    f.energy.push_back(energy.containment(p, s.confidence));
  }
  std::uint64_t above = f.failed;
  for (const auto& g : bodies)
    for (std::uint32_t row : g.landed) above += t.energy[row] > s.energy_threshold ? 1 : 0;
  const MixtureColumn::Share x = energy.share_above(s.energy_threshold, s.confidence);
  f.energy_exceedance = {s.energy_threshold, above, f.rows, x.value, x.lower, x.upper};
  // Time of flight over the landed rows (no failures among them).
  std::vector<GroupRows> landed_only = bodies;
  for (auto& g : landed_only) g.rows = g.landed.size();
  const MixtureColumn time =
      mixture_of(landed_only, s, [&](std::uint32_t row) { return t.time[row]; });
  f.time_min = kNaN;
  f.time_max = kNaN;
  for (const auto& g : bodies)
    for (std::uint32_t row : g.landed) {
      if (!(t.time[row] >= f.time_min)) f.time_min = t.time[row];
      if (!(t.time[row] <= f.time_max)) f.time_max = t.time[row];
    }
  std::vector<double> qs{0.5};
  for (double p : s.levels) qs.push_back(p);
  std::sort(qs.begin(), qs.end());
  qs.erase(std::unique(qs.begin(), qs.end()), qs.end());
  for (double q : qs) {
    QuantileEstimate e = signed_estimate(time, q, end);
    if (f.landed == 0) e.value = e.lower = e.upper = kNaN;
    f.time.push_back(e);
  }
}

// CEP about the mean, and the dispersion ellipses with the weighted share of the rows inside.
void release_ellipses(const ReleaseImpacts& in, const Principal& axes, GroupFootprint& f) {
  // Named references, not a structured binding: the lambdas below capture them.
  const ImpactTable& t = in.table;
  const FootprintSettings& s = in.settings;
  const std::vector<GroupRows>& bodies = in.bodies;
  const std::vector<double>& row_weight = in.row_weight;
  const MixtureColumn about_mean = mixture_of(bodies, s, [&](std::uint32_t row) {
    return planar_distance(t.east[row] - f.mean.east, t.north[row] - f.mean.north);
  });
  f.cep = f.rows ? about_mean.quantile(0.5, false) : kNaN;
  f.cep_gaussian = f.landed >= 2 ? gaussian_circle_radius(f.covariance, 0.5) : kNaN;
  // Ellipses (Gaussian approximation), with the weighted share of the rows inside.
  const double a = f.covariance[0], b = f.covariance[1], c = f.covariance[2];
  const double det = a * c - b * b;
  for (double level : s.levels) {
    DispersionEllipse el = gaussian_ellipse(level, axes, f.landed >= 2);
    // The same squared scale as a body's ellipse counts against (not scale * scale, which
    // rounds differently).
    const double scale2 = ellipse_scale2(level);
    double inside = 0.0;
    if (det > 0.0)
      for (std::size_t k = 0; k < bodies.size(); ++k)
        for (std::uint32_t row : bodies[k].landed) {
          const double de = t.east[row] - f.mean.east, dn = t.north[row] - f.mean.north;
          if ((c * de * de - 2.0 * b * de * dn + a * dn * dn) / det <= scale2)
            inside += row_weight[k];
        }
    el.counted = f.objects_per_release > 0.0 ? inside / f.objects_per_release : kNaN;
    f.ellipses.push_back(el);
  }
}

// Hazard polygons: as a body's, with the number of nearest impacts set by the mixture's bound of
// the Mahalanobis distance, and the coverage weighted.
void release_polygons(const ReleaseImpacts& in, const Principal& axes, GroupFootprint& f) {
  // Named references, not a structured binding: the lambdas below capture them.
  const ImpactTable& t = in.table;
  const FootprintSettings& s = in.settings;
  const std::vector<GroupRows>& bodies = in.bodies;
  const std::vector<double>& row_weight = in.row_weight;
  const double floor =
      std::max(1e-12 * (axes.major + axes.minor), s.polygon_margin * s.polygon_margin);
  const double a = f.covariance[0] + floor, b = f.covariance[1], c = f.covariance[2] + floor;
  const double det = a * c - b * b;
  auto mahalanobis = [&](std::uint32_t row) {
    const double de = t.east[row] - f.mean.east, dn = t.north[row] - f.mean.north;
    return (c * de * de - 2.0 * b * de * dn + a * dn * dn) / det;
  };
  const MixtureColumn distance = mixture_of(bodies, s, mahalanobis);
  std::vector<std::pair<double, std::uint32_t>> keyed;  // (distance, body)
  std::vector<std::uint32_t> row_of;
  for (std::size_t k = 0; k < bodies.size(); ++k)
    for (std::uint32_t row : bodies[k].landed) {
      keyed.push_back({mahalanobis(row), static_cast<std::uint32_t>(keyed.size())});
      row_of.push_back(row);
    }
  std::vector<std::uint16_t> body_of(keyed.size());
  for (std::size_t k = 0, at = 0; k < bodies.size(); ++k)
    for (std::size_t j = 0; j < bodies[k].landed.size(); ++j)
      body_of[at++] = static_cast<std::uint16_t>(k);
  std::sort(keyed.begin(), keyed.end());
  std::vector<PlanePoint> hull;
  std::size_t done = 0;
  for (double level : s.levels) {
    HazardPolygon poly;
    poly.level = level;
    const double reach = distance.upper_bound(level, s.confidence, false);
    if (!std::isfinite(reach)) {
      if (distance.enough_for_bound(level, s.confidence)) {
        poly.reason = "failed flights reach the bound (they count as landing infinitely far)";
      } else {
        poly.samples_needed = distance.samples_needed(level, s.confidence);
        poly.reason = "too few samples for the bound";
      }
      f.polygons.push_back(std::move(poly));
      continue;
    }
    const auto k = static_cast<std::size_t>(
        std::upper_bound(keyed.begin(), keyed.end(),
                         std::pair{reach, std::numeric_limits<std::uint32_t>::max()}) -
        keyed.begin());
    poly.rank = k;
    std::vector<PlanePoint> candidates = k >= done ? hull : std::vector<PlanePoint>{};
    for (std::size_t j = k >= done ? done : 0; j < k; ++j) {
      const std::uint32_t row = row_of[keyed[j].second];
      candidates.push_back({t.east[row], t.north[row]});
    }
    hull = bounded_hull(convex_hull(std::move(candidates)), kPolygonVertices);
    done = k;
    poly.ring = grow_hull(hull, s.polygon_margin);
    const ConvexPolygon convex(poly.ring);
    double inside = 0.0;
    for (std::size_t j = 0; j < keyed.size(); ++j) {
      const std::uint32_t row = row_of[keyed[j].second];
      if (j < k || convex.contains(t.east[row], t.north[row]))
        inside += row_weight[body_of[keyed[j].second]];
    }
    poly.coverage = inside / f.objects_per_release;
    poly.area = polygon_area(poly.ring);
    poly.determined = true;
    f.polygons.push_back(std::move(poly));
  }
}

// "all" of several bodies: one object of a release (footprint/mixture.hpp). Its rows are every
// body's, each weighted by the body's objects per release over the body's rows; estimates are
// the weighted ones, bounds by Boole's inequality over the bodies; one centre for all bodies.
GroupFootprint compute_release_group(const ImpactTable& t, const FootprintSettings& s,
                                     const std::vector<GroupRows>& bodies, PlanePoint nominal) {
  GroupFootprint f;
  f.name = "all";
  ReleaseImpacts in{t, s, bodies, std::vector<double>(bodies.size())};
  for (std::size_t b = 0; b < bodies.size(); ++b) {
    f.objects_per_release += s.body_counts[b];
    f.rows += bodies[b].rows;
    f.landed += bodies[b].landed.size();
    in.row_weight[b] =
        bodies[b].rows ? s.body_counts[b] / static_cast<double>(bodies[b].rows) : 0.0;
  }
  f.failed = f.rows - f.landed;
  release_moments(in, f);
  f.centre = s.centre == CentreRule::mean    ? f.mean
             : s.centre == CentreRule::point ? s.centre_point
                                             : nominal;
  const bool place = (s.sections & kPlaceAndSpread) != 0, shapes = (s.sections & kShapes) != 0;
  const double end = 0.5 * (1.0 + s.confidence);  // each end of a two-sided interval
  const Principal axes = principal_axes(f.covariance);
  tbb::task_group tasks;
  if (place) tasks.run([&] { release_containment(in, f); });
  if (place) tasks.run([&] { release_ranges(in, f, end); });
  if (place) tasks.run([&] { release_energy_and_time(in, f, end); });
  if (shapes) tasks.run([&] { release_ellipses(in, axes, f); });
  if (shapes) tasks.run([&] { release_polygons(in, axes, f); });
  tasks.wait();
  return f;
}
}  // namespace

double InputSensitivity::strength() const {
  double most = 0.0;
  for (double v : {downrange, crossrange, distance, energy})
    if (std::isfinite(v)) most = std::max(most, std::abs(v));
  return most;
}

double Footprint::widest_relative_width() const {
  double widest = 0.0;
  for (const auto& g : groups)
    for (const auto& c : g.containment) widest = std::max(widest, c.relative_width());
  return widest;
}

void merge_sections(Footprint& shapes, const Footprint& place_and_spread) {
  if (shapes.groups.size() != place_and_spread.groups.size())
    throw std::invalid_argument("merge_sections: the halves have different groups");
  for (std::size_t k = 0; k < shapes.groups.size(); ++k) {
    GroupFootprint& into = shapes.groups[k];
    const GroupFootprint& from = place_and_spread.groups[k];
    into.containment = from.containment;
    into.downrange = from.downrange;
    into.crossrange = from.crossrange;
    into.speed = from.speed;
    into.energy = from.energy;
    into.time = from.time;
    into.time_min = from.time_min;
    into.time_max = from.time_max;
    into.energy_exceedance = from.energy_exceedance;
    into.sensitivity = from.sensitivity;
  }
}

double gaussian_circle_radius(const std::array<double, 3>& covariance, double p) {
  const Principal axes = principal_axes(covariance);
  const double s1 = std::sqrt(axes.major), s2 = std::sqrt(axes.minor);
  if (!(s1 > 0.0)) return 0.0;
  const boost::math::normal_distribution<double> unit;
  // P[R <= r] = 2 int_0^r phi(x / s1) / s1 (2 Phi(sqrt(r^2 - x^2) / s2) - 1) dx.
  auto probability = [&](double r) {
    if (!(s2 > 0.0)) return 2.0 * boost::math::cdf(unit, r / s1) - 1.0;
    auto integrand = [&](double x) {
      const double y = std::sqrt(std::max(0.0, r * r - x * x)) / s2;
      return boost::math::pdf(unit, x / s1) / s1 * (2.0 * boost::math::cdf(unit, y) - 1.0);
    };
    return 2.0 * boost::math::quadrature::gauss_kronrod<double, 61>::integrate(integrand, 0.0, r, 8,
                                                                               1e-12);
  };
  std::uintmax_t iterations = 200;
  const auto root = boost::math::tools::toms748_solve(
      [&](double r) { return probability(r) - p; }, 0.0, 40.0 * s1,
      boost::math::tools::eps_tolerance<double>(48), iterations);
  return 0.5 * (root.first + root.second);
}

// The rows of each body and, last, of all of them: every row counted, the landed ones listed.
std::vector<GroupRows> rows_of_groups(const ImpactTable& t, std::size_t bodies) {
  std::vector<GroupRows> rows(bodies + 1);
  for (std::size_t b = 0; b < bodies; ++b) rows[b].landed.reserve(t.rows() / bodies + 1);
  for (std::size_t i = 0; i < t.rows(); ++i) {
    const std::size_t b = t.body[i];
    if (b >= bodies) throw std::invalid_argument("compute_footprint: a row names no body");
    ++rows[b].rows;
    if (t.status[i] == 0) rows[b].landed.push_back(static_cast<std::uint32_t>(i));
  }
  rows[bodies].rows = t.rows();
  if (bodies == 1) {
    rows[bodies].landed = rows[0].landed;
  } else {
    rows[bodies].landed.reserve(t.rows());
    for (std::size_t i = 0; i < t.rows(); ++i)
      if (t.status[i] == 0) rows[bodies].landed.push_back(static_cast<std::uint32_t>(i));
  }
  return rows;
}

// The user's rules, judged for each body and for all (for all of several bodies, weighted as one
// release).
std::vector<RuleCheck> judge_rules(const ImpactTable& t, const FootprintSettings& s,
                                   const std::vector<GroupRows>& rows,
                                   const std::vector<GroupFootprint>& groups) {
  const std::size_t bodies = rows.size() - 1;
  std::vector<RuleCheck> rules;
  for (std::size_t k = 0; k < groups.size(); ++k) {
    const GroupFootprint& g = groups[k];
    const GroupRows& r = k < bodies ? rows[k] : rows[bodies];
    if (bodies == 1 && k == 0) continue;             // one body: its figures are those of "all"
    const bool release = k == bodies && bodies > 1;  // "all" of several bodies: weighted
    const std::vector<GroupRows> per_body(rows.begin(), rows.begin() + static_cast<long>(bodies));
    if (s.rules.zone_radius && s.rules.max_outside) {
      const double radius = *s.rules.zone_radius, accepted = *s.rules.max_outside;
      const std::uint64_t count = count_outside(t, r, g.centre, radius);
      if (release) {
        const MixtureColumn distance = mixture_of(per_body, s, [&](std::uint32_t row) {
          return planar_distance(t.east[row] - g.centre.east, t.north[row] - g.centre.north);
        });
        rules.push_back(judge_share("zone_radius", g.name, radius, accepted, count, r.rows,
                                    distance.share_above(radius, s.confidence), s.confidence,
                                    distance.samples_to_decide(radius, accepted, s.confidence)));
      } else {
        rules.push_back(
            judge("zone_radius", g.name, radius, accepted, count, r.rows, s.confidence));
      }
    }
    if (s.rules.energy_limit && s.rules.max_exceed) {
      const double limit = *s.rules.energy_limit, accepted = *s.rules.max_exceed;
      const std::uint64_t count = count_above(t, r, limit);
      if (release) {
        const MixtureColumn energy =
            mixture_of(per_body, s, [&](std::uint32_t row) { return t.energy[row]; });
        rules.push_back(judge_share("energy_limit", g.name, limit, accepted, count, r.rows,
                                    energy.share_above(limit, s.confidence), s.confidence,
                                    energy.samples_to_decide(limit, accepted, s.confidence)));
      } else {
        rules.push_back(
            judge("energy_limit", g.name, limit, accepted, count, r.rows, s.confidence));
      }
    }
  }
  return rules;
}

Footprint compute_footprint(const ImpactTable& t, const FootprintSettings& s) {
  const std::size_t bodies = s.body_names.size();
  if (bodies == 0 || s.body_counts.size() != bodies)
    throw std::invalid_argument("compute_footprint: body names and counts must match");
  if (s.centre == CentreRule::nominal && s.nominal_impacts.size() != bodies)
    throw std::invalid_argument("compute_footprint: one nominal impact per body is needed");
  if (t.rows() >= (std::size_t{1} << 32))
    throw std::invalid_argument("compute_footprint: more than 2^32 rows");
  Footprint out;
  out.levels = s.levels;
  out.confidence = s.confidence;
  out.centre = to_string(s.centre);
  out.downrange_bearing = s.downrange_bearing;
  out.energy_threshold = s.energy_threshold;
  out.releases = s.releases;

  const std::vector<GroupRows> rows = rows_of_groups(t, bodies);
  ScratchPerThread scratches;
  double total_objects = 0.0;
  for (std::size_t b = 0; b < bodies; ++b) {
    const PlanePoint nominal =
        s.centre == CentreRule::nominal ? s.nominal_impacts[b] : PlanePoint{};
    out.groups.push_back(
        compute_group(t, s, rows[b], s.body_names[b], nominal, s.body_counts[b], scratches));
    total_objects += s.body_counts[b];
  }
  const bool shapes = (s.sections & kShapes) != 0;
  // Each body's grid from its own rows (its own count per object), merged for "all".
  for (std::size_t b = 0; b < bodies && shapes; ++b) {
    std::vector<double> e, n;
    for (std::uint32_t row : rows[b].landed) {
      e.push_back(t.east[row]);
      n.push_back(t.north[row]);
    }
    out.groups[b].grid = grid_of(e, n, s.grid_cell, s.body_counts[b], s.releases);
  }
  if (bodies == 1) {
    GroupFootprint all = out.groups[0];  // the same rows: the same figures
    all.name = "all";
    out.groups.push_back(std::move(all));
  } else {
    // One release: the bodies' nominal impacts weighted by their objects make its nominal centre.
    PlanePoint nominal;
    if (s.centre == CentreRule::nominal) {
      for (std::size_t b = 0; b < bodies; ++b) {
        nominal.east += s.body_counts[b] * s.nominal_impacts[b].east / total_objects;
        nominal.north += s.body_counts[b] * s.nominal_impacts[b].north / total_objects;
      }
    }
    const std::vector<GroupRows> per_body(rows.begin(), rows.begin() + static_cast<long>(bodies));
    out.groups.push_back(compute_release_group(t, s, per_body, nominal));
    if (shapes) {
      ImpactGrid merged = out.groups[0].grid;
      for (std::size_t b = 1; b < bodies; ++b) merged = merge_grids(merged, out.groups[b].grid);
      out.groups.back().grid = std::move(merged);
    }
  }

  // The user's rules, for each body and for all.
  if (shapes) out.rules = judge_rules(t, s, rows, out.groups);
  return out;
}

}  // namespace strewn
