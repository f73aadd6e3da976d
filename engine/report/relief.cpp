#include "report/relief.hpp"

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <cpl_vsi.h>
#include <gdal.h>
#include <gdal_alg.h>
#include <gdal_utils.h>
#include <ogr_api.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <map>
#include <memory>
#include <mutex>
#include <string>
#include <vector>

#include "core/text.hpp"

namespace strewn {
namespace {

// Display nodes a side of the heights under the view: finer than the hillshade needs at the map's
// 640 px panel, coarse enough to compute at once.
constexpr int kDisplayNodes = 241;
constexpr double kNoHeight = -99999.0;
constexpr const char* kContourColour = "#8a6a3f";

struct DatasetClose {
  void operator()(void* dataset) const {
    if (dataset) GDALClose(dataset);
  }
};
using Dataset = std::unique_ptr<void, DatasetClose>;

// GDAL's messages stay out of the terminal while the relief is drawn: a part that fails is left
// out.
class QuietGdal {
 public:
  QuietGdal() { CPLPushErrorHandler(CPLQuietErrorHandler); }
  ~QuietGdal() { CPLPopErrorHandler(); }
  QuietGdal(const QuietGdal&) = delete;
  QuietGdal& operator=(const QuietGdal&) = delete;
};

std::string fmt(double v) {
  return printf_text("%.2f", v);
}

// The heights under the view on kDisplayNodes a side, as a GDAL raster in memory whose pixel
// centres are the nodes (georeferenced in the frame's metres, north up); null when no node has a
// height.
Dataset heights_under(const Relief& relief, const ReliefView& view, double& low, double& high) {
  const double cell = 2.0 * view.half / (kDisplayNodes - 1);
  const double west = view.centre_east - view.half, north = view.centre_north + view.half;
  std::vector<float> values(static_cast<std::size_t>(kDisplayNodes) * kDisplayNodes);
  low = std::numeric_limits<double>::infinity();
  high = -low;
  for (int j = 0; j < kDisplayNodes; ++j)
    for (int i = 0; i < kDisplayNodes; ++i) {
      const double h = relief.height(west + cell * i, north - cell * j);
      values[static_cast<std::size_t>(j) * kDisplayNodes + static_cast<std::size_t>(i)] =
          static_cast<float>(std::isnan(h) ? kNoHeight : h);
      if (!std::isnan(h)) {
        low = std::min(low, h);
        high = std::max(high, h);
      }
    }
  if (!(high >= low)) return nullptr;
  Dataset dataset(GDALCreate(GDALGetDriverByName("MEM"), "", kDisplayNodes, kDisplayNodes, 1,
                             GDT_Float32, nullptr));
  if (!dataset) return nullptr;
  double transform[6] = {west - cell / 2, cell, 0.0, north + cell / 2, 0.0, -cell};
  GDALSetGeoTransform(dataset.get(), transform);
  GDALRasterBandH band = GDALGetRasterBand(dataset.get(), 1);
  GDALSetRasterNoDataValue(band, kNoHeight);
  if (GDALRasterIO(band, GF_Write, 0, 0, kDisplayNodes, kDisplayNodes, values.data(), kDisplayNodes,
                   kDisplayNodes, GDT_Float32, 0, 0) != CE_None)
    return nullptr;
  return dataset;
}

// The hillshade of the heights (GDAL's DEM processing, Horn's slope, sun at azimuth 315 and 45
// degrees up: the usual cartographic lighting), as a PNG in a data URI; empty on failure.
std::string hillshade_png(GDALDatasetH heights) {
  const char* shade_args[] = {"-of", "MEM", "-az", "315", "-alt", "45", "-compute_edges", nullptr};
  GDALDEMProcessingOptions* shade_options =
      GDALDEMProcessingOptionsNew(const_cast<char**>(shade_args), nullptr);
  int usage_error = 0;
  const Dataset shade(
      GDALDEMProcessing("", heights, "hillshade", nullptr, shade_options, &usage_error));
  GDALDEMProcessingOptionsFree(shade_options);
  if (!shade) return {};
  static std::atomic<unsigned> made{0};
  const std::string name = "/vsimem/strewn-relief-" + std::to_string(made++) + ".png";
  const char* png_args[] = {"-of", "PNG", nullptr};
  GDALTranslateOptions* png_options =
      GDALTranslateOptionsNew(const_cast<char**>(png_args), nullptr);
  Dataset png(GDALTranslate(name.c_str(), shade.get(), png_options, &usage_error));
  GDALTranslateOptionsFree(png_options);
  if (!png) return {};
  png.reset();  // written out
  vsi_l_offset length = 0;
  GByte* bytes = VSIGetMemFileBuffer(name.c_str(), &length, TRUE);
  VSIUnlink((name + ".aux.xml").c_str());
  if (bytes == nullptr) return {};
  char* base64 = CPLBase64Encode(static_cast<int>(length), bytes);
  CPLFree(bytes);
  std::string uri = std::string("data:image/png;base64,") + base64;
  CPLFree(base64);
  return uri;
}

// A contour line: its level and its points in the frame (m).
struct ContourLine {
  double level = 0.0;
  std::vector<std::pair<double, double>> points;
};

// The contour lines of the heights every `interval` m (GDAL's contour generator).
std::vector<ContourLine> contour_lines(GDALDatasetH heights, double interval) {
  std::vector<ContourLine> lines;
  const Dataset store(GDALCreate(GDALGetDriverByName("Memory"), "", 0, 0, 0, GDT_Unknown, nullptr));
  if (!store) return lines;
  OGRLayerH layer =
      GDALDatasetCreateLayer(store.get(), "contours", nullptr, wkbLineString, nullptr);
  if (layer == nullptr) return lines;
  OGRFieldDefnH id = OGR_Fld_Create("id", OFTInteger), level = OGR_Fld_Create("level", OFTReal);
  OGR_L_CreateField(layer, id, TRUE);
  OGR_L_CreateField(layer, level, TRUE);
  OGR_Fld_Destroy(id);
  OGR_Fld_Destroy(level);
  const std::string interval_option = "LEVEL_INTERVAL=" + printf_text("%.17g", interval);
  const std::string no_data_option = "NODATA=" + printf_text("%.17g", kNoHeight);
  const char* options[] = {interval_option.c_str(), no_data_option.c_str(), "ID_FIELD=0",
                           "ELEV_FIELD=1", nullptr};
  if (GDALContourGenerateEx(GDALGetRasterBand(heights, 1), layer, const_cast<char**>(options),
                            nullptr, nullptr) != CE_None)
    return lines;
  OGR_L_ResetReading(layer);
  while (OGRFeatureH feature = OGR_L_GetNextFeature(layer)) {
    OGRGeometryH geometry = OGR_F_GetGeometryRef(feature);
    ContourLine line;
    line.level = OGR_F_GetFieldAsDouble(feature, 1);
    const int count = geometry ? OGR_G_GetPointCount(geometry) : 0;
    for (int k = 0; k < count; ++k)
      line.points.emplace_back(OGR_G_GetX(geometry, k), OGR_G_GetY(geometry, k));
    if (line.points.size() >= 2) lines.push_back(std::move(line));
    OGR_F_Destroy(feature);
  }
  return lines;
}

bool is_index(double level, double interval) {
  const double n = level / (5.0 * interval);
  return std::abs(n - std::round(n)) < 1e-6;
}

void draw_contours(ReliefDrawing& out_drawing, const std::vector<ContourLine>& lines,
                   const ReliefView& v, double interval) {
  std::string& out = out_drawing.ground;
  const double west = v.centre_east - v.half, north = v.centre_north + v.half;
  auto x = [&](double e) { return v.left + (e - west) * v.scale; };
  auto y = [&](double n) { return v.top + (north - n) * v.scale; };
  // The longest line of each index level carries its label, at its point farthest inside the
  // view (a label at the panel's edge would be cut).
  std::map<double, const ContourLine*> labelled;
  out += "<g class=\"contours\" fill=\"none\" stroke=\"";
  out += kContourColour;
  out += "\" stroke-linejoin=\"round\">\n";
  for (const auto& line : lines) {
    const bool index = is_index(line.level, interval);
    out += "<path data-level=\"" + printf_text("%g", line.level) + "\" stroke-width=\"" +
           (index ? "1.1" : "0.5") + "\" stroke-opacity=\"" + (index ? "0.8" : "0.55") + "\" d=\"";
    for (std::size_t k = 0; k < line.points.size(); ++k) {
      out += k ? 'L' : 'M';
      out += fmt(x(line.points[k].first)) + ' ' + fmt(y(line.points[k].second)) + ' ';
    }
    out += "\"/>\n";
    auto& best = labelled[line.level];
    if (index && (best == nullptr || line.points.size() > best->points.size())) best = &line;
  }
  out += "</g>\n";
  // A label needs room: none within 20 px of the panel's edge.
  constexpr double kLabelRoom = 20.0;
  for (const auto& [level, line] : labelled) {
    if (line == nullptr) continue;
    auto inside = [&](const std::pair<double, double>& p) {
      return std::min({p.first - west, west + 2.0 * v.half - p.first, north - p.second,
                       p.second - (north - 2.0 * v.half)});
    };
    // Of the points well inside (a tenth of the view from its edges, or as far in as the line
    // goes), the one farthest from the view's centre, where the footprint is densest.
    double deepest = 0.0;
    for (const auto& p : line->points) deepest = std::max(deepest, inside(p));
    const double enough = std::min(deepest, 0.2 * v.half);
    auto from_centre = [&](const std::pair<double, double>& p) {
      return std::hypot(p.first - v.centre_east, p.second - v.centre_north);
    };
    const std::pair<double, double>* at = nullptr;
    for (const auto& p : line->points)
      if (inside(p) >= enough && (at == nullptr || from_centre(p) > from_centre(*at))) at = &p;
    if (at == nullptr || inside(*at) * v.scale < kLabelRoom) continue;
    const auto& [e, n] = *at;
    out_drawing.labels +=
        "<text class=\"contour-label\" x=\"" + fmt(x(e)) + "\" y=\"" + fmt(y(n)) +
        "\" font-size=\"9\" text-anchor=\"middle\" dominant-baseline=\"middle\" fill=\"" +
        kContourColour +
        "\" stroke=\"#ffffff\" stroke-width=\"2.5\" stroke-linejoin=\"round\" "
        "paint-order=\"stroke\">" +
        printf_text("%g m", level) + "</text>\n";
  }
}

}  // namespace

double contour_interval(double range) {
  const double about = std::max(range / 15.0, 1.0);
  const double power = std::pow(10.0, std::floor(std::log10(about)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * power >= about) return m * power;
  return 10.0 * power;
}

ReliefDrawing relief_svg(const Relief& relief, const ReliefView& view) {
  if (relief.empty() || !(view.half > 0.0) || !(view.scale > 0.0)) return {};
  static std::once_flag registered;
  std::call_once(registered, [] { GDALAllRegister(); });
  const QuietGdal quiet;
  double low = 0.0, high = 0.0;
  const Dataset heights = heights_under(relief, view, low, high);
  if (!heights) return {};
  ReliefDrawing drawing;
  std::string& out = drawing.ground;
  out = "<g class=\"relief\">\n";
  const std::string png = hillshade_png(heights.get());
  if (!png.empty()) {
    const double cell = 2.0 * view.half / (kDisplayNodes - 1);
    const double side = (2.0 * view.half + cell) * view.scale;
    out += "<image class=\"hillshade\" x=\"" + fmt(view.left - cell / 2 * view.scale) + "\" y=\"" +
           fmt(view.top - cell / 2 * view.scale) + "\" width=\"" + fmt(side) + "\" height=\"" +
           fmt(side) +
           "\" preserveAspectRatio=\"none\" opacity=\"0.6\" "
           "style=\"mix-blend-mode:multiply\" href=\"" +
           png + "\"/>\n";
  }
  drawing.interval = contour_interval(high - low);
  draw_contours(drawing, contour_lines(heights.get(), drawing.interval), view, drawing.interval);
  out += "</g>\n";
  if (!drawing.labels.empty())
    drawing.labels = "<g class=\"contour-labels\">\n" + drawing.labels + "</g>\n";
  return drawing;
}

}  // namespace strewn
