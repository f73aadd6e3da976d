// The medium against the U.S. Standard Atmosphere 1976 tables, and the tabulation error bounds.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

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

// Hot/cold day: T' = T + dT on the standard pressure, rho = p / (R T') (ideal gas law).
TEST(MediumTable, TemperatureOffsetAndDensityFactor) {
  const Medium table = Medium::us1976();
  const MediumConditions hot{15.0, 1.1};
  for (double z : {0.0, 1234.0, 11000.0, 30000.0}) {
    const auto s = us1976::at(z);
    const double expected =
        1.1 * s.pressure / (constants::air_specific_gas_constant * (s.temperature + 15.0));
    EXPECT_NEAR(table.density(z, hot) / expected, 1.0, 2e-6);
    EXPECT_NEAR(table.air(z, hot).sound_speed, us1976::sound_speed(s.temperature + 15.0), 1e-4);
  }
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
