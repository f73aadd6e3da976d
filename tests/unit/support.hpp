#pragma once
// Helpers shared by the unit tests: reading the published reference tables and building flights.
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "flight/flight.hpp"

namespace strewn::test {

/// Rows of a reference CSV ('#' comments, a header), as column name -> text.
inline std::vector<std::map<std::string, std::string>> read_reference(const std::string& name) {
  std::ifstream in(std::string(STREWN_REFERENCE_DIR) + "/" + name);
  if (!in) throw std::runtime_error("missing reference table " + name);
  std::vector<std::map<std::string, std::string>> rows;
  std::vector<std::string> header;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    std::vector<std::string> cells;
    std::stringstream ss(line);
    std::string cell;
    while (std::getline(ss, cell, ',')) cells.push_back(cell);
    if (!line.empty() && line.back() == ',') cells.emplace_back();
    if (header.empty()) {
      header = cells;
      continue;
    }
    std::map<std::string, std::string> row;
    for (std::size_t i = 0; i < header.size() && i < cells.size(); ++i) row[header[i]] = cells[i];
    rows.push_back(row);
  }
  return rows;
}

/// A body with the area drag model.
inline Body area_body(double mass, double cd, double area) {
  Body b;
  b.mass = mass;
  b.drag.model = DragModel::area;
  b.drag.cd = cd;
  b.drag.area = area;
  return b;
}

/// A sphere (or stokes) body of given diameter and material density, buoyancy included.
inline Body round_body(DragModel model, double diameter, double material_density) {
  Body b;
  b.drag.model = model;
  b.drag.diameter = diameter;
  b.volume = constants::pi * diameter * diameter * diameter / 6.0;
  b.mass = material_density * b.volume;
  return b;
}

inline ReleaseState release_at(double east, double north, double up, double ve, double vn,
                               double vu) {
  ReleaseState r;
  r.position = Vec3(east, north, up);
  r.velocity = Vec3(ve, vn, vu);
  return r;
}

}  // namespace strewn::test
