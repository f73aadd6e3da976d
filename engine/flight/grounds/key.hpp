#pragma once
// One key a ground reads from the scenario's [site] table (see flight/ground.hpp): a number, or the
// path of a file the scenario module reads for it (a terrain raster).
#include "core/bounds.hpp"

namespace strewn {

struct GroundKey {
  const char* key;
  Bounds bounds;
  bool required;      ///< a ground is chosen when all its required keys are given
  double fallback;    ///< the value when an optional key is absent
  bool file = false;  ///< a file's path (text), read by the scenario module; `bounds` unused
};

}  // namespace strewn
