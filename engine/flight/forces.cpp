#include "flight/forces.hpp"

#include <boost/math/tools/toms748_solve.hpp>
#include <limits>

namespace strewn {

double Forces::terminal_speed(double z) const {
  const double weight = mass_ * effective_gravity(z);
  if (!(weight > 0.0)) return std::numeric_limits<double>::quiet_NaN();
  if (drag_.constant_cd()) {
    // Newton's law with constant Cd: v_t = sqrt(m g_eff / (1/2 rho Cd A)); only the density.
    const Air air{medium_.density(z), 0.0, 0.0};
    return std::sqrt(weight / drag_.coefficient(1.0, air));
  }
  const Air air = medium_.air(z);
  if (drag_.linear()) return weight / drag_.coefficient(0.0, air);  // Stokes: k independent of v
  // Force balance k(v) v = m g_eff, solved by bracketing. The drag force grows with speed and is
  // at least the Stokes force for the diameter models (Cd Re >= 24), so the Stokes settling
  // speed bounds the root from above; for the others the bracket is widened until it holds.
  auto balance = [&](double v) { return drag_.coefficient(v, air) * v - weight; };
  double high = 1.0;
  if (drag_.needs_viscosity())
    high = weight / (3.0 * constants::pi * drag_.length() * air.viscosity);
  for (int i = 0; i < 200 && balance(high) < 0.0; ++i) high *= 2.0;
  if (!(balance(high) >= 0.0)) return std::numeric_limits<double>::quiet_NaN();
  std::uintmax_t iterations = 100;
  const auto root =
      boost::math::tools::toms748_solve(balance, 0.0, high, -weight, balance(high),
                                        boost::math::tools::eps_tolerance<double>(48), iterations);
  return 0.5 * (root.first + root.second);
}

}  // namespace strewn
