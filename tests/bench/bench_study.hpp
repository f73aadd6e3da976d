#pragma once
// A scenario of tests/bench/ with its world and sample model, built once by each benchmark
// program that studies it.
#include <cstdint>
#include <string>

#include "study/study.hpp"

namespace strewn::bench {

struct BenchStudy {
  Scenario scenario;
  World world;
  SampleModel model;
  BenchStudy(const std::string& file, std::uint64_t samples)
      : scenario(load_scenario(STREWN_SOURCE_DIR "/tests/bench/" + file)),
        world(build_world(scenario)),
        model(scenario, world, samples) {}
};

}  // namespace strewn::bench
