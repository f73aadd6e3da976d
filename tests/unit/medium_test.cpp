// The medium against the U.S. Standard Atmosphere 1976 tables, and the tabulation error bounds.
#include <gtest/gtest.h>

#include <algorithm>
#include <array>
#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <random>
#include <vector>

#include "core/constants.hpp"
#include "medium/gravity.hpp"
#include "medium/medium.hpp"
#include "medium/us1976.hpp"
#include "medium/wind.hpp"
#include "support.hpp"

namespace strewn {
namespace {

// Source: U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), Part 4 Table I, values as printed
// (4-5 significant figures), from tests/reference/us1976_table.csv.
TEST(US1976, MatchesThePrintedTable) {
  const auto rows = test::read_reference("us1976_table.csv");
  ASSERT_GE(rows.size(), 15u);
  for (const auto& row : rows) {
    const double z = std::stod(row.at("altitude_m"));
    const auto s = us1976::at(z);
    SCOPED_TRACE("altitude " + row.at("altitude_m"));
    if (!row.at("temperature_K").empty()) {  // printed to 3 decimals
      EXPECT_NEAR(s.temperature, std::stod(row.at("temperature_K")), 2e-3);
    }
    if (!row.at("pressure_Pa").empty()) {  // 5 significant figures
      EXPECT_NEAR(s.pressure / std::stod(row.at("pressure_Pa")), 1.0, 1e-4);
    }
    if (!row.at("density_kg_m3").empty()) {
      EXPECT_NEAR(s.density / std::stod(row.at("density_kg_m3")), 1.0, 1e-4);
    }
    if (!row.at("sound_speed_m_s").empty()) {  // printed to 2 decimals
      EXPECT_NEAR(s.sound_speed, std::stod(row.at("sound_speed_m_s")), 0.01);
    }
    if (!row.at("viscosity_Pa_s").empty()) {  // 5 significant figures
      EXPECT_NEAR(s.viscosity / std::stod(row.at("viscosity_Pa_s")), 1.0, 1e-4);
    }
  }
}

TEST(US1976, RefusesAltitudesOutsideTheModel) {
  EXPECT_THROW(us1976::at(86001.0), std::domain_error);
  EXPECT_THROW(us1976::at(-5001.0), std::domain_error);
  EXPECT_THROW(us1976::at(std::nan("")), std::domain_error);
}

// The tabulated medium against the exact model: the bound stated in medium.hpp.
TEST(MediumTable, InterpolationErrorIsBounded) {
  const Medium table = Medium::us1976();
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> altitude(-5000.0, 86000.0);
  double worst_density = 0.0, worst_viscosity = 0.0, worst_sound = 0.0;
  for (int i = 0; i < 20000; ++i) {
    const double z = altitude(rng);
    const auto exact = us1976::at(z);
    const Air air = table.air(z, {});
    worst_density = std::max(worst_density, std::abs(air.density / exact.density - 1.0));
    worst_viscosity = std::max(worst_viscosity, std::abs(air.viscosity / exact.viscosity - 1.0));
    worst_sound = std::max(worst_sound, std::abs(air.sound_speed / exact.sound_speed - 1.0));
    EXPECT_DOUBLE_EQ(table.density(z, {}), air.density);
  }
  // Linear pressure interpolation: (h / Hs)^2 / 8 with h = 25 m and the smallest scale height
  // Hs = R T / g ~ 5.6 km (186.9 K near 86 km) gives 2.5e-6.
  EXPECT_LT(worst_density, 3e-6);
  EXPECT_LT(worst_viscosity, 1e-7);
  EXPECT_LT(worst_sound, 1e-7);
}

// The pressure of a hot or cold day, integrated independently: Boost.Odeint's Dormand-Prince
// (tolerance 1e-12) on the hydrostatic equation dp/dz = -p g(z) / (R (T(z) + dT)) with the exact
// US76 temperature (NOAA-S/T 76-1562 eqs. 18 and 33a; g(z) = g0 (r0 / (r0 + z))^2, eq. 17) from
// the standard's 101 325 Pa at sea level, up and down. Returns p at each altitude of `heights`
// (increasing from 0 upward, or decreasing from 0 downward).
std::vector<double> hydrostatic_pressures(double offset, const std::vector<double>& heights) {
  namespace odeint = boost::numeric::odeint;
  using State = std::array<double, 1>;
  const auto balance = [offset](const State& p, State& dpdz, double z) {
    dpdz[0] = -p[0] * gravity(z) /
              (constants::air_specific_gas_constant * (us1976::at(z).temperature + offset));
  };
  std::vector<double> out;
  State p{101325.0};
  double z = 0.0;
  for (double next : heights) {
    odeint::integrate_adaptive(
        odeint::make_controlled(1e-12, 1e-12, odeint::runge_kutta_dopri5<State>()), balance, p, z,
        next, next > z ? 10.0 : -10.0);
    z = next;
    out.push_back(p[0]);
  }
  return out;
}

// A hot or cold day is an atmosphere in hydrostatic balance at T' = T + dT: its pressure against
// the independent integration above, to the tabulation's own error (linear interpolation of an
// exponential over 25 m: (h / Hs)^2 / 8 with the day's scale height Hs = R T' / g0, below 3e-6
// but for the coldest days high up), for a fixed offset (one day tabulated) and for offsets drawn
// within a range (the cubic between days 5 K apart).
TEST(MediumTable, HotAndColdDaysAreInHydrostaticBalance) {
  const std::vector<double> up{1234.0, 11000.0, 20000.0, 30000.0, 50000.0, 85000.0};
  const std::vector<double> down{-2500.0, -4900.0};
  for (double offset : {25.0, -30.0, 13.7, -61.3}) {
    SCOPED_TRACE("offset " + std::to_string(offset) + " K");
    Medium fixed = Medium::us1976();
    fixed.tabulate_offsets(offset, offset);
    Medium drawn = Medium::us1976();
    drawn.tabulate_offsets(-70.0, 40.0);
    const MediumConditions day{offset, 1.1};
    const auto above = hydrostatic_pressures(offset, up);
    const auto below = hydrostatic_pressures(offset, down);
    for (const Medium* table : {&fixed, &drawn}) {
      for (std::size_t i = 0; i < up.size(); ++i) {
        const double t = us1976::at(up[i]).temperature + offset;
        const double scale_height = constants::air_specific_gas_constant * t / constants::g0;
        // The tabulation's bound, and the cubic's 1e-6 (medium.cpp, tabulate_offsets).
        const double tolerance =
            std::max(3e-6, 1.1 * std::pow(25.0 / scale_height, 2) / 8.0) + 1e-6;
        EXPECT_NEAR(table->pressure(up[i], day) / above[i], 1.0, tolerance) << up[i] << " m";
        const double rho = 1.1 * above[i] / (constants::air_specific_gas_constant * t);
        EXPECT_NEAR(table->density(up[i], day) / rho, 1.0, tolerance) << up[i] << " m";
        EXPECT_NEAR(table->air(up[i], day).sound_speed, us1976::sound_speed(t), 1e-4);
      }
      for (std::size_t i = 0; i < down.size(); ++i)
        EXPECT_NEAR(table->pressure(down[i], day) / below[i], 1.0, 3e-6) << down[i] << " m";
      // Sea level keeps the standard's pressure whatever the day.
      EXPECT_NEAR(table->pressure(0.0, day), 101325.0, 1e-6);
    }
  }
}

// At zero offset the day is the standard atmosphere itself, with or without the lattice; and the
// old reading (the standard pressure under a warmer temperature) is off at altitude by the share
// the balanced day's pressure gains: at +25 K and 20 km, a third (the integration above gives
// p'/p = 1.326: the old density was 25 % under the balanced day's).
TEST(MediumTable, ZeroOffsetIsTheStandardAtmosphere) {
  Medium table = Medium::us1976();
  table.tabulate_offsets(-40.0, 40.0);
  for (double z : {-3000.0, 0.0, 5000.0, 20000.0, 80000.0}) {
    EXPECT_NEAR(table.density(z, {}) / us1976::at(z).density, 1.0, 3e-6);
    EXPECT_NEAR(table.pressure(z, {}) / us1976::at(z).pressure, 1.0, 3e-6);
  }
  const double balanced = hydrostatic_pressures(25.0, {20000.0})[0];
  EXPECT_NEAR(balanced / us1976::at(20000.0).pressure, 1.326, 1e-3);
  EXPECT_NEAR(table.pressure(20000.0, {25.0, 1.0}) / balanced, 1.0, 3e-6);
  // An offset outside the lattice takes the pressure of its nearer end; none at all is refused.
  EXPECT_DOUBLE_EQ(table.pressure(9000.0, {55.0, 1.0}), table.pressure(9000.0, {40.0, 1.0}));
  EXPECT_THROW((void)Medium::us1976().density(1000.0, {5.0, 1.0}), std::logic_error);
}

// A sounding built from US76 levels 1 km apart. In the isothermal layer (11 019 .. 20 063 m
// geometric) log pressure is linear in altitude up to the gravity variation, so log-pressure
// interpolation is exact there but for the tabulation (bound 1e-5). In a layer with lapse rate L,
// log p bends with curvature g L / (R T^2), so over 1 km levels the density error is at most
// (1000^2 / 8) g L / (R T^2) = 3.3e-4 near the ground (the interpolation law's own error).
TEST(MediumProfile, LogPressureInterpolation) {
  std::vector<SoundingLevel> levels;
  for (double z = 0.0; z <= 20000.0; z += 1000.0) {
    const auto s = us1976::at(z);
    levels.push_back({z, s.temperature, s.pressure});
  }
  const Medium profile = Medium::profile(levels);
  for (double z : {12500.0, 15250.0, 19900.0})
    EXPECT_NEAR(profile.density(z, {}) / us1976::at(z).density, 1.0, 1e-5);
  for (double z : {500.0, 2750.0, 8100.0})
    EXPECT_NEAR(profile.density(z, {}) / us1976::at(z).density, 1.0, 3.5e-4);
  EXPECT_THROW(Medium::profile({{0.0, 288.0, 1e5}}), std::invalid_argument);
  EXPECT_THROW(Medium::profile({{0.0, 288.0, 1e5}, {0.0, 280.0, 9e4}}), std::invalid_argument);
  EXPECT_THROW(Medium::profile({{0.0, 288.0, 1e5}, {10.0, -1.0, 9e4}}), std::invalid_argument);
}

// A sounding that gives temperature without pressure: the standard atmosphere's pressure at its
// lowest level and the hydrostatic law above it. Levels of the exact US76 temperature 500 m apart,
// and at the bases of its layers, then reproduce US76's pressure to the error of linear
// temperature between levels (the temperature is linear in geopotential, not quite in altitude:
// below 1e-5), and a hot day on it keeps the lowest level's pressure and balances like the
// standard's.
TEST(MediumProfile, TemperatureWithoutPressureIsBalancedHydrostatically) {
  std::vector<double> heights;
  for (double z = 0.0; z <= 30000.0; z += 500.0) heights.push_back(z);
  for (double base : {11000.0, 20000.0})  // geopotential bases, as geometric altitudes
    heights.push_back(constants::earth_radius * base / (constants::earth_radius - base));
  std::sort(heights.begin(), heights.end());
  std::vector<SoundingLevel> levels;
  for (double z : heights) levels.push_back({z, us1976::at(z).temperature, std::nan("")});
  Medium profile = Medium::profile(levels);
  for (double z : {0.0, 750.0, 5000.0, 11000.0, 15100.0, 29990.0})
    EXPECT_NEAR(profile.pressure(z, {}) / us1976::at(z).pressure, 1.0, 1e-5) << z << " m";
  profile.tabulate_offsets(20.0, 20.0);
  const auto balanced = hydrostatic_pressures(20.0, {12000.0, 25000.0});
  EXPECT_NEAR(profile.pressure(12000.0, {20.0, 1.0}) / balanced[0], 1.0, 1e-5);
  EXPECT_NEAR(profile.pressure(25000.0, {20.0, 1.0}) / balanced[1], 1.0, 1e-5);
  // Some levels with pressure and some without is not a sounding strewn reads.
  levels[3].pressure = 9e4;
  EXPECT_THROW(Medium::profile(levels), std::invalid_argument);
  // Starting above the standard's 86 km, no pressure can be borrowed from it.
  EXPECT_THROW(Medium::profile({{90000.0, 190.0, std::nan("")}, {91000.0, 190.0, std::nan("")}}),
               std::invalid_argument);
}

TEST(MediumUniform, ConstantEverywhere) {
  const Medium water = Medium::uniform(998.2, 1.0016e-3, 1482.0);
  for (double z : {-100.0, 0.0, 5.0, 1e5}) {
    const Air air = water.air(z, {});
    EXPECT_EQ(air.density, 998.2);
    EXPECT_EQ(air.viscosity, 1.0016e-3);
    EXPECT_EQ(air.sound_speed, 1482.0);
  }
  EXPECT_TRUE(std::isinf(Medium::uniform(1.2, 1.8e-5).air(0.0, {}).sound_speed));
}

// Inverse-square gravity; 9.7759 m/s^2 at 10 km is the US76 table value (from memory).
TEST(Gravity, InverseSquareLaw) {
  EXPECT_DOUBLE_EQ(gravity(0.0), constants::g0);
  EXPECT_NEAR(gravity(10000.0), 9.7759, 5e-5);
  EXPECT_NEAR(gravity(constants::earth_radius), constants::g0 / 4.0, 1e-12);
}

// Meteorological convention: a wind from 270 degrees (west) blows toward the east.
TEST(Wind, LayersPowerLawAndConvention) {
  const double ground = 500.0;
  const WindProfile wind({{600.0, 10.0, 270.0}, {1600.0, 20.0, 180.0}}, ground);
  EXPECT_NEAR(wind.at(600.0).x(), 10.0, 1e-12);
  EXPECT_NEAR(wind.at(600.0).y(), 0.0, 1e-12);
  EXPECT_NEAR(wind.at(1600.0).y(), 20.0, 1e-12);  // from the south: toward the north
  // Linear in east/north components halfway between layers.
  EXPECT_NEAR(wind.at(1100.0).x(), 5.0, 1e-12);
  EXPECT_NEAR(wind.at(1100.0).y(), 10.0, 1e-12);
  EXPECT_NEAR(wind.at(5000.0).y(), 20.0, 1e-12);  // constant above the top
  // 1/7 power law below the lowest layer (common practice), constant below 10 m above ground.
  EXPECT_NEAR(wind.at(ground + 50.0).x(), 10.0 * std::pow(50.0 / 100.0, 1.0 / 7.0), 1e-12);
  EXPECT_NEAR(wind.at(ground + 2.0).x(), 10.0 * std::pow(10.0 / 100.0, 1.0 / 7.0), 1e-12);
  EXPECT_EQ(wind.kinks().size(), 3u);
  EXPECT_DOUBLE_EQ(wind.kinks().front(), ground + 10.0);
  EXPECT_THROW(WindProfile({{600.0, 1.0, 0.0}, {600.0, 2.0, 0.0}}, 0.0), std::invalid_argument);
  EXPECT_THROW(WindProfile({{600.0, -1.0, 0.0}}, 0.0), std::invalid_argument);
  EXPECT_TRUE(WindProfile().calm());
}

}  // namespace
}  // namespace strewn
