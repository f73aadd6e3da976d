#pragma once
// A flight drawn at random within the scenario contract, for tests over a broad family of flights:
// every drag model, layered winds with the power law below, hot and cold days, Mach tables,
// parachutes by time and by height, uniform media (test tanks).
#include <memory>
#include <random>
#include <string>
#include <vector>

#include "flight/flight.hpp"
#include "support.hpp"

namespace strewn::test {

struct RandomFlight {
  Medium medium = Medium::us1976();
  WindProfile wind;
  std::unique_ptr<MachTable> mach;
  Body body;
  Environment environment;
  ReleaseState release;
  std::string description;
};

// A flight drawn at random within the contract: every drag model, layered winds with the power
// law below, hot and cold days, Mach tables, parachutes by time and by height, uniform media.
inline RandomFlight draw_flight(std::mt19937_64& rng) {
  auto u = [&](double a, double b) { return std::uniform_real_distribution<double>(a, b)(rng); };
  auto pick = [&](int n) { return std::uniform_int_distribution<int>(0, n - 1)(rng); };
  RandomFlight f;
  const double ground = u(0.0, 2000.0);
  const bool tank = pick(8) == 0;
  if (tank) f.medium = Medium::uniform(u(800.0, 1300.0), u(1e-3, 0.05));
  std::vector<WindLayer> layers;
  double z = ground + u(0.0, 300.0);
  for (int i = 0, n = pick(6); i < n; ++i) {
    layers.push_back({z, tank ? u(0.0, 0.05) : u(0.0, 30.0), u(0.0, 360.0)});
    z += u(50.0, 3000.0);
  }
  f.wind = WindProfile(layers, ground);
  f.environment = Environment{&f.medium, {u(-20.0, 20.0), u(0.9, 1.1)}, &f.wind, ground};
  // The hot or cold day of this flight (its pressure balanced hydrostatically).
  const double offset = f.environment.conditions.temperature_offset;
  f.medium.tabulate_offsets(offset, offset);
  const int model = tank ? pick(3) : pick(4);
  // Linear-drag droplets in air fall so slowly that an explicit reference needs a step per few
  // milliseconds: they fall from at most 20 m (and exercise the quasi-steady form).
  const double height = tank ? u(0.2, 5.0) : model == 2 ? u(1.0, 20.0) : u(5.0, 10000.0);
  if (model == 0 || model == 3) {
    // (The material density is drawn before the diameter, as in the family's first draws.)
    const double density = u(tank ? 2000.0 : 300.0, 8000.0);
    const double diameter = tank ? u(1e-3, 0.02) : u(1e-3, 0.5);
    f.body = test::round_body(SphereDrag(diameter), density);
    if (model == 3) {
      const double cd = u(0.3, 1.5);
      f.body.drag.law = AreaDrag(cd, u(0.001, 2.0));
      f.body.volume = 0.0;
    }
  } else if (model == 1) {
    const double density = u(1500.0, 8000.0);
    const double diameter = tank ? u(1e-3, 0.02) : u(1e-3, 0.3);
    f.body = test::round_body(ShapeDrag(diameter, 1.0), density);
    f.body.drag.law = ShapeDrag(diameter, u(0.3, 1.0));
  } else {
    const double density = u(1500.0, 3000.0);
    const double diameter = tank ? u(5e-4, 2e-3) : u(20e-6, 60e-6);
    f.body = test::round_body(StokesDrag(diameter), density);
  }
  if (!tank && model != 2 && pick(3) == 0) {
    f.mach = std::make_unique<MachTable>(std::vector<double>{0.0, 0.8, 1.1, 3.0},
                                         std::vector<double>{1.0, 1.1, u(1.3, 2.0), 1.2});
    f.body.drag.mach_table = f.mach.get();
  }
  if (!tank && model != 2 && pick(3) == 0) {
    f.body.has_canopy = true;
    f.body.canopy.trigger = pick(2) ? Canopy::Trigger::time : Canopy::Trigger::height;
    f.body.canopy.deploy_after = u(0.0, 10.0);
    f.body.canopy.deploy_height = u(50.0, 1500.0);
    f.body.canopy.fill_time = pick(4) ? u(0.5, 4.0) : 0.0;
    // Canopies sized as real ones are: a descent speed of about 3 to 9 m/s near the ground,
    // i.e. Cd S = 2 m g / (rho v^2) between 0.2 and 2 m^2 per kilogram.
    f.body.canopy.drag_area = f.body.mass * u(0.2, 2.0);
  }
  const double speed = tank ? u(0.0, 0.5) : u(0.0, f.mach ? 700.0 : 120.0);
  const Eigen::Vector2d ahead = bearing_unit(u(0.0, 360.0));
  f.release = test::release_at(u(-500, 500), u(-500, 500), ground + height, speed * ahead.x(),
                               speed * ahead.y(), tank ? 0.0 : u(-10.0, 10.0));
  f.description = std::string(drag_model_name(f.body.drag.model())) + " mass " +
                  std::to_string(f.body.mass) + " height " + std::to_string(height) + " speed " +
                  std::to_string(speed) + (f.body.has_canopy ? " canopy" : "") +
                  (f.mach ? " mach" : "") + (tank ? " tank" : "") + " layers " +
                  std::to_string(layers.size());
  return f;
}

}  // namespace strewn::test
