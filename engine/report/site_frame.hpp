#pragma once
// The site's local east/north frame placed on the WGS84 ellipsoid (GeographicLib's
// LocalCartesian at the site's origin and ground height), for reports that give latitudes and
// longitudes beside metres.
#include <memory>
#include <optional>

#include "pipeline/study_record.hpp"

namespace strewn {

struct GeoPoint {
  double latitude = 0.0, longitude = 0.0;  ///< degrees
};

class SiteFrame {
 public:
  /// A frame for the record's site; geographic() is false when the scenario gave no coordinates.
  explicit SiteFrame(const StudyRecord& record);
  ~SiteFrame();
  SiteFrame(const SiteFrame&) = delete;
  SiteFrame& operator=(const SiteFrame&) = delete;

  [[nodiscard]] bool geographic() const { return frame_ != nullptr; }
  /// The point's latitude and longitude (at the ground height); empty without coordinates or for
  /// a point that is not finite.
  [[nodiscard]] std::optional<GeoPoint> locate(PlanePoint point) const;
  /// The local point (east, north, m) that locate() takes to a latitude and longitude
  /// (degrees): where the ellipsoid's normal there meets the site's plane. Not finite without
  /// coordinates, or for a place on the far side of the Earth, which no point of the plane shows.
  [[nodiscard]] PlanePoint local(GeoPoint point) const;

 private:
  struct Frame;
  std::unique_ptr<Frame> frame_;
};

}  // namespace strewn
