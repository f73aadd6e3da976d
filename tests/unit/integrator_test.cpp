// The integrator's three parts used alone: the Dormand-Prince trial step (dormand_prince_step.hpp),
// the PI step-size controller (step_control.hpp) and the dense output (dense_output.hpp), each
// against its source or against Boost.Odeint's runge_kutta_dopri5, an independent implementation
// of the same method.
#include <gtest/gtest.h>

#include <array>
#include <boost/numeric/odeint.hpp>
#include <cmath>

#include "flight/dense_output.hpp"
#include "flight/dormand_prince_step.hpp"
#include "flight/step_control.hpp"

namespace strewn {
namespace {

using Scalar1 = Eigen::Matrix<double, 1, 1>;
using Step1 = DormandPrince5Step<1>;

Scalar1 scalar(double v) {
  return Scalar1::Constant(v);
}

// y' = -y, for Strewn's stepper and for Odeint's.
void decay(double, const Scalar1& y, Scalar1& d) {
  d = -y;
}
void decay_odeint(const std::array<double, 1>& y, std::array<double, 1>& d, double) {
  d[0] = -y[0];
}

// y' = k t^(k - 1), y = t^k: a quadrature, exact for a rule of order k or more.
auto power_rate(int k) {
  return [k](double t, const Scalar1&, Scalar1& d) { d[0] = k * std::pow(t, k - 1); };
}

// One trial step of y' = -y from (0.3, 1.2) with h = 0.4 by both; the result and the error
// estimate agree to rounding (Dormand and Prince 1980, the same tableau in Boost.Odeint's
// runge_kutta_dopri5), and k7 is f at the new state (first same as last).
TEST(IntegratorParts, TrialStepMatchesOdeintDopri5) {
  const double t = 0.3, h = 0.4;
  Scalar1 k1;
  decay(t, scalar(1.2), k1);
  Dopri5Stages<1> out;
  Step1::trial(decay, t, scalar(1.2), k1, h, out);

  boost::numeric::odeint::runge_kutta_dopri5<std::array<double, 1>> odeint;
  const std::array<double, 1> x{1.2}, dxdt{-1.2};
  std::array<double, 1> x_new{}, dxdt_new{}, x_error{};
  odeint.do_step(decay_odeint, x, dxdt, t, x_new, dxdt_new, h, x_error);

  EXPECT_NEAR(out.y_new[0], x_new[0], 1e-15);
  EXPECT_NEAR(out.y_new[0], 1.2 * std::exp(-h), 1e-5);  // and it is a good step
  EXPECT_NEAR(out.error[0] * h, x_error[0], 1e-12 * std::abs(x_error[0]));
  EXPECT_GT(std::abs(out.error[0] * h), 1e-7);  // an estimate that is not trivially zero
  EXPECT_EQ(out.k7[0], -out.y_new[0]);          // first same as last, bit for bit
}

// Order 5 of the solution and order 4 of the embedded one (Dormand and Prince 1980): on
// y' = 5 t^4 the step is exact and the error estimate is not zero; on y' = 4 t^3 both are exact,
// so the estimate vanishes.
TEST(IntegratorParts, TrialStepHasOrdersFiveAndFour) {
  const double h = 0.5;
  Dopri5Stages<1> out;
  auto quintic = power_rate(5);
  Step1::trial(quintic, 0.0, scalar(0.0), scalar(0.0), h, out);
  EXPECT_NEAR(out.y_new[0], std::pow(h, 5), 1e-16);
  EXPECT_GT(std::abs(out.error[0] * h), 1e-5 * std::pow(h, 5));
  auto quartic = power_rate(4);
  Step1::trial(quartic, 0.0, scalar(0.0), scalar(0.0), h, out);
  EXPECT_NEAR(out.y_new[0], std::pow(h, 4), 1e-16);
  EXPECT_LT(std::abs(out.error[0] * h), 1e-16);
}

// The PI controller alone (Hairer, Norsett, Wanner 1993, II.4 and their code DOPRI5).
TEST(IntegratorParts, ControllerAcceptsRejectsAndBoundsTheStep) {
  PiStepControl control;
  control.restart(0.1);
  EXPECT_EQ(control.trial_step(), 0.1);
  // II.4: a step is accepted when its error norm is at most 1, however small it is: then the
  // next step grows, by at most facmax = 10.
  EXPECT_TRUE(control.judge(1e-12, 0.1, false));
  EXPECT_EQ(control.proposed_step(), 0.1 * 10.0);
  EXPECT_TRUE(control.judge(1.0, 1.0, false));
  EXPECT_LT(control.proposed_step(), 1.0);  // no growth at an error of 1 (the safety factor)
  // II.4: a rejected step is retried with h (0.9 / err^(1/5)), never less than facmin = 0.2 h.
  EXPECT_FALSE(control.judge(2.0, 1.0, false));
  EXPECT_EQ(control.proposed_step(), 0.9 * std::pow(2.0, -0.2));
  EXPECT_FALSE(control.judge(1e6, 1.0, false));
  EXPECT_EQ(control.proposed_step(), 0.2);
  EXPECT_TRUE(control.last_rejected());
  // II.4 (and DOPRI5): right after a rejection the step does not grow, however small the error.
  EXPECT_TRUE(control.judge(1e-12, 0.2, false));
  EXPECT_EQ(control.proposed_step(), 0.2);
  EXPECT_FALSE(control.last_rejected());
  // A step cut short to end on a limit keeps the larger proposal it had before the cut.
  // (Not cut short, it would propose 10 times 0.001.)
  EXPECT_TRUE(control.judge(1e-12, 0.001, true));
  EXPECT_EQ(control.proposed_step(), 0.2);
}

// The PI proposal (II.4: h 0.9 err_n^(-alpha) err_(n-1)^beta, alpha = 0.2 - 0.75 beta,
// beta = 0.04) within what its fast log2 and 2^x allow: 2^x above the truth by at most 6.2 %
// (Schraudolph 1999), log2 below it by at most 0.0861 (Blinn 1997), which makes the factor at
// most 1.0616 2^(0.0861 alpha) = 1.0725 times too large and 2^(-0.0861 beta) = 0.9976 times too
// small.
TEST(IntegratorParts, ControllerProposesThePiStep) {
  PiStepControl control;
  control.restart(1.0);  // as if the step before had an error of 1e-4
  const double error = 0.5, previous = 1e-4;
  ASSERT_TRUE(control.judge(error, 1.0, false));
  const double beta = 0.04, alpha = 0.2 - 0.75 * beta;
  const double exact = 0.9 * std::pow(previous, beta) * std::pow(error, -alpha);
  EXPECT_GE(control.proposed_step(), exact * 0.9976);
  EXPECT_LE(control.proposed_step(), exact * 1.0725);
}

// Error per unit step (II.4): with a reference time T, a step of h < T is held to a tolerance
// h / T as large; fixed steps are all accepted.
TEST(IntegratorParts, ControllerScalesTheErrorPerUnitStep) {
  PiStepControl control;
  control.restart(1.0);
  EXPECT_TRUE(control.judge(0.2, 1.0, false));  // per step: 0.2 <= 1
  control.set_reference_time(10.0);
  EXPECT_FALSE(control.judge(0.2, 1.0, false));  // per unit step: 0.2 > 1 / 10
  EXPECT_TRUE(control.judge(0.05, 1.0, false));  // 0.05 <= 1 / 10
  EXPECT_TRUE(control.judge(0.2, 20.0, false));  // h beyond T: per step again
  control.set_fixed_step(0.3);
  EXPECT_TRUE(control.fixed());
  EXPECT_EQ(control.trial_step(), 0.3);
  EXPECT_TRUE(control.judge(1e6, 0.3, false));
}

// The dense output of one trial step accepted from (t0, y0).
struct DenseStep {
  Dopri5Stages<1> stages;
  Dopri5DenseOutput<1> dense;
  Scalar1 k1;
  double t0, h;
  template <class Rhs>
  DenseStep(Rhs& f, double t0_, const Scalar1& y0, double h_) : t0(t0_), h(h_) {
    f(t0, y0, k1);
    Step1::trial(f, t0, y0, k1, h, stages);
    dense.accept(t0, t0 + h, h, y0, k1, stages.k7);
  }
  [[nodiscard]] double at(double theta) const {
    return dense.state(t0 + theta * h, stages.y_new, stages)[0];
  }
};

// The continuous extension passes through both ends of the step with their derivatives k1 and
// k7 (Hairer, Norsett, Wanner 1993, II.6: the DOPRI5 extension is C1 across steps), and one
// component alone is the whole state's.
TEST(IntegratorParts, DenseOutputMatchesTheStepEnds) {
  const DenseStep s(decay, 0.3, scalar(1.2), 0.4);
  EXPECT_EQ(s.at(0.0), 1.2);
  EXPECT_DOUBLE_EQ(s.at(1.0), s.stages.y_new[0]);
  EXPECT_NEAR(s.dense.rate(0, s.t0, s.stages.y_new, s.stages), s.k1[0], 1e-14);
  EXPECT_NEAR(s.dense.rate(0, s.t0 + s.h, s.stages.y_new, s.stages), s.stages.k7[0], 1e-14);
  for (double theta = 0.0; theta <= 1.0; theta += 0.125)
    EXPECT_DOUBLE_EQ(s.dense.component(0, 0.3 + theta * 0.4, s.stages.y_new, s.stages),
                     s.at(theta));
}

// Order 4 of the extension (II.6): exact on y' = 4 t^3 inside the step, value and rate, and not
// on y' = 5 t^4 (so the exactness says something).
TEST(IntegratorParts, DenseOutputIsExactForQuartics) {
  auto quartic = power_rate(4);
  const DenseStep s(quartic, 0.25, scalar(std::pow(0.25, 4)), 0.5);
  double worst = 0.0, worst_rate = 0.0;
  for (double theta = 0.0; theta <= 1.0; theta += 1.0 / 16) {
    const double t = 0.25 + theta * 0.5;
    worst = std::max(worst, std::abs(s.at(theta) - std::pow(t, 4)));
    worst_rate = std::max(
        worst_rate, std::abs(s.dense.rate(0, t, s.stages.y_new, s.stages) - 4 * std::pow(t, 3)));
  }
  EXPECT_LT(worst, 1e-15);
  EXPECT_LT(worst_rate, 1e-14);
  auto quintic = power_rate(5);
  const DenseStep q(quintic, 0.25, scalar(std::pow(0.25, 5)), 0.5);
  EXPECT_GT(std::abs(q.at(0.5) - std::pow(0.5, 5)), 1e-6);
}

// Against Boost.Odeint's runge_kutta_dopri5 dense output (calc_state) on y' = -y over one step.
// The two are different continuous extensions of order 4 of the same step: Odeint's is of
// degree 5 in theta, CONTD5's of degree 4 (Hairer, Norsett, Wanner 1993, II.6). Their
// coefficients, in rational arithmetic, make them agree exactly at theta = 0, 1/2 and 1; there
// they match to rounding, and elsewhere within the O(h^5) that separates two extensions of
// order 4 (here 1.2e-6 at most, with h^5 = 0.01).
TEST(IntegratorParts, DenseOutputMatchesOdeintDopri5) {
  const double t0 = 0.3, h = 0.4;
  const DenseStep s(decay, t0, scalar(1.2), h);
  boost::numeric::odeint::runge_kutta_dopri5<std::array<double, 1>> odeint;
  const std::array<double, 1> x{1.2}, dxdt{-1.2};
  std::array<double, 1> x_new{}, dxdt_new{};
  odeint.do_step(decay_odeint, x, dxdt, t0, x_new, dxdt_new, h);
  auto odeint_at = [&](double theta) {
    std::array<double, 1> x_theta{};
    odeint.calc_state(t0 + theta * h, x_theta, x, dxdt, t0, x_new, dxdt_new, t0 + h);
    return x_theta[0];
  };
  for (const double theta : {0.0, 0.5, 1.0})
    EXPECT_NEAR(s.at(theta), odeint_at(theta), 1e-12) << "theta " << theta;
  for (int i = 0; i <= 20; ++i)
    EXPECT_NEAR(s.at(i / 20.0), odeint_at(i / 20.0), 2e-6) << "theta " << i / 20.0;
  EXPECT_GT(std::abs(s.at(0.5) - 1.2 * std::exp(-0.5 * h)), 1e-9);  // not merely the solution
}

}  // namespace
}  // namespace strewn
