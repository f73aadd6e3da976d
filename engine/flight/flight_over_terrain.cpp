// The flight over terrain compiled in a unit of its own: beside the level ground's in flight.cpp,
// the two step loops together exceeded the compiler's inlining budget for one unit, and the level
// ground's flight lost the inlining of its forces and dense output (about a fifth more
// instructions per flight, found with Callgrind). Each ground's flight is compiled alone.
#include "flight/flight_run.hpp"

namespace strewn::detail {

template FlightResult fly_over<TerrainGround>(const TerrainGround&, const Body&, const Environment&,
                                              const ReleaseState&, const FlightOptions&,
                                              FlightObserver*);

}  // namespace strewn::detail
