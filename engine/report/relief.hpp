#pragma once
// The relief under a map: a hillshade and labelled contour lines of the ground a study landed on
// (StudyRecord::relief), both computed by GDAL from the heights under the view (its DEM
// processing for the hillshade, its contour generator for the lines), drawn under the impacts and
// zones of the SVG map.
#include <string>

#include "pipeline/study_record.hpp"

namespace strewn {

/// Where the map's view lies in the frame (m) and in the SVG (px): the square of side 2 half about
/// (centre_east, centre_north), drawn from (left, top) at `scale` px per metre, north up.
struct ReliefView {
  double centre_east = 0.0, centre_north = 0.0, half = 0.0;
  double left = 0.0, top = 0.0, scale = 1.0;
};

/// The contour interval for heights spanning `range` m: about fifteen lines, 1, 2 or 5 times a
/// power of ten m, at least 1 m. Every fifth line is an index line, labelled.
double contour_interval(double range);

/// What the map draws of the relief, as SVG: `ground`, a hillshade image (a PNG in a data URI,
/// sun from the north-west 45 degrees above the horizon, the usual cartographic lighting) and
/// contour lines (paths with `data-level`, every fifth an index line, thicker), to go under the
/// impacts; `labels`, the index lines' heights in metres, to go over the impact density. Both
/// empty when the relief is empty or has no heights under the view; `interval` is then 0.
struct ReliefDrawing {
  std::string ground, labels;
  double interval = 0.0;  ///< m between contour lines
};
ReliefDrawing relief_svg(const Relief& relief, const ReliefView& view);

}  // namespace strewn
