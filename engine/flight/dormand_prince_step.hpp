#pragma once
// One trial step of the Dormand-Prince 5(4) explicit Runge-Kutta pair: the Butcher tableau, the
// stages, the 5th-order solution and the embedded error estimate. No step-size control (see
// step_control.hpp) and no dense output (see dense_output.hpp): DormandPrince5 in
// dormand_prince.hpp composes the three.
//
// Method: J. R. Dormand and P. J. Prince (1980), "A family of embedded Runge-Kutta formulae",
// J. Comput. Appl. Math. 6:19-26; as used in E. Hairer, S. P. Norsett, G. Wanner, "Solving
// Ordinary Differential Equations I" (2nd ed., Springer 1993), section II.5 (DOPRI5).
#include <Eigen/Core>

namespace strewn {

/// What one trial step leaves behind: the new state, the error estimate (the difference of the
/// 5th- and 4th-order solutions per unit step: multiply by h) and the stages that the dense output
/// reads. k7 = f(t + h, y_new) is the next step's k1 ("first same as last"). k2 enters neither the
/// error estimate nor the dense output and is not kept.
template <int N>
struct Dopri5Stages {
  using State = Eigen::Matrix<double, N, 1>;
  State y_new, error, k3, k4, k5, k6, k7;
};

template <int N>
class DormandPrince5Step {
 public:
  using State = Eigen::Matrix<double, N, 1>;
  using Stages = Dopri5Stages<N>;

  /// Right-hand side evaluations per trial: seven stages, the first of which is the previous
  /// step's last (first same as last).
  static constexpr int kEvaluations = 6;

  // Butcher tableau of Dormand and Prince (1980), table 2 ("RK5(4)7M").
  static constexpr double c2 = 1.0 / 5, c3 = 3.0 / 10, c4 = 4.0 / 5, c5 = 8.0 / 9;
  static constexpr double a21 = 1.0 / 5;
  static constexpr double a31 = 3.0 / 40, a32 = 9.0 / 40;
  static constexpr double a41 = 44.0 / 45, a42 = -56.0 / 15, a43 = 32.0 / 9;
  static constexpr double a51 = 19372.0 / 6561, a52 = -25360.0 / 2187, a53 = 64448.0 / 6561,
                          a54 = -212.0 / 729;
  static constexpr double a61 = 9017.0 / 3168, a62 = -355.0 / 33, a63 = 46732.0 / 5247,
                          a64 = 49.0 / 176, a65 = -5103.0 / 18656;
  static constexpr double a71 = 35.0 / 384, a73 = 500.0 / 1113, a74 = 125.0 / 192,
                          a75 = -2187.0 / 6784, a76 = 11.0 / 84;
  // Difference of the 5th- and 4th-order weights (the error estimate).
  static constexpr double e1 = 71.0 / 57600, e3 = -71.0 / 16695, e4 = 71.0 / 1920,
                          e5 = -17253.0 / 339200, e6 = 22.0 / 525, e7 = -1.0 / 40;

  /// One trial step of size h from (t, y), where k1 = f(t, y), into `out`. Calls f(t, y, dydt)
  /// kEvaluations times. `out` may hold anything on entry, but must not alias y or k1.
  ///
  /// Each stage's input is written as a partial sum of the older stages plus the newest stage's
  /// term: the partial sum does not wait for the newest force evaluation, so the chain from one
  /// evaluation to the next is a single multiply-add.
  template <class Rhs>
  static void trial(Rhs& f, double t, const State& y_start, const State& k1_start, double h,
                    Stages& out) {
    // Stages in local variables (no aliasing with the caller's storage while the chain runs),
    // stored into `out` once at the end for the error estimate and the dense output.
    const State y = y_start;
    const State k1 = k1_start;
    State k2, k3, k4, k5, k6, k7, partial;
    f(t + c2 * h, State(y + (h * a21) * k1), k2);
    partial = y + (h * a31) * k1;
    f(t + c3 * h, State(partial + (h * a32) * k2), k3);
    partial = y + h * (a41 * k1 + a42 * k2);
    f(t + c4 * h, State(partial + (h * a43) * k3), k4);
    partial = y + h * (a51 * k1 + a52 * k2 + a53 * k3);
    f(t + c5 * h, State(partial + (h * a54) * k4), k5);
    partial = y + h * (a61 * k1 + a62 * k2 + a63 * k3 + a64 * k4);
    f(t + h, State(partial + (h * a65) * k5), k6);
    partial = y + h * (a71 * k1 + a73 * k3 + a74 * k4 + a75 * k5);
    const State y_new = partial + (h * a76) * k6;
    f(t + h, y_new, k7);
    out.y_new = y_new;
    out.k3 = k3;
    out.k4 = k4;
    out.k5 = k5;
    out.k6 = k6;
    out.k7 = k7;
    out.error = e1 * k1 + e3 * k3 + e4 * k4 + e5 * k5 + e6 * k6 + e7 * k7;
  }
};

}  // namespace strewn
