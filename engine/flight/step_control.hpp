#pragma once
// Step-size control for an embedded Runge-Kutta pair of orders 5(4): the PI controller of
// E. Hairer, S. P. Norsett, G. Wanner, "Solving Ordinary Differential Equations I" (2nd ed.,
// Springer 1993), section II.4 (and their code DOPRI5), and the starting step size of II.4.
// It sees only error norms and step sizes, never the state: the trial step is
// dormand_prince_step.hpp's, and DormandPrince5 (dormand_prince.hpp) composes the two.
//
// The error norm of a trial is the maximum over components of |error_i| / tolerance_i. With a
// reference time T set (set_reference_time), the tolerance of a step of length h is
// tolerance * min(1, h / T) ("error per unit step", Hairer-Norsett-Wanner II.4): local errors
// that add up over a long flight then sum to at most the tolerance over the time T.
#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>

namespace strewn {

class PiStepControl {
 public:
  /// Begins with the trial step h (> 0), as if the step before had an error norm of 1e-4.
  /// A rejection just before (last_rejected) is remembered across a restart.
  void restart(double h) {
    h_ = h;
    log_previous_error_ = fast_log2(1e-4);
  }

  /// Error per unit step over the reference time T (s); 0 turns it off (error per step).
  void set_reference_time(double reference_time) { reference_time_ = reference_time; }

  /// Forces every later step to be exactly h (every trial accepted); 0 turns it off.
  void set_fixed_step(double h) { fixed_step_ = h; }
  [[nodiscard]] bool fixed() const { return fixed_step_ > 0.0; }

  /// The size of the next trial: the fixed step if one is set, the proposal otherwise.
  [[nodiscard]] double trial_step() const { return fixed_step_ > 0.0 ? fixed_step_ : h_; }
  /// The controller's proposal for the next step (also kept in fixed-step mode).
  [[nodiscard]] double proposed_step() const { return h_; }
  [[nodiscard]] bool last_rejected() const { return last_rejected_; }

  /// Judges a trial of size h with error norm `error` (max_i |h error_i| / tolerance_i). Returns
  /// true when it is accepted, and proposes the next step either way. `cut_short`: the trial
  /// was shortened to end on a limit; it then keeps the larger proposal it had before the cut.
  bool judge(double error, double h, bool cut_short) {
    // Error per unit step scales the error by T/h; written as error T <= h, and as a difference
    // of logarithms in accept, it keeps a division off the step-to-step chain.
    const bool per_unit_step = reference_time_ > 0.0 && h < reference_time_;
    const double scaled = per_unit_step ? error * reference_time_ : error;
    if (fixed_step_ > 0.0 || scaled <= (per_unit_step ? h : 1.0)) {
      accept(scaled, h, per_unit_step, cut_short);
      return true;
    }
    reject(scaled, h, per_unit_step);
    return false;
  }

  /// A trial of size h left the domain of the right-hand side (not finite): a quarter of it next.
  void shrink_after_non_finite(double h) { h_ = 0.25 * h; }

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

  static constexpr double kSafety = 0.9;
  static constexpr double kMinFactor = 0.2;
  static constexpr double kMaxFactor = 10.0;
  static constexpr double kBeta = 0.04;
  static constexpr double kAlpha = 0.2 - 0.75 * kBeta;

 private:
  // Step-size proposal with the PI controller of Hairer-Norsett-Wanner (II.4 and DOPRI5:
  // exponent 0.2 - 0.75 beta, beta = 0.04), bounded growth and the usual safety factor; no
  // growth right after a rejection. The next step waits on this arithmetic, and a step size
  // needs no more than a few per cent: log2 and 2^x are read from and written into the bits of
  // the numbers (fast_log2, fast_exp2), a handful of instructions instead of a libm call or a
  // polynomial.
  void accept(double scaled, double h, bool per_unit_step, bool cut_short) {
    const double log_error =
        fast_log2(std::max(scaled, 1e-10)) - (per_unit_step ? fast_log2(h) : 0.0);
    double factor = kSafety * fast_exp2(kBeta * log_previous_error_ - kAlpha * log_error);
    factor = std::clamp(factor, kMinFactor, last_rejected_ ? 1.0 : kMaxFactor);
    log_previous_error_ = log_error;
    last_rejected_ = false;
    h_ = cut_short ? std::max(h_, h * factor) : h * factor;
  }

  // A rejected step shrinks by the standard controller of II.4 (exponent 1/5, no integral
  // part), never below a fifth.
  void reject(double scaled, double h, bool per_unit_step) {
    last_rejected_ = true;
    const double ratio = per_unit_step ? scaled / h : scaled;
    h_ = h * std::max(kMinFactor, kSafety * std::pow(ratio, -0.2));
  }

  double h_ = 0.0, fixed_step_ = 0.0, reference_time_ = 0.0;
  double log_previous_error_ = 0.0;  // log2 of the last accepted step's error (set by restart)
  bool last_rejected_ = false;
};

/// Starting step size of Hairer, Norsett, Wanner (II.4, "starting step size") for y' = f(t, y)
/// at (t, y) with k1 = f(t, y): one more evaluation of f, at an explicit Euler step.
/// `inverse_tolerance`: 1 / the absolute tolerance of each component.
template <class Rhs, class State>
double starting_step(Rhs& f, double t, const State& y, const State& k1,
                     const State& inverse_tolerance) {
  const double d0 = y.cwiseProduct(inverse_tolerance).cwiseAbs().maxCoeff();
  const double d1n = k1.cwiseProduct(inverse_tolerance).cwiseAbs().maxCoeff();
  double h0 = (d0 < 1e-5 || d1n < 1e-5) ? 1e-6 : 0.01 * d0 / d1n;
  h0 = std::min(h0, 1.0);
  State k;
  f(t + h0, State(y + h0 * k1), k);
  const double d2 = ((k - k1).cwiseProduct(inverse_tolerance)).cwiseAbs().maxCoeff() / h0;
  const double dmax = std::max(d1n, d2);
  const double h1 = dmax <= 1e-15
                        ? std::max(1e-6, h0 * 1e-3)
                        : PiStepControl::fast_exp2(0.2 * PiStepControl::fast_log2(0.01 / dmax));
  return std::min(100.0 * h0, h1);
}

}  // namespace strewn
