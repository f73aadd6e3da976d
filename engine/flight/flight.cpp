#include "flight/flight.hpp"

#include <variant>

#include "flight/flight_run.hpp"

namespace strewn {

// Compiled in flight_over_terrain.cpp (each ground's flight in a unit of its own).
namespace detail {
extern template FlightResult fly_over<TerrainGround>(const TerrainGround&, const Body&,
                                                     const Environment&, const ReleaseState&,
                                                     const FlightOptions&, FlightObserver*);
}  // namespace detail

FlightResult fly(const Body& body, const Environment& environment, const ReleaseState& release,
                 const FlightOptions& options, FlightObserver* observer) {
  // One visit per flight: the step loop is compiled for each ground, without a virtual call.
  return std::visit(
      [&](const auto& ground) {
        return detail::fly_over(ground, body, environment, release, options, observer);
      },
      environment.ground);
}

}  // namespace strewn
