#pragma once
// Impact rows owned by a test, viewed as the footprint's ImpactTable.
#include <cstdint>
#include <string>
#include <vector>

#include "footprint/footprint.hpp"

namespace strewn::test {

// Columns owned by a test, viewed as an ImpactTable.
struct OwnedTable {
  std::vector<std::uint16_t> body;
  std::vector<double> east, north, time, speed, energy;
  std::vector<std::uint8_t> status;
  std::vector<std::string> names;
  std::vector<std::vector<double>> inputs;
  ImpactTable view() const {
    ImpactTable t;
    t.body = body;
    t.east = east;
    t.north = north;
    t.time = time;
    t.speed = speed;
    t.energy = energy;
    t.status = status;
    t.input_names = names;
    for (const auto& c : inputs) t.inputs.emplace_back(c);
    return t;
  }
  void add(std::uint16_t b, double e, double n, bool landed = true, double energy_j = 1.0) {
    body.push_back(b);
    east.push_back(e);
    north.push_back(n);
    time.push_back(10.0);
    speed.push_back(5.0);
    energy.push_back(energy_j);
    status.push_back(landed ? 0 : 4);
  }
};

}  // namespace strewn::test
