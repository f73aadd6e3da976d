#pragma once
// The files of `strewn report`: GeoJSON (RFC 7946), CSV of every figure, the SVG map and the
// self-contained HTML page. Each is built from the study's record alone, as stored in the results
// file, so it shows exactly the figures `run` computed. docs/results.md describes each file.
#include <functional>
#include <string>
#include <string_view>
#include <vector>

#include "pipeline/study_record.hpp"
#include "study/study.hpp"

namespace strewn {

/// GeoJSON FeatureCollection in longitude/latitude (WGS84), converted from the site's local
/// east/north frame by GeographicLib's LocalCartesian at the site origin and ground height:
/// hazard polygons, containment circles (estimate and upper bound) and dispersion ellipses as
/// polygons, the centre, mean and release points, and with `impacts` every landed impact (one
/// MultiPoint per body). Rings are closed and counter-clockwise, longitudes in [-180, 180]; a ring
/// across the antimeridian is cut there into a MultiPolygon (RFC 7946 3.1.9), a ring about a pole
/// is a polar cap to the pole along the antimeridian. Throws UsageError when the site has no
/// coordinates.
std::string geojson_text(const StudyRecord& record, const StudyColumns* impacts);

/// Text taken piece by piece, in order: a file being written, or a string.
using TextSink = std::function<void(std::string_view)>;

/// The text of geojson_text given to `out` as it is made, feature by feature and impact by
/// impact, so that the impacts of a large study are never held whole in memory (neither as a JSON
/// document nor as text). geojson_text is made by it: the bytes are the same.
void write_geojson(const StudyRecord& record, const StudyColumns* impacts, const TextSink& out);

/// Every figure as CSV, one row per figure: group, figure, level, estimate, interval, bound.
std::string figures_csv(const StudyRecord& record);

/// The map of a group's footprint as SVG (the body's name, or "all"): impact density shading,
/// hazard polygons, containment circles labelled with their level, dispersion ellipses, each
/// rule's zone labelled with its radius and status, the release point and track, the graticule
/// of true meridians and parallels (report/graticule.hpp) with their ticks and labels, each label
/// saying in data-point which point (px) it marks (metre ticks without site coordinates), north
/// arrow, scale bar and legend.
/// The view holds every impact cell and every figure.
std::string map_svg(const StudyRecord& record, const std::string& group);
/// The map of all bodies together (of the one body, for a study of one).
std::string map_svg(const StudyRecord& record);

/// One self-contained HTML page: the map, the tables, the rule statuses, provenance, cautions.
std::string html_report(const StudyRecord& record);

/// Writes a file whole (temporary name, then rename), making a missing folder. Refuses
/// (UsageError, status 2) a path that is a folder, a device, a pipe or a link, or one of `reads`,
/// the files the command reads; throws IoError naming the path when writing fails.
/// With `replace` false, an existing file (one that appeared since the outputs were checked
/// too) is refused, never replaced.
void write_report_file(const std::string& path, const std::string& text,
                       const std::vector<std::string>& reads = {}, bool replace = true);

/// Writes a file as write_report_file does, its text given piece by piece by `write` (as
/// write_geojson gives it) and written out in blocks, never held whole. Whatever `write` or the
/// writing throws (IoError, std::bad_alloc, a UsageError of `write`) is thrown on once the
/// temporary file is removed: nothing is left under the output's name or its temporary name.
void stream_report_file(const std::string& path, const std::function<void(const TextSink&)>& write,
                        const std::vector<std::string>& reads = {}, bool replace = true);

/// Text escaped for XML and HTML.
std::string escape_markup(const std::string& text);

}  // namespace strewn
