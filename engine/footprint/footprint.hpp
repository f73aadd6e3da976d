#pragma once
// The footprint statistics of a study: what sizes an exclusion zone, per body and for all bodies
// together. docs/statistics.md explains each figure, its assumptions and how to read its bounds.
//
// Every estimate is an order statistic or a count; every bound is distribution-free (order
// statistics, Wilks 1941) or exact for a binomial count (Clopper-Pearson 1934), except the
// dispersion ellipses and the Gaussian CEP, which are labelled Gaussian approximations. Failed
// flights count as landing infinitely far away (containment, hazard polygons, speed, energy,
// exceedance) or at both ends (downrange and crossrange); they are left out of the moments, the
// grid, time of flight and the sensitivities, which need an impact point.
//
// Everything reduces in row order: the result depends only on the rows, never on threads.
#include <array>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include "core/enum_names.hpp"
#include "footprint/containment.hpp"
#include "footprint/planar.hpp"

namespace strewn {

/// The impacts of a study, one row per (sample, body), as views of its columns.
struct ImpactTable {
  std::span<const std::uint16_t> body;   ///< index into FootprintSettings::body_names
  std::span<const double> east, north;   ///< m from the site origin
  std::span<const double> time;          ///< s
  std::span<const double> speed;         ///< m/s
  std::span<const double> energy;        ///< J
  std::span<const std::uint8_t> status;  ///< 0: landed; anything else: failed
  /// The columns ranked against the impact (Spearman): the sampled inputs, and the sample's own
  /// random choices (canopy state, ensemble member, burst velocity, wind perturbation).
  std::vector<std::string> input_names;
  std::vector<std::span<const double>> inputs;
  /// Per column: true when its values are categories (an ensemble member's index), ranked by the
  /// correlation ratio of the impact's ranks rather than by Spearman's correlation.
  std::vector<bool> categorical;
  /// Columns made for the table that the spans above may view (the canopy state as numbers):
  /// moving a table keeps them valid, copying one does not.
  std::vector<std::vector<double>> storage;
  [[nodiscard]] std::size_t rows() const { return east.size(); }
};

enum class CentreRule { mean, nominal, point };
template <>
struct EnumNames<CentreRule> {
  static constexpr std::array names{std::pair{CentreRule::mean, "mean"},
                                    std::pair{CentreRule::nominal, "nominal"},
                                    std::pair{CentreRule::point, "point"}};
};
inline const char* to_string(CentreRule rule) {
  return name_of(rule);
}

/// The user's local acceptance criteria ([rules]); strewn reports against them, never decides.
struct RuleLimits {
  std::optional<double> zone_radius;   ///< m, planned exclusion radius about the centre
  std::optional<double> max_outside;   ///< accepted probability of landing outside it
  std::optional<double> energy_limit;  ///< J
  std::optional<double> max_exceed;    ///< accepted probability of an impact above it
};

/// The two halves of the figures, so that two processes can compute them side by side.
enum FootprintSection : unsigned {
  /// containment, downrange and crossrange, speed, energy, time, exceedance, sensitivities
  kPlaceAndSpread = 1,
  /// CEP, ellipses, hazard polygons, grid, rules
  kShapes = 2,
  kAllSections = 3,
};

struct FootprintSettings {
  std::vector<double> levels{0.5, 0.9, 0.99, 0.999};
  double confidence = 0.95;
  CentreRule centre = CentreRule::mean;
  PlanePoint centre_point;  ///< CentreRule::point
  std::vector<PlanePoint>
      nominal_impacts;             ///< CentreRule::nominal: per body; `all` takes the first
  double downrange_bearing = 0.0;  ///< degrees clockwise from north of the downrange axis
  double energy_threshold = 15.0;  ///< J
  double grid_cell = 10.0;         ///< m
  double polygon_margin = 0.05;    ///< m, hazard polygons grow by this (the impact tolerance)
  std::vector<std::string> body_names;
  std::vector<double> body_counts;  ///< objects of each body per release (grid densities)
  std::uint64_t releases = 0;       ///< samples in the study
  RuleLimits rules;
  unsigned sections = kAllSections;  ///< FootprintSection bits: which figures to compute
};

/// An estimated quantile with its two-sided distribution-free interval (+-inf: undetermined).
struct QuantileEstimate {
  double probability = 0.0, value = 0.0, lower = 0.0, upper = 0.0;
};

/// Gaussian approximation: the ellipse {x : (x - mean)^T C^-1 (x - mean) <= s^2} with
/// s = sqrt(-2 ln(1 - level)), the chi-square (2 degrees of freedom) radius. `counted` is the share
/// of the rows that actually fell inside it.
struct DispersionEllipse {
  double level = 0.0, scale = 0.0;
  double semi_major = 0.0, semi_minor = 0.0;  ///< m
  double bearing = 0.0;  ///< degrees clockwise from north of the major axis, in [0, 180)
  double counted = 0.0;
};

/// A convex polygon that holds at least `level` of the rows, counted (see docs/statistics.md).
struct HazardPolygon {
  double level = 0.0;
  std::uint64_t rank = 0;  ///< impacts it was built around (the order-statistic bound rank)
  bool determined = false;
  std::uint64_t samples_needed = 0;  ///< when too few samples support the bound
  std::string reason;                ///< why it is undetermined
  std::vector<PlanePoint> ring;      ///< counter-clockwise, first vertex not repeated
  double coverage = 0.0;             ///< counted share of the rows inside
  double area = 0.0;                 ///< m^2
};

/// Impact-probability grid: the cells that received impacts, in (east, north) index order.
/// Cell (i, j) spans east [i c, (i + 1) c), north [j c, (j + 1) c). density = expected objects
/// landing per square metre per release: count x objects per release / (releases c^2).
struct ImpactGrid {
  double cell = 0.0;
  std::vector<std::int64_t> east_index, north_index;
  std::vector<std::uint64_t> count;
  std::vector<double> density;  ///< 1/m^2 per release
};

/// How one column moves the impact: Spearman's rank correlation with the impact's downrange,
/// crossrange, distance from the centre and energy (NaN: none, e.g. a constant column); for a
/// categorical column the correlation ratio (eta, 0 .. 1, Pearson 1903) of those outcomes' ranks
/// over its categories, which for two categories is the size of Spearman's correlation.
struct InputSensitivity {
  std::string input;
  double downrange = 0.0, crossrange = 0.0, distance = 0.0, energy = 0.0;
  bool categorical = false;
  /// The largest effect on any outcome, |value| (0 when none is defined): the ranking key.
  [[nodiscard]] double strength() const;
};

struct Exceedance {
  double threshold = 0.0;
  std::uint64_t count = 0, rows = 0;
  double share = 0.0, lower = 0.0, upper = 0.0;  ///< estimate, Clopper-Pearson bounds
};

/// A body's figures, or for "all" those of one object of a release: with several bodies, a
/// mixture weighted by each body's objects per release, with bounds by Boole's inequality
/// (footprint/mixture.hpp), about one common centre. A new figure here is also described in
/// footprint/figures.hpp, which every output form reads.
struct GroupFootprint {
  std::string name;                ///< a body's name, or "all"
  double objects_per_release = 0;  ///< the body's count (sum for "all")
  std::uint64_t rows = 0, landed = 0, failed = 0;
  PlanePoint mean, centre;
  std::array<double, 3> covariance{};  ///< var east, cov east-north, var north (m^2)
  std::vector<Containment> containment;
  double cep = 0.0;           ///< empirical median distance about the mean impact point
  double cep_gaussian = 0.0;  ///< the same for the Gaussian of this mean and covariance
  std::vector<DispersionEllipse> ellipses;
  std::vector<QuantileEstimate> downrange, crossrange;  ///< tails (1 -+ level) / 2, and 0.5
  std::vector<HazardPolygon> polygons;
  ImpactGrid grid;
  std::vector<Containment> speed, energy;  ///< upper quantiles with one-sided bounds
  std::vector<QuantileEstimate> time;      ///< at each level, and 0.5
  double time_min = 0.0, time_max = 0.0;
  Exceedance energy_exceedance;
  /// Per body, strongest first (InputSensitivity::strength); none for "all" of several bodies,
  /// whose rows mix bodies that respond differently to the same input.
  std::vector<InputSensitivity> sensitivity;
};

enum class RuleStatus { within, exceeds, undetermined };
template <>
struct EnumNames<RuleStatus> {
  static constexpr std::array names{std::pair{RuleStatus::within, "within"},
                                    std::pair{RuleStatus::exceeds, "exceeds"},
                                    std::pair{RuleStatus::undetermined, "undetermined"}};
};
inline const char* to_string(RuleStatus status) {
  return name_of(status);
}

/// One of the user's criteria held against the study: `within` when the upper confidence bound of
/// the probability is at or below the accepted probability, `exceeds` when the lower bound is
/// above it, `undetermined` otherwise.
struct RuleCheck {
  std::string rule;        ///< "zone_radius" | "energy_limit"
  std::string group;       ///< body name or "all"
  double threshold = 0.0;  ///< the radius (m) or energy (J) of the rule
  double accepted = 0.0;   ///< the accepted probability
  std::uint64_t count = 0, rows = 0;
  double value = 0.0, lower = 0.0, upper = 0.0, confidence = 0.0;
  RuleStatus status = RuleStatus::undetermined;
  std::uint64_t samples_needed =
      0;  ///< undetermined: samples that would decide it if the share held
};

struct Footprint {
  std::vector<double> levels;
  double confidence = 0.0;
  std::string centre;  ///< "mean" | "nominal" | "point"
  double downrange_bearing = 0.0;
  double energy_threshold = 0.0;
  std::uint64_t releases = 0;
  std::vector<GroupFootprint> groups;  ///< the bodies in order, then "all"
  std::vector<RuleCheck> rules;

  /// The largest containment relative_width() over groups and levels (+inf if any is undetermined).
  [[nodiscard]] double widest_relative_width() const;
};

/// Computes every figure. Throws std::invalid_argument for inconsistent settings.
Footprint compute_footprint(const ImpactTable& table, const FootprintSettings& settings);

/// Completes a footprint computed with kShapes by the kPlaceAndSpread figures of the same rows.
void merge_sections(Footprint& shapes, const Footprint& place_and_spread);

/// Radius of the circle about the mean holding probability p of a bivariate Gaussian with the
/// given covariance (Hoyt's distribution, by Gauss-Kronrod quadrature and TOMS 748 from
/// Boost.Math).
double gaussian_circle_radius(const std::array<double, 3>& covariance, double p);

}  // namespace strewn
