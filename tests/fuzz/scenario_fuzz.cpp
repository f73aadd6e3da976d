// libFuzzer target over scenario loading and validation: any bytes given as a scenario must end
// in a valid scenario or in a ScenarioError (or IoError for files it names), never in a crash, a
// hang, an undefined behaviour or another exception. Built with clang, -fsanitize=fuzzer,
// address and undefined (scripts/fuzz); the seed corpus is inputs/, tests/data/ and
// tests/bad-inputs/. A crash it finds becomes a case of the bad-input catalogue.
#include <cstddef>
#include <cstdint>
#include <string>

#include "core/errors.hpp"
#include "scenario/scenario.hpp"
#include "scenario/world.hpp"
#include "study/sample_model.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  try {
    // Files the scenario names are looked up beside this (non-existent) path.
    const strewn::Scenario scenario = strewn::parse_scenario(text, "/nonexistent/fuzz.toml");
    const strewn::World world = strewn::build_world(scenario);
    const strewn::SampleModel model(scenario, world, 4);  // correlations, sampler
    strewn::SampleModel::Workspace workspace(model);
    for (std::uint64_t i = 0; i < 4; ++i) {  // every sampled input drawn for a few samples
      model.prepare(i, workspace);
      for (std::size_t b = 0; b < model.bodies(); ++b) (void)model.flight(i, b, workspace);
    }
  } catch (const strewn::ScenarioError&) {
  } catch (const strewn::IoError&) {
  }
  return 0;
}
