#pragma once
// Helpers shared by the unit tests: reading the published reference tables, building flights,
// and scratch folders in the temporary directory.
#include <stdlib.h>

#include <cerrno>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <system_error>
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
  b.drag.law = AreaDrag(cd, area);
  return b;
}

/// A body of a diameter law (sphere, shape, stokes) and material density, buoyancy included.
template <class Law>
inline Body round_body(const Law& law, double material_density) {
  Body b;
  b.drag.law = law;
  b.volume = law.volume();
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

/// A folder of the test's own under the temporary directory, named strewn-<what>-XXXXXX with the
/// X's made unique by mkdtemp(3) (so that tests run at once, by ctest in parallel or by another
/// build, never share one), and removed with everything in it when it goes out of scope: also
/// when a failed assertion returns from the test early.
class ScratchFolder {
 public:
  explicit ScratchFolder(const std::string& what) {
    std::string name =
        (std::filesystem::temp_directory_path() / ("strewn-" + what + "-XXXXXX")).string();
    if (::mkdtemp(name.data()) == nullptr)
      throw std::system_error(errno, std::generic_category(), "mkdtemp " + name);
    path_ = name;
  }
  ~ScratchFolder() {
    std::error_code ignored;  // a destructor does not throw; what cannot be removed is left
    std::filesystem::remove_all(path_, ignored);
  }
  ScratchFolder(const ScratchFolder&) = delete;
  ScratchFolder& operator=(const ScratchFolder&) = delete;

  [[nodiscard]] const std::filesystem::path& path() const { return path_; }
  /// A path inside the folder.
  [[nodiscard]] std::filesystem::path operator/(const std::filesystem::path& name) const {
    return path_ / name;
  }
  [[nodiscard]] std::string string() const { return path_.string(); }

 private:
  std::filesystem::path path_;
};

}  // namespace strewn::test
