// The flight model against closed-form solutions (each named beside its check). These use a
// uniform medium and constant gravity, the assumptions of the closed forms.
#include <gtest/gtest.h>

#include <boost/math/special_functions/lambert_w.hpp>
#include <cmath>

#include "flight/flight.hpp"
#include "support.hpp"

namespace strewn {
namespace {

constexpr double g = constants::g0;

struct Tank {
  Medium medium;
  WindProfile wind;
  Environment environment() const {
    Environment e{&medium, {}, &wind, 0.0};
    e.constant_gravity = true;
    return e;
  }
};

// Linear (Stokes) drag: with tau = m / (3 pi mu D) and v_t = g_eff tau, starting at (u0, w0) in a
// uniform wind w, x(t) = x0 + w t + (u0 - w) tau (1 - e^{-t/tau}),
// z(t) = z0 + tau (w0 + v_t)(1 - e^{-t/tau}) - v_t t. The impact time solves z(t) = 0, i.e.
// t = a - b e^{-t/tau} with b = tau (w0 + v_t) / v_t and a = z0 / v_t + b, in closed form
// t = a + tau W0(-(b/tau) e^{-a/tau}), with Boost.Math's lambert_w0 as the reference.
TEST(FlightAnalytic, LinearDragTrajectoryByLambertW) {
  // A 2 mm glass bead in a light oil with a slow current: tau = 0.056 s, v_t = 0.27 m/s, so the
  // release transient and the settling both shape the 2 s fall.
  const double mu = 0.01;
  Tank tank{Medium::uniform(1260.0, mu), WindProfile({{0.0, 0.02, 270.0}}, 0.0)};
  const Body bead = test::round_body(StokesDrag(2e-3), 2500.0);
  const double tau = bead.mass / (3.0 * constants::pi * mu * 2e-3);
  const double g_eff = g * (1.0 - 1260.0 / 2500.0);
  const double vt = g_eff * tau;
  const double z0 = 0.5, u0 = 0.05, w0 = 0.03, wind = 0.02;
  FlightOptions options;
  options.tolerance = 1e-6;
  options.allow_quasi_steady = false;
  const auto result = fly(bead, tank.environment(), test::release_at(0, 0, z0, u0, 0, w0), options);
  ASSERT_EQ(result.status, FlightStatus::landed);
  const double b = tau * (w0 + vt) / vt;
  const double a = z0 / vt + b;
  const double t = a + tau * boost::math::lambert_w0(-(b / tau) * std::exp(-a / tau));
  EXPECT_NEAR(result.time, t, 1e-6);
  EXPECT_NEAR(result.position.x(), wind * t + (u0 - wind) * tau * (1.0 - std::exp(-t / tau)), 1e-6);
  EXPECT_NEAR(result.velocity.z(), (w0 + vt) * std::exp(-t / tau) - vt, 1e-6);
}

// Stokes settling velocity v = (rho_p - rho_f) g D^2 / (18 mu) (Stokes 1851), reached by the full
// equations from rest and given by the force balance.
TEST(FlightAnalytic, StokesSettlingVelocity) {
  Tank tank{Medium::uniform(1260.0, 1.41), WindProfile()};
  const Body bead = test::round_body(SphereDrag(1e-3), 7800.0);  // steel, Re ~ 2e-3
  const double expected = (7800.0 - 1260.0) * g * 1e-6 / (18.0 * 1.41);
  FlightOptions options;
  options.tolerance = 1e-7;
  options.allow_quasi_steady = false;
  const auto result = fly(bead, tank.environment(), test::release_at(0, 0, 0.05, 0, 0, 0), options);
  ASSERT_EQ(result.status, FlightStatus::landed);
  // Re ~ 2e-3: Morrison's Cd is within 0.1 percent of 24/Re there.
  EXPECT_NEAR(-result.velocity.z() / expected, 1.0, 1e-3);
  const Forces forces(bead, tank.environment());
  EXPECT_NEAR(forces.terminal_speed(0.0) / expected, 1.0, 1e-3);
}

// Quadratic drag, vertical fall from rest in still air: z = z0 - (v_t^2/g) ln cosh(g t / v_t),
// v = v_t tanh(g t / v_t), v_t = sqrt(2 m g / (rho Cd A)) (the classical closed form).
TEST(FlightAnalytic, QuadraticDragVerticalFall) {
  Tank tank{Medium::uniform(1.2, 1.8e-5), WindProfile()};
  const Body box = test::area_body(20.0, 1.05, 0.3);
  const double vt = std::sqrt(2.0 * 20.0 * g / (1.2 * 1.05 * 0.3));
  const double height = 1500.0;
  const double t = vt / g * std::acosh(std::exp(height * g / (vt * vt)));
  // At the default tolerance (0.05 m at the impact point) and at a tight one.
  for (const auto& [tolerance, time_error, speed_error] :
       {std::tuple{0.05, 1e-4, 2e-3}, std::tuple{1e-5, 1e-7, 1e-6}}) {
    FlightOptions options;
    options.tolerance = tolerance;
    const auto result =
        fly(box, tank.environment(), test::release_at(0, 0, height, 0, 0, 0), options);
    ASSERT_EQ(result.status, FlightStatus::landed);
    EXPECT_NEAR(result.time, t, time_error);
    EXPECT_NEAR(-result.velocity.z(), vt * std::tanh(g * t / vt), speed_error);
    EXPECT_NEAR(result.position.x(), 0.0, 1e-12);
  }
}

// No drag (Cd = 0): the vacuum parabola x = u0 t, z = z0 + w0 t - g t^2 / 2.
TEST(FlightAnalytic, VacuumParabola) {
  Tank tank{Medium::uniform(1.2, 1.8e-5), WindProfile({{0.0, 15.0, 90.0}}, 0.0)};
  const Body body = test::area_body(5.0, 0.0, 1.0);
  const double u0 = 40.0, v0 = -10.0, w0 = 25.0, z0 = 800.0;
  const auto result = fly(body, tank.environment(), test::release_at(0, 0, z0, u0, v0, w0));
  ASSERT_EQ(result.status, FlightStatus::landed);
  const double t = (w0 + std::sqrt(w0 * w0 + 2.0 * g * z0)) / g;
  EXPECT_NEAR(result.time, t, 1e-6);
  EXPECT_NEAR(result.position.x(), u0 * t, 1e-4);
  EXPECT_NEAR(result.position.y(), v0 * t, 1e-4);
  EXPECT_NEAR(result.energy, 0.5 * 5.0 * (u0 * u0 + v0 * v0 + w0 * w0 + 2.0 * g * z0), 1e-3);
  EXPECT_NEAR(result.angle, std::atan2(g * t - w0, std::hypot(u0, v0)) / constants::degree, 1e-6);
}

// A body already at its terminal velocity in a uniform wind drifts by wind x fall time
// (common practice).
TEST(FlightAnalytic, DriftAtTerminalVelocityIsWindTimesFallTime) {
  Tank tank{Medium::uniform(1.2, 1.8e-5), WindProfile({{0.0, 7.0, 225.0}}, 0.0)};
  const Body body = test::area_body(2.0, 0.8, 0.05);
  const double vt = std::sqrt(2.0 * 2.0 * g / (1.2 * 0.8 * 0.05));
  const Eigen::Vector2d w = wind_from(7.0, 225.0);
  const double height = 400.0;
  const auto result =
      fly(body, tank.environment(), test::release_at(0, 0, height, w.x(), w.y(), -vt));
  ASSERT_EQ(result.status, FlightStatus::landed);
  EXPECT_NEAR(result.time, height / vt, 1e-6);
  EXPECT_NEAR(result.position.x(), w.x() * height / vt, 1e-4);
  EXPECT_NEAR(result.position.y(), w.y() * height / vt, 1e-4);
}

// Water drops in laboratory air (20 C, 1013 hPa): terminal velocities of Gunn and Kinzer (1949),
// tests/reference/water_drop_terminal_velocity.csv, within 8 percent up to 1 mm with the sphere
// model (rigid sphere; larger drops deform). Air density from the ideal gas law, viscosity from
// Sutherland's law; water 998.2 kg/m^3 at 20 C (handbook value, from memory).
TEST(FlightAnalytic, WaterDropTerminalVelocityGunnKinzer) {
  const double t_air = 293.15, p_air = 101300.0;
  const double rho = p_air / (constants::air_specific_gas_constant * t_air);
  const double mu =
      constants::sutherland_beta * std::pow(t_air, 1.5) / (t_air + constants::sutherland_s);
  Tank tank{Medium::uniform(rho, mu), WindProfile()};
  int checked = 0;
  for (const auto& row : test::read_reference("water_drop_terminal_velocity.csv")) {
    const double diameter = std::stod(row.at("diameter_mm")) * 1e-3;
    if (diameter > 1.0e-3 + 1e-12) continue;
    const double measured = std::stod(row.at("terminal_velocity_m_s"));
    const Body drop = test::round_body(SphereDrag(diameter), 998.2);
    // Dropped from rest from 30 m: long enough to reach the terminal velocity.
    const auto result = fly(drop, tank.environment(), test::release_at(0, 0, 30.0, 0, 0, 0));
    ASSERT_EQ(result.status, FlightStatus::landed);
    EXPECT_NEAR(-result.velocity.z() / measured, 1.0, 0.08) << "diameter " << diameter;
    const Forces forces(drop, tank.environment());
    EXPECT_NEAR(forces.terminal_speed(0.0) / -result.velocity.z(), 1.0, 1e-3);
    ++checked;
  }
  EXPECT_EQ(checked, 10);
}

}  // namespace
}  // namespace strewn
