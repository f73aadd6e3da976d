#pragma once
// The figures of a body's footprint, each described once: its name, unit and meaning, where each
// output form puts it and how to read its value from a GroupFootprint. The store (HDF5) and the
// report (JSON, CSV, HTML) walk this table instead of spelling each figure, so that a new figure is
// a new row here (and, for a new shape, a case in each writer). DEVELOPERS.md, "Adding a footprint
// figure", says what else to touch.
#include <array>
#include <cstdint>
#include <limits>
#include <stdexcept>
#include <string_view>
#include <vector>

#include "footprint/footprint.hpp"

namespace strewn {

/// How a figure's value is held, which decides its layout in each form.
enum class FigureShape {
  count,       ///< an std::uint64_t of the group
  number,      ///< a double of the group
  point,       ///< a PlanePoint (east, north)
  covariance,  ///< the covariance's three terms
  bounded,     ///< std::vector<Containment>: per level, estimate, interval and one-sided bound
  quantiles,   ///< std::vector<QuantileEstimate>: per probability, estimate and interval
  ellipses,    ///< the Gaussian dispersion ellipses
  polygons,    ///< the hazard polygons
  grid,        ///< the impact-probability grid
  exceedance,  ///< the energy exceedance
  sensitivity  ///< the inputs' rank correlations with the impact
};

/// What the CSV row's note says beyond the description's fixed `note`.
enum class CsvNote {
  text,           ///< the fixed note alone
  centre_rule,    ///< the footprint's centre rule ("mean", "nominal", "point")
  along_bearing,  ///< "along <downrange bearing> deg"
  samples_needed  ///< for a level without a bound, the samples the bound needs
};

struct FigureDescription {
  std::string_view name = {};  ///< the figure's own name, unique in the table
  /// HDF5: the attribute, dataset or group of a body's group under /footprint that holds it
  /// (the exceedance: the group whose attributes hold it).
  std::string_view hdf5 = {};
  std::string_view json =
      {};  ///< JSON pointer within a group's object of the summary's "footprint"
  /// CSV `figure`, or for a figure of several rows the start of their figures; empty: no row.
  std::string_view csv = {};
  /// As the CSV writes it: "m", "m2", "m/s", "J", "s", "1/m2"; empty for a probability, a ratio,
  /// a correlation or a count.
  std::string_view unit = {};
  std::string_view label = {};  ///< the HTML column heading before the unit; empty: no column
  std::string_view meaning = {};
  FigureShape shape = FigureShape::number;
  /// bounded: the estimate's and the bound's names in HDF5 and JSON.
  std::string_view estimate = "value", bound = "upper";
  double level = std::numeric_limits<double>::quiet_NaN();  ///< CSV level of one number (CEP)
  std::string_view note = {};                               ///< CSV note
  CsvNote note_kind = CsvNote::text;
  // The value, by shape (the others stay null).
  std::uint64_t GroupFootprint::*count = nullptr;
  double GroupFootprint::*number = nullptr;
  PlanePoint GroupFootprint::*point = nullptr;
  std::vector<Containment> GroupFootprint::*bounded = nullptr;
  std::vector<QuantileEstimate> GroupFootprint::*quantiles = nullptr;
};

/// Every figure of a group, in the order of its CSV rows (docs/results.md gives the HDF5 layout).
inline constexpr std::array kGroupFigures{
    FigureDescription{.name = "rows",
                      .hdf5 = "rows",
                      .json = "/rows",
                      .meaning = "rows of the group: flights of its body, landed or failed",
                      .shape = FigureShape::count,
                      .count = &GroupFootprint::rows},
    FigureDescription{.name = "landed",
                      .hdf5 = "landed",
                      .json = "/landed",
                      .meaning = "flights that landed",
                      .shape = FigureShape::count,
                      .count = &GroupFootprint::landed},
    FigureDescription{.name = "failed",
                      .hdf5 = "failed",
                      .json = "/failed",
                      .meaning = "flights that failed (they count as landing infinitely far away)",
                      .shape = FigureShape::count,
                      .count = &GroupFootprint::failed},
    FigureDescription{.name = "objects_per_release",
                      .hdf5 = "objects_per_release",
                      .json = "/objects_per_release",
                      .meaning = "objects of the body per release (their sum for all)",
                      .shape = FigureShape::number,
                      .number = &GroupFootprint::objects_per_release},
    FigureDescription{.name = "mean",
                      .hdf5 = "mean",
                      .json = "/mean",
                      .csv = "mean",
                      .unit = "m",
                      .label = "mean",
                      .meaning = "mean impact point of the landed flights",
                      .shape = FigureShape::point,
                      .point = &GroupFootprint::mean},
    FigureDescription{.name = "centre",
                      .hdf5 = "centre",
                      .json = "/centre",
                      .csv = "centre",
                      .unit = "m",
                      .meaning = "the centre the distances are measured from (study.centre)",
                      .shape = FigureShape::point,
                      .note_kind = CsvNote::centre_rule,
                      .point = &GroupFootprint::centre},
    FigureDescription{.name = "covariance",
                      .hdf5 = "covariance",
                      .json = "/covariance",
                      .unit = "m2",
                      .meaning = "covariance of the landed impact points",
                      .shape = FigureShape::covariance},
    FigureDescription{.name = "cep",
                      .hdf5 = "cep",
                      .json = "/cep/counted",
                      .csv = "cep",
                      .unit = "m",
                      .label = "CEP",
                      .meaning = "median distance of the impacts from their mean, counted",
                      .shape = FigureShape::number,
                      .level = 0.5,
                      .note = "counted; about the mean",
                      .number = &GroupFootprint::cep},
    FigureDescription{.name = "cep_gaussian",
                      .hdf5 = "cep_gaussian",
                      .json = "/cep/gaussian",
                      .csv = "cep_gaussian",
                      .unit = "m",
                      .label = "CEP (Gaussian)",
                      .meaning = "the CEP of the Gaussian of the impacts' mean and covariance",
                      .shape = FigureShape::number,
                      .level = 0.5,
                      .note = "Gaussian approximation",
                      .number = &GroupFootprint::cep_gaussian},
    FigureDescription{.name = "containment",
                      .hdf5 = "containment",
                      .json = "/containment",
                      .csv = "containment_radius",
                      .unit = "m",
                      .label = "radius",
                      .meaning = "radius about the centre holding each level of the impacts, with "
                                 "its distribution-free upper confidence bound",
                      .shape = FigureShape::bounded,
                      .estimate = "radius",
                      .bound = "radius_upper",
                      .note_kind = CsvNote::samples_needed,
                      .bounded = &GroupFootprint::containment},
    FigureDescription{.name = "polygons",
                      .hdf5 = "polygons",
                      .json = "/polygons",
                      .csv = "hazard_polygon_area",
                      .unit = "m2",
                      .label = "polygon",
                      .meaning = "area of the convex hazard polygon holding at least each level "
                                 "of the impacts, counted",
                      .shape = FigureShape::polygons},
    FigureDescription{.name = "ellipses",
                      .hdf5 = "ellipses",
                      .json = "/ellipses",
                      .csv = "ellipse_",
                      .unit = "m",
                      .meaning = "semi-axes of the Gaussian dispersion ellipse of each level",
                      .shape = FigureShape::ellipses},
    FigureDescription{.name = "downrange",
                      .hdf5 = "downrange",
                      .json = "/downrange",
                      .csv = "downrange",
                      .unit = "m",
                      .label = "downrange",
                      .meaning = "quantiles of the impact's distance along the downrange bearing "
                                 "from the centre",
                      .shape = FigureShape::quantiles,
                      .note_kind = CsvNote::along_bearing,
                      .quantiles = &GroupFootprint::downrange},
    FigureDescription{.name = "crossrange",
                      .hdf5 = "crossrange",
                      .json = "/crossrange",
                      .csv = "crossrange",
                      .unit = "m",
                      .label = "crossrange",
                      .meaning = "quantiles of the impact's distance to the right of the "
                                 "downrange axis",
                      .shape = FigureShape::quantiles,
                      .note = "to the right",
                      .quantiles = &GroupFootprint::crossrange},
    FigureDescription{.name = "grid",
                      .hdf5 = "grid",
                      .json = "/grid",
                      .unit = "1/m2",
                      .meaning = "expected objects landing per square metre per release, by cell",
                      .shape = FigureShape::grid},
    FigureDescription{.name = "speed",
                      .hdf5 = "speed",
                      .json = "/speed",
                      .csv = "impact_speed",
                      .unit = "m/s",
                      .label = "speed",
                      .meaning = "upper quantiles of the ground-relative impact speed, with "
                                 "one-sided bounds",
                      .shape = FigureShape::bounded,
                      .bounded = &GroupFootprint::speed},
    FigureDescription{.name = "energy",
                      .hdf5 = "energy",
                      .json = "/energy/quantiles",
                      .csv = "impact_energy",
                      .unit = "J",
                      .label = "energy",
                      .meaning = "upper quantiles of the impact energy, with one-sided bounds",
                      .shape = FigureShape::bounded,
                      .bounded = &GroupFootprint::energy},
    FigureDescription{.name = "energy_exceedance",
                      .hdf5 = "energy",
                      .json = "/energy",
                      .csv = "energy_exceedance",
                      .label = "share above",
                      .meaning = "probability of an impact energy above the threshold, with "
                                 "Clopper-Pearson bounds",
                      .shape = FigureShape::exceedance},
    FigureDescription{.name = "time",
                      .hdf5 = "time",
                      .json = "/time/quantiles",
                      .csv = "time_of_flight",
                      .unit = "s",
                      .label = "time of flight",
                      .meaning = "quantiles of the time from release to impact",
                      .shape = FigureShape::quantiles,
                      .quantiles = &GroupFootprint::time},
    FigureDescription{.name = "time_min",
                      .hdf5 = "time_min",
                      .json = "/time/min",
                      .unit = "s",
                      .meaning = "shortest time of flight",
                      .shape = FigureShape::number,
                      .number = &GroupFootprint::time_min},
    FigureDescription{.name = "time_max",
                      .hdf5 = "time_max",
                      .json = "/time/max",
                      .unit = "s",
                      .meaning = "longest time of flight",
                      .shape = FigureShape::number,
                      .number = &GroupFootprint::time_max},
    FigureDescription{.name = "sensitivity",
                      .hdf5 = "sensitivity",
                      .json = "/sensitivity",
                      .csv = "spearman_",
                      .meaning = "rank correlation of each input with the impact's downrange, "
                                 "crossrange, distance and energy",
                      .shape = FigureShape::sensitivity},
};

/// The description named `name`; in a constant expression an unknown name does not compile.
constexpr const FigureDescription& group_figure(std::string_view name) {
  for (const auto& d : kGroupFigures)
    if (d.name == name) return d;
  throw std::invalid_argument("no footprint figure of this name");
}

}  // namespace strewn
