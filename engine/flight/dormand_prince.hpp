#pragma once
// Dormand-Prince 5(4) explicit Runge-Kutta with step-size control and dense output.
//
// Method: J. R. Dormand and P. J. Prince (1980), "A family of embedded Runge-Kutta formulae",
// J. Comput. Appl. Math. 6:19-26. Dense output of order 4 and the step controller follow
// E. Hairer, S. P. Norsett, G. Wanner, "Solving Ordinary Differential Equations I" (2nd ed.,
// Springer 1993), section II.5 and II.6 (the DOPRI5 continuous extension).
//
// The stepper knows nothing of the forces or events: it advances y' = f(t, y) one accepted step
// at a time and offers the dense output over the last step, on which callers locate events.
// Each state component has its own absolute tolerance (positions and velocities are scaled
// separately); the error norm is the maximum over components of |error_i| / tolerance_i.
// With a reference time T set (set_reference_time), the tolerance of a step of length h is
// tolerance * min(1, h / T) ("error per unit step", Hairer-Norsett-Wanner II.4): local errors
// that add up over a long flight then sum to at most the tolerance over the time T.
// A rejected step is a return value, never an exception; retries are capped.
#include <Eigen/Core>
#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>

namespace strewn {

enum class StepOutcome {
  accepted,        ///< one step taken
  step_too_small,  ///< the controller could not meet the tolerance (step underflow or retry cap)
  non_finite,      ///< the right-hand side returned NaN or infinity
};

template <int N>
class DormandPrince5 {
 public:
  using State = Eigen::Matrix<double, N, 1>;
  static constexpr int kDimension = N;

  /// `tolerance`: absolute error allowed per step in each component (all > 0).
  explicit DormandPrince5(const State& tolerance) : inverse_tolerance_(tolerance.cwiseInverse()) {}

  /// Begins at (t, y). `h_initial` > 0 sets the first trial step; 0 chooses it from the
  /// derivatives (Hairer, Norsett, Wanner, II.4, "starting step size").
  /// Precondition: the right-hand side is finite at (t, y).
  template <class Rhs>
  void start(Rhs& f, double t, const State& y, double h_initial = 0.0) {
    t_ = t_previous_ = t;
    y_ = y_previous_ = y;
    f(t, y, k1_);
    ++evaluations_;
    h_ = h_initial > 0.0 ? h_initial : initial_step(f);
    log_previous_error_ = fast_log2(1e-4);
    dense_ready_ = false;
  }

  /// Advances by one accepted step that does not pass t_max (the step is shortened to end exactly
  /// at t_max when it would). Fixed-step mode (set_fixed_step) takes steps of exactly that size.
  template <class Rhs>
  StepOutcome step(Rhs& f, double t_max) {
    for (int attempt = 0; attempt < kMaxRejections; ++attempt) {
      double h = fixed_step_ > 0.0 ? fixed_step_ : h_;
      bool hits_limit = false;
      if (t_ + h >= t_max) {
        h = t_max - t_;
        hits_limit = true;
      }
      if (!(h > kMinRelativeStep * std::max(1.0, std::abs(t_)))) return StepOutcome::step_too_small;
      trial(f, h);
      if (!(y_new_.allFinite() && k7_.allFinite())) {
        // Treat as a failed step first: a too-large step can leave the domain of the forces.
        if (fixed_step_ > 0.0 || attempt + 1 == kMaxRejections) return StepOutcome::non_finite;
        h_ = 0.25 * h;
        continue;
      }
      // Error per unit step scales the error by T/h; written as error T <= h, and as a difference
      // of logarithms below, it keeps a division off the step-to-step chain.
      const double error = (error_ * h).cwiseAbs().cwiseProduct(inverse_tolerance_).maxCoeff();
      const bool per_unit_step = reference_time_ > 0.0 && h < reference_time_;
      const double scaled = per_unit_step ? error * reference_time_ : error;
      if (fixed_step_ > 0.0 || scaled <= (per_unit_step ? h : 1.0)) {
        accept(h, hits_limit ? t_max : t_ + h);
        // Step-size proposal with the PI controller of Hairer-Norsett-Wanner (II.4 and DOPRI5:
        // exponent 0.2 - 0.75 beta, beta = 0.04), bounded growth and the usual safety factor.
        // The next step waits on this arithmetic, and a step size needs no more than a few per
        // cent: log2 and 2^x are read from and written into the bits of the numbers (fast_log2,
        // fast_exp2), a handful of instructions instead of a libm call or a polynomial.
        const double log_error =
            fast_log2(std::max(scaled, 1e-10)) - (per_unit_step ? fast_log2(h) : 0.0);
        double factor = kSafety * fast_exp2(kBeta * log_previous_error_ - kAlpha * log_error);
        factor = std::clamp(factor, kMinFactor, last_rejected_ ? 1.0 : kMaxFactor);
        log_previous_error_ = log_error;
        last_rejected_ = false;
        // A step cut short by t_max keeps the larger proposal it had before the cut.
        h_ = hits_limit ? std::max(h_, h * factor) : h * factor;
        return StepOutcome::accepted;
      }
      last_rejected_ = true;
      const double ratio = per_unit_step ? scaled / h : scaled;
      h_ = h * std::max(kMinFactor, kSafety * std::pow(ratio, -0.2));
    }
    return StepOutcome::step_too_small;
  }

