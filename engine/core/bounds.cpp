#include "core/bounds.hpp"

#include <cmath>

#include "core/text.hpp"

namespace strewn {

std::string Bounds::describe() const {
  if (words) return words;
  std::string out = "a number";
  if (std::isfinite(low)) out += (low_open ? " above " : " from ") + format_number(low);
  if (std::isfinite(high)) out += (high_open ? " below " : " to ") + format_number(high);
  return out;
}

}  // namespace strewn
