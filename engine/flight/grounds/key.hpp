#pragma once
// One number a ground reads from the scenario's [site] table (see flight/ground.hpp).
#include "core/bounds.hpp"

namespace strewn {

struct GroundKey {
  const char* key;
  Bounds bounds;
  bool required;    ///< a ground is chosen when all its required keys are given
  double fallback;  ///< the value when an optional key is absent
};

}  // namespace strewn