  /// Undoes the last accepted step: the state returns to (t_previous, y_previous). Used to retake a
  /// step that straddled a kink of the right-hand side so that it ends exactly on the kink.
  void rewind() {
    t_ = t_previous_;
    y_ = y_previous_;
    k1_ = k1_previous_;
    dense_ready_ = false;
  }

  /// Error per unit step over the reference time T (s); 0 turns it off (error per step).
  void set_reference_time(double reference_time) { reference_time_ = reference_time; }

  /// Forces every later step to be exactly h (no error control); for convergence-order tests.
  void set_fixed_step(double h) { fixed_step_ = h; }

  [[nodiscard]] double t() const { return t_; }
  [[nodiscard]] const State& y() const { return y_; }
  [[nodiscard]] double t_previous() const { return t_previous_; }
  [[nodiscard]] const State& y_previous() const { return y_previous_; }
  [[nodiscard]] double proposed_step() const { return h_; }
  [[nodiscard]] long evaluations() const { return evaluations_; }
  [[nodiscard]] long steps() const { return steps_; }

  /// Dense output (order 4) at time t within the last accepted step [t_previous, t].
  [[nodiscard]] State dense(double t) const {
    prepare_dense();
    const double theta = (t - t_previous_) / (t_ - t_previous_);
    const double theta1 = 1.0 - theta;
    return y_previous_ + theta * (r2_ + theta1 * (r3_ + theta * (r4_ + theta1 * r5_)));
  }
  /// One component of the dense output, from the stages directly (cheaper than preparing the
  /// whole state when only the altitude is wanted, as in root finding).
  [[nodiscard]] double dense(int i, double t) const {
    const Interpolant p = interpolant(i, t);
    return y_previous_[i] +
           p.theta * (p.difference + p.theta1 * (p.r3 + p.theta * (p.r4 + p.theta1 * p.r5)));
  }

  /// Time derivative of one component of the dense output (the exact derivative of its
  /// polynomial), for Newton steps on it.
  [[nodiscard]] double dense_rate(int i, double t) const {
    const Interpolant p = interpolant(i, t);
    // P = theta Q, Q = difference + theta1 R, R = r3 + theta S, S = r4 + theta1 r5.
    const double s = p.r4 + p.theta1 * p.r5;
    const double r = p.r3 + p.theta * s;
    const double q = p.difference + p.theta1 * r;
    const double dq = -r + p.theta1 * (s - p.theta * p.r5);
    return (q + p.theta * dq) * inverse_span_;
  }

 private:
  // log2 of a positive normal number from its bits: read as an integer and scaled by 2^-52, the
  // bits are 1023 + exponent + mantissa fraction m, and m stands in for log2(1 + m). Below the
  // true value by at most 0.0861 (J. F. Blinn, "Floating-point tricks", IEEE Computer Graphics
  // and Applications 17(4), 1997).
  static double fast_log2(double x) {
    return static_cast<double>(std::bit_cast<std::int64_t>(x)) * 0x1p-52 - 1023.0;
  }
  // 2^x for |x| <= 1000, the same way back: (x + 1023) 2^52 written as the bits of a double, so
  // the fraction f of x stands in for 2^f - 1. Above the true value by at most 6.2 % (N. N.
  // Schraudolph, "A fast, compact approximation of the exponential function", Neural
  // Computation 11(4), 1999). Both errors lean toward a longer step, by at most 7 % together:
  // inside the margin of the safety factor 0.9; the flight tests hold the accuracy that results.
  static double fast_exp2(double x) {
    x = std::clamp(x, -1000.0, 1000.0);
    return std::bit_cast<double>(static_cast<std::int64_t>((x + 1023.0) * 0x1p52));
  }

 public:
  /// The controller's log2 and 2^x (exposed for their accuracy test,
  /// Integrator.StepSizeArithmeticIsAccurateEnough).
  static double step_log2(double x) { return fast_log2(x); }
  static double step_exp2(double x) { return fast_exp2(x); }

