#pragma once
// Dormand-Prince 5(4) explicit Runge-Kutta with step-size control and dense output, composed of
// three parts that can be used alone, as in the reference integrator libraries (Hairer's DOPRI5
// with its step, its controller and CONTD5; Boost.Odeint's stepper, controlled stepper and dense
// output stepper):
//   - dormand_prince_step.hpp, DormandPrince5Step: the tableau and one trial step (Dormand and
//     Prince 1980), with its error estimate;
//   - step_control.hpp, PiStepControl: accepts or rejects a trial from its error norm and
//     proposes the next step (Hairer, Norsett, Wanner 1993, II.4);
//   - dense_output.hpp, Dopri5DenseOutput: the continuous extension of order 4 over the last
//     accepted step (Hairer, Norsett, Wanner 1993, II.6).
//
// The stepper knows nothing of the forces or events: it advances y' = f(t, y) one accepted step
// at a time and offers the dense output over the last step, on which callers locate events.
// Each state component has its own absolute tolerance (positions and velocities are scaled
// separately); the error norm is the maximum over components of |error_i| / tolerance_i, per
// step or per unit step (PiStepControl). A rejected step is a return value, never an exception;
// retries are capped.
#include <Eigen/Core>
#include <algorithm>
#include <cmath>

#include "flight/dense_output.hpp"
#include "flight/dormand_prince_step.hpp"
#include "flight/step_control.hpp"

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
    t_ = t;
    y_ = y;
    dense_.restart(t, y);
    f(t, y, k1_);
    ++evaluations_;
    double h = h_initial;
    if (!(h_initial > 0.0)) {
      h = starting_step(f, t_, y_, k1_, inverse_tolerance_);
      ++evaluations_;
    }
    control_.restart(h);
  }

  /// Advances by one accepted step that does not pass t_max (the step is shortened to end exactly
  /// at t_max when it would). Fixed-step mode (set_fixed_step) takes steps of exactly that size.
  template <class Rhs>
  StepOutcome step(Rhs& f, double t_max) {
    for (int attempt = 0; attempt < kMaxRejections; ++attempt) {
      double h = control_.trial_step();
      bool hits_limit = false;
      if (t_ + h >= t_max) {
        h = t_max - t_;
        hits_limit = true;
      }
      if (!(h > kMinRelativeStep * std::max(1.0, std::abs(t_)))) return StepOutcome::step_too_small;
      Step::trial(f, t_, y_, k1_, h, trial_);
      evaluations_ += Step::kEvaluations;
      if (!(trial_.y_new.allFinite() && trial_.k7.allFinite())) {
        // Treat as a failed step first: a too-large step can leave the domain of the forces.
        if (control_.fixed() || attempt + 1 == kMaxRejections) return StepOutcome::non_finite;
        control_.shrink_after_non_finite(h);
        continue;
      }
      const double error =
          (trial_.error * h).cwiseAbs().cwiseProduct(inverse_tolerance_).maxCoeff();
      // A step cut short by t_max keeps the larger proposal it had before the cut.
      if (control_.judge(error, h, hits_limit)) {
        accept(h, hits_limit ? t_max : t_ + h);
        return StepOutcome::accepted;
      }
    }
    return StepOutcome::step_too_small;
  }

  /// Undoes the last accepted step: the state returns to (t_previous, y_previous). Used to retake a
  /// step that straddled a kink of the right-hand side so that it ends exactly on the kink.
  void rewind() {
    t_ = dense_.t0();
    y_ = dense_.y0();
    k1_ = dense_.k1();
    dense_.rewind();
  }

  /// Error per unit step over the reference time T (s); 0 turns it off (error per step).
  void set_reference_time(double reference_time) { control_.set_reference_time(reference_time); }

  /// Forces every later step to be exactly h (no error control); for convergence-order tests.
  void set_fixed_step(double h) { control_.set_fixed_step(h); }

  [[nodiscard]] double t() const { return t_; }
  [[nodiscard]] const State& y() const { return y_; }
  [[nodiscard]] double t_previous() const { return dense_.t0(); }
  [[nodiscard]] const State& y_previous() const { return dense_.y0(); }
  [[nodiscard]] double proposed_step() const { return control_.proposed_step(); }
  [[nodiscard]] long evaluations() const { return evaluations_; }
  [[nodiscard]] long steps() const { return steps_; }

  /// Dense output (order 4) at time t within the last accepted step [t_previous, t].
  [[nodiscard]] State dense(double t) const { return dense_.state(t, y_, trial_); }
  /// One component of the dense output, from the stages directly (cheaper than preparing the
  /// whole state when only the altitude is wanted, as in root finding).
  [[nodiscard]] double dense(int i, double t) const { return dense_.component(i, t, y_, trial_); }
  /// Time derivative of one component of the dense output (the exact derivative of its
  /// polynomial), for Newton steps on it.
  [[nodiscard]] double dense_rate(int i, double t) const { return dense_.rate(i, t, y_, trial_); }

  /// The controller's log2 and 2^x (exposed for their accuracy test,
  /// Integrator.StepSizeArithmeticIsAccurateEnough).
  static double step_log2(double x) { return PiStepControl::fast_log2(x); }
  static double step_exp2(double x) { return PiStepControl::fast_exp2(x); }

 private:
  using Step = DormandPrince5Step<N>;
  static constexpr int kMaxRejections = 60;
  static constexpr double kMinRelativeStep = 1e-13;

  void accept(double h, double t_new) {
    dense_.accept(t_, t_new, h, y_, k1_, trial_.k7);
    t_ = t_new;
    y_ = trial_.y_new;
    k1_ = trial_.k7;  // first-same-as-last
    ++steps_;
  }

  State inverse_tolerance_;
  double t_ = 0.0;
  long evaluations_ = 0, steps_ = 0;
  State y_, k1_;           // the current state and f there
  Dopri5Stages<N> trial_;  // the last trial step; once accepted, read by the dense output
  PiStepControl control_;
  Dopri5DenseOutput<N> dense_;  // over the last accepted step
};

}  // namespace strewn
