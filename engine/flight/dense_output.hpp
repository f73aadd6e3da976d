#pragma once
// Dense output (order 4) of a Dormand-Prince 5(4) step: the DOPRI5 continuous extension of
// E. Hairer, S. P. Norsett, G. Wanner, "Solving Ordinary Differential Equations I" (2nd ed.,
// Springer 1993), section II.6, in the form of their routine CONTD5:
//   y(t0 + theta h) = y0 + theta (r2 + (1 - theta) (r3 + theta (r4 + (1 - theta) r5))),
// from the start and end of the step, the end derivative and the stages k3..k6 of
// dormand_prince_step.hpp. DormandPrince5 (dormand_prince.hpp) keeps one for its last step.
#include <Eigen/Core>

#include "flight/dormand_prince_step.hpp"

namespace strewn {

template <int N>
class Dopri5DenseOutput {
 public:
  using State = Eigen::Matrix<double, N, 1>;
  using Stages = Dopri5Stages<N>;

  /// No step yet: the extension starts and ends at (t, y) (nothing to interpolate until accept).
  void restart(double t, const State& y) {
    t0_ = t1_ = t;
    y0_ = y;
    ready_ = false;
  }

  /// A step of size h from (t0, y0), where k1 = f(t0, y0), accepted to end at t1 (t0 + h, or the
  /// limit the step was cut to end on: the same up to rounding) with end derivative k7. The end
  /// state and the stages k3..k6 are not copied here: every query is given them (the stepper keeps
  /// them anyway, as its state and its last trial), which saves their copies at every step.
  void accept(double t0, double t1, double h, const State& y0, const State& k1, const State& k7) {
    t0_ = t0;
    y0_ = y0;
    k1_ = k1;
    k7_ = k7;
    h_ = h;
    inverse_span_ = 1.0 / (t1 - t0);
    t1_ = t1;
    ready_ = false;  // the coefficients are prepared on first use (most steps never need them)
  }
  /// The step is undone: the extension shrinks to its start (t1 = t0).
  void rewind() {
    t1_ = t0_;
    ready_ = false;
  }

  [[nodiscard]] double t0() const { return t0_; }
  [[nodiscard]] const State& y0() const { return y0_; }
  [[nodiscard]] const State& k1() const { return k1_; }

  /// The state at time t within the step (beyond it, the polynomial carried on). `y1`: the state
  /// at t1; `stages`: the accepted trial's.
  [[nodiscard]] State state(double t, const State& y1, const Stages& stages) const {
    prepare(y1, stages);
    const double theta = (t - t0_) / (t1_ - t0_);
    const double theta1 = 1.0 - theta;
    return y0_ + theta * (r2_ + theta1 * (r3_ + theta * (r4_ + theta1 * r5_)));
  }
  /// One component of the state, from the stages directly (cheaper than preparing the whole
  /// state when only the altitude is wanted, as in root finding).
  [[nodiscard]] double component(int i, double t, const State& y1, const Stages& stages) const {
    const Interpolant p = interpolant(i, t, y1, stages);
    return y0_[i] +
           p.theta * (p.difference + p.theta1 * (p.r3 + p.theta * (p.r4 + p.theta1 * p.r5)));
  }
  /// Time derivative of one component (the exact derivative of its polynomial), for Newton steps
  /// on it.
  [[nodiscard]] double rate(int i, double t, const State& y1, const Stages& stages) const {
    const Interpolant p = interpolant(i, t, y1, stages);
    // P = theta Q, Q = difference + theta1 R, R = r3 + theta S, S = r4 + theta1 r5.
    const double s = p.r4 + p.theta1 * p.r5;
    const double r = p.r3 + p.theta * s;
    const double q = p.difference + p.theta1 * r;
    const double dq = -r + p.theta1 * (s - p.theta * p.r5);
    return (q + p.theta * dq) * inverse_span_;
  }

  // Dense output coefficients of the DOPRI5 continuous extension (Hairer-Norsett-Wanner, II.6).
  static constexpr double d1 = -12715105075.0 / 11282082432.0, d3 = 87487479700.0 / 32700410799.0,
                          d4 = -10690763975.0 / 1880347072.0, d5 = 701980252875.0 / 199316789632.0,
                          d6 = -1453857185.0 / 822651844.0, d7 = 69997945.0 / 29380423.0;

 private:
  // One component's coefficients (CONTD5 form) and the position in the step.
  struct Interpolant {
    double theta, theta1, difference, r3, r4, r5;
  };
  [[nodiscard]] Interpolant interpolant(int i, double t, const State& y1,
                                        const Stages& stages) const {
    const double h = h_;
    const double theta = (t - t0_) * inverse_span_;
    const double difference = y1[i] - y0_[i];
    const double r3 = h * k1_[i] - difference;
    const double r4 = difference - h * k7_[i] - r3;
    const double r5 = h * (d1 * k1_[i] + d3 * stages.k3[i] + d4 * stages.k4[i] + d5 * stages.k5[i] +
                           d6 * stages.k6[i] + d7 * k7_[i]);
    return {theta, 1.0 - theta, difference, r3, r4, r5};
  }

  // The coefficients of every component (CONTD5 form), once per step.
  void prepare(const State& y1, const Stages& stages) const {
    if (ready_) return;
    const double h = h_;
    const State difference = y1 - y0_;
    r2_ = difference;
    r3_ = h * k1_ - difference;
    r4_ = difference - h * k7_ - r3_;
    r5_ = h *
          (d1 * k1_ + d3 * stages.k3 + d4 * stages.k4 + d5 * stages.k5 + d6 * stages.k6 + d7 * k7_);
    ready_ = true;
  }

  double t0_ = 0.0, t1_ = 0.0, h_ = 0.0, inverse_span_ = 0.0;
  mutable bool ready_ = false;
  State y0_, k1_, k7_;
  mutable State r2_, r3_, r4_, r5_;
};

}  // namespace strewn
