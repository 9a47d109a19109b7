#pragma once
// A switching's transient carried in closed form. After a contactor closes, the circuit's fast modes (the
// main-closure inrush: a cable's L/R of tens of microseconds and a link's R·C of a fraction of a millisecond)
// follow the linearised equations x' ≈ f0 + J·(x − x0) closely, and their exact solution is known:
//   carried(τ) = Σ_k u_k · (e^{λ_k τ} − 1)/λ_k,   u_k = v_k · (V⁻¹ f0)_k,   τ = t − t0,
// summed over the decaying modes (eigenvalues λ_k, eigenvectors v_k of J; the offset is real because a complex
// mode comes with its conjugate). The integrator then solves for y = x − carried(t), whose equation
//   y' = f(y + carried(t)) − carried'(t)
// keeps the circuit's stiffness but not its fast transient: in the linearised circuit y moves only by the slow
// modes' share of f0. Its steps follow the slow motion and the nonlinearity (a constant-power load, a heating
// resistor), not the inrush, which BDF would otherwise resolve to the tolerance in a hundred steps from order
// one. Nothing is approximated: x = y + carried(t) exactly, y's own error test holds every state to the run's
// tolerance, and the further the circuit is from linear, the more y carries.
//
// Carried is the fastest cluster of decaying modes, when one stands apart: its slowest decay at least 100 times
// faster than any other mode moves (|λ|, growing and integrating modes included) and at most 1 % of the run.
// That is the transient BDF would restart into and resolve step by step (the main-closure inrush, tens of
// microseconds, against a pack's polarisation of seconds); the run's main dynamics (a pre-charge's R·C) stay
// with y, where BDF takes them in long steps anyway. An eigenbasis too close to singular (rcond below 1e-9, near
// a double eigenvalue) carries nothing. Past 40 of its slowest time constants the offset is constant.
#include <Eigen/Dense>
#include <complex>
#include <limits>
#include <vector>

namespace linkrise::solver {

class CarriedTransient {
 public:
  CarriedTransient() = default;
  /// From the Jacobian J (n × n) and the rates f0 at the switching time `start`; `tolerances` holds each
  /// state's rtol·|x0| + atol, which decides the modes the waveform rows must resolve (row_after).
  CarriedTransient(const Eigen::MatrixXd& jacobian, const Eigen::VectorXd& rates, double start, double longest_time,
                   const Eigen::VectorXd& tolerances);
  bool active() const { return modes_ > 0; }
  int modes() const { return modes_; }
  double start() const { return start_; }
  /// The carried offset at time t: x(t) = y(t) + offset.
  void add_offset(double time, double* values) const;
  /// Subtracts the offset's rate of change at time t.
  void subtract_rate(double time, double* values) const;
  /// Adds the offset the transient tends to (t → ∞): Σ −u_k/λ_k.
  void add_final_offset(double* values) const;
  /// Whether the offset has reached its final value (40 of the slowest time constants after the start).
  bool decayed(double time) const { return time - start_ > decayed_after_; }
  /// The absolute time from which the offset is final.
  double final_time() const { return start_ + decayed_after_; }
  /// The carried modes' shortest and longest time constants 1/|Re λ|, s.
  double shortest_time() const { return shortest_; }
  double longest_time() const { return longest_; }
  /// The first waveform row time after `time` (+∞ when none). The integrator's steps no longer follow the
  /// transient, so the rows that the metrics integrate and search for peaks (piecewise parabolas, analysis/trace.h)
  /// are placed by it, over the modes whose excursion exceeds a state's tolerance: ten rows 1/50 of their
  /// shortest time constant τ_min apart (the inrush's rise), then each row 5 % further from the start than the
  /// last, up to 20 of their longest time constants; while a mode rings, no further apart than 1/20 of its period. Measured on the stored cases against the tight reference
  /// runs: 1/20 and 10 % left sequence_clean_close's row-integrated I²t 1.4e-4 off, 1/50 and 5 % 2e-5.
  double row_after(double time) const;
  /// The grid's spacing just before its row `row` (a time row_after returned).
  double row_spacing(double row) const;
  /// The longest step the integrator may take at `time`: an eighth of the shortest period while an excited mode
  /// rings (CVODE looks for roots by sign changes at its step ends, and the carried offset swings between them),
  /// else +∞.
  double step_limit(double time) const;

 private:
  int size_ = 0;
  int modes_ = 0;
  double start_ = 0.0;
  double shortest_ = 0.0, longest_ = 0.0;
  std::vector<double> rows_;  // s after the start: the row grid
  double period_ = std::numeric_limits<double>::infinity();  // s, the shortest period of an excited ringing mode
  double ringing_until_ = 0.0;  // s after the start: 20 decay times of the slowest excited ringing mode
  void place_rows(double first, double last);
  Eigen::VectorXcd rates_;   // λ_k of the carried modes
  Eigen::MatrixXcd shares_;  // column k: u_k
  Eigen::VectorXcd inverse_rates_;    // 1/λ_k
  Eigen::VectorXd final_offset_;      // Σ −u_k/λ_k
  double decayed_after_ = 0.0;        // s after the start: the offset is final from here
  mutable Eigen::VectorXcd weights_;  // scratch
  mutable Eigen::VectorXcd offset_;   // scratch
};

}  // namespace linkrise::solver
