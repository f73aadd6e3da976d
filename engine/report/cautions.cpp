#include "report/cautions.hpp"

namespace strewn {

const std::vector<std::string>& cautions() {
  static const std::vector<std::string> text{
      "Results are engineering estimates that depend entirely on the inputs given; check them "
      "against experience and measurements.",
      "Each drag model holds only within its stated range of validity (see docs/model.md); the "
      "regime report says where a flight left it.",
      "Exclusion zones and acceptance criteria are set by the responsible authority under local "
      "regulations and licensed practice; strewn reports against the criteria entered and never "
      "declares anything safe."};
  return text;
}

}  // namespace strewn
