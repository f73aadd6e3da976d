#include "report/site_frame.hpp"

#include <GeographicLib/LocalCartesian.hpp>
#include <cmath>

namespace strewn {

struct SiteFrame::Frame {
  GeographicLib::LocalCartesian cartesian;
  double ground = 0.0;  // m above the ellipsoid taken as the ground's (the frame's origin)
};

SiteFrame::SiteFrame(const StudyRecord& r) {
  if (r.latitude && r.longitude)
    frame_ = std::make_unique<Frame>(
        Frame{GeographicLib::LocalCartesian(*r.latitude, *r.longitude, r.ground), r.ground});
}

SiteFrame::~SiteFrame() = default;

std::optional<GeoPoint> SiteFrame::locate(PlanePoint p) const {
  if (!frame_ || !std::isfinite(p.east) || !std::isfinite(p.north)) return std::nullopt;
  double lat = 0.0, lon = 0.0, h = 0.0;
  frame_->cartesian.Reverse(p.east, p.north, 0.0, lat, lon, h);
  return GeoPoint{lat, lon};
}

PlanePoint SiteFrame::local(GeoPoint p) const {
  if (!frame_) return {std::nan(""), std::nan("")};
  double x = 0.0, y = 0.0, z = 0.0;
  frame_->cartesian.Forward(p.latitude, p.longitude, frame_->ground, x, y, z);
  return {x, y};
}

}  // namespace strewn
