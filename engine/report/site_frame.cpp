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
  const PlanePoint none{std::nan(""), std::nan("")};
  if (!frame_) return none;
  // locate() gives a point of the plane the latitude and longitude of the ellipsoid's normal
  // through it, so the point showing (lat, lon) is where that normal meets the plane. The local
  // coordinates are an affine function of the geocentric ones, and so linear in the height along
  // the normal: two heights give the line. (The ground point itself, the height dropped, would
  // lie off it by about d^3 / (2 R^2) at a distance d: 3 mm at 6 km, 98 km at 2000 km.)
  constexpr double kRise = 1000.0;  // m
  double x0 = 0.0, y0 = 0.0, z0 = 0.0, x1 = 0.0, y1 = 0.0, z1 = 0.0;
  frame_->cartesian.Forward(p.latitude, p.longitude, frame_->ground, x0, y0, z0);
  frame_->cartesian.Forward(p.latitude, p.longitude, frame_->ground + kRise, x1, y1, z1);
  // The normal's rise out of the plane per metre: none, or away from it, on the far side of
  // the Earth, where no point of the plane shows this place. The ground lies under the plane
  // (the ellipsoid is convex), so the normal meets it outward, at height z0 / rise below zero.
  const double rise = (z1 - z0) / kRise;
  if (!(rise > 1e-3)) return none;
  const double along = -z0 / rise / kRise;
  return {x0 + along * (x1 - x0), y0 + along * (y1 - y0)};
}

}  // namespace strewn