 private:
  static constexpr int kMaxRejections = 60;
  static constexpr double kMinRelativeStep = 1e-13;
  static constexpr double kSafety = 0.9;
  static constexpr double kMinFactor = 0.2;
  static constexpr double kMaxFactor = 10.0;
  static constexpr double kBeta = 0.04;
  static constexpr double kAlpha = 0.2 - 0.75 * kBeta;

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
  // Dense output coefficients of the DOPRI5 continuous extension (Hairer-Norsett-Wanner, II.6).
  static constexpr double d1 = -12715105075.0 / 11282082432.0, d3 = 87487479700.0 / 32700410799.0,
                          d4 = -10690763975.0 / 1880347072.0, d5 = 701980252875.0 / 199316789632.0,
                          d6 = -1453857185.0 / 822651844.0, d7 = 69997945.0 / 29380423.0;

  // One trial step. Each stage's input is written as a partial sum of the older stages plus the
  // newest stage's term: the partial sum does not wait for the newest force evaluation, so the
  // chain from one evaluation to the next is a single multiply-add.
  template <class Rhs>
  void trial(Rhs& f, double h) {
    // Stages in local variables (no aliasing with the members while the chain runs), stored into
    // the members once at the end for the error estimate and the dense output.
    const double t = t_;
    const State y = y_;
    const State k1 = k1_;
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
    evaluations_ += 6;
    y_new_ = y_new;
    k2_ = k2;
    k3_ = k3;
    k4_ = k4;
    k5_ = k5;
    k6_ = k6;
    k7_ = k7;
    error_ = e1 * k1 + e3 * k3 + e4 * k4 + e5 * k5 + e6 * k6 + e7 * k7;
  }

  void accept(double h, double t_new) {
    t_previous_ = t_;
    y_previous_ = y_;
    k1_previous_ = k1_;
    k7_last_ = k7_;
    h_last_ = h;
    inverse_span_ = 1.0 / (t_new - t_);
    t_ = t_new;
    y_ = y_new_;
    k1_ = k7_;  // first-same-as-last
    ++steps_;
    dense_ready_ = false;  // the dense output is prepared on first use (most steps never need it)
  }

  // One component's dense-output coefficients (DOPRI5 "CONTD5" form) and the position in the step.
  struct Interpolant {
    double theta, theta1, difference, r3, r4, r5;
  };
  [[nodiscard]] Interpolant interpolant(int i, double t) const {
    const double h = h_last_;
    const double theta = (t - t_previous_) * inverse_span_;
    const double difference = y_[i] - y_previous_[i];
    const double r3 = h * k1_previous_[i] - difference;
    const double r4 = difference - h * k7_last_[i] - r3;
    const double r5 = h * (d1 * k1_previous_[i] + d3 * k3_[i] + d4 * k4_[i] + d5 * k5_[i] +
                           d6 * k6_[i] + d7 * k7_last_[i]);
    return {theta, 1.0 - theta, difference, r3, r4, r5};
  }

  // Dense output coefficients for the last step (DOPRI5 "CONTD5" form).
  void prepare_dense() const {
    if (dense_ready_) return;
    const double h = h_last_;
    const State difference = y_ - y_previous_;
    r2_ = difference;
    r3_ = h * k1_previous_ - difference;
    r4_ = difference - h * k7_last_ - r3_;
    r5_ = h * (d1 * k1_previous_ + d3 * k3_ + d4 * k4_ + d5 * k5_ + d6 * k6_ + d7 * k7_last_);
    dense_ready_ = true;
  }

  template <class Rhs>
  double initial_step(Rhs& f) {
    const double d0 = y_.cwiseProduct(inverse_tolerance_).cwiseAbs().maxCoeff();
    const double d1n = k1_.cwiseProduct(inverse_tolerance_).cwiseAbs().maxCoeff();
    double h0 = (d0 < 1e-5 || d1n < 1e-5) ? 1e-6 : 0.01 * d0 / d1n;
    h0 = std::min(h0, 1.0);
    State k;
    f(t_ + h0, State(y_ + h0 * k1_), k);
    ++evaluations_;
    const double d2 = ((k - k1_).cwiseProduct(inverse_tolerance_)).cwiseAbs().maxCoeff() / h0;
    const double dmax = std::max(d1n, d2);
    const double h1 =
        dmax <= 1e-15 ? std::max(1e-6, h0 * 1e-3) : fast_exp2(0.2 * fast_log2(0.01 / dmax));
    return std::min(100.0 * h0, h1);
  }

  State inverse_tolerance_;
  double t_ = 0.0, t_previous_ = 0.0, h_ = 0.0, fixed_step_ = 0.0, reference_time_ = 0.0;
  double log_previous_error_ = 0.0;  // log2 of the last accepted step's error (set by start)
  bool last_rejected_ = false;
  mutable bool dense_ready_ = false;
  double h_last_ = 0.0, inverse_span_ = 0.0;  // the last step and 1 / its span in time
  long evaluations_ = 0, steps_ = 0;
  State y_, y_previous_, y_new_, error_;
  State k1_, k1_previous_, k2_, k3_, k4_, k5_, k6_, k7_, k7_last_;
  mutable State r2_, r3_, r4_, r5_;
};

}  // namespace strewn
