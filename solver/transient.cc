#include "solver/transient.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <memory>
#include <stdexcept>

#include <cvodes/cvodes.h>
#include <fmt/format.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_min.h>
#include <nvector/nvector_serial.h>
#include <sundials/sundials_context.h>
#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

#include "solver/absolute_tolerances.h"
#include "solver/eigen_kernels.h"
#include "solver/equations.h"
#include "solver/carried_accounts.h"
#include "solver/carried_transient.h"
#include "solver/fast_states.h"
#include "solver/failure_diagnosis.h"
#include "solver/sundials_check.h"

namespace linkrise::solver {

double Probe::signal(int part, int index) const {
  const auto& model = circuit->part(part);
  std::vector<double> values(model.signals().size());
  models::Point point;
  point.time = time;
  point.states = states;
  point.unknowns = unknowns;
  point.modes = modes;
  point.ambient = circuit->spec().ambient;
  model.signal_values(point, circuit->layout(part), values.data());
  return values.at(index);
}

namespace {

// Requested outputs the driver could not honour; the caller builds them, so these are programming errors.
void check_outputs(const Circuit& circuit, const Options& options) {
  const auto& times = options.output_times;
  for (std::size_t i = 0; i < times.size(); ++i) {
    if (!(times[i] >= 0.0 && times[i] <= options.duration) || (i > 0 && times[i] < times[i - 1])) {
      throw std::invalid_argument(fmt::format("output time #{} ({} s) is out of order or outside [0, {} s]", i,
                                              times[i], options.duration));
    }
  }
  const int columns = static_cast<int>(circuit.node_names().size() + circuit.signal_columns().size());
  for (int column : options.output_columns) {
    if (column < 0 || column >= columns) {
      throw std::invalid_argument(fmt::format("output column {} does not exist ({} columns)", column, columns));
    }
  }
}

}  // namespace

Options options_from(const Circuit& circuit) {
  const auto& spec = circuit.spec();
  Options options;
  options.duration = spec.run.duration;
  options.relative_tolerance = spec.run.relative_tolerance;
  options.absolute_tolerance = spec.run.absolute_tolerance;
  options.scale_absolute_tolerance = !spec.run.absolute_tolerance_given;
  options.max_step = spec.run.max_step;
  options.max_steps = spec.run.max_steps;
  options.settle_fast_states = spec.run.settle_fast_states;
  options.carry_transients = spec.run.carry_transients;
  options.max_wall_time = spec.run.max_wall_time;
  options.sample = spec.run.sample;
  for (const auto& event : spec.events) {
    options.commands.push_back(Command{event.at, circuit.find_part(event.target), event.action, "scheduled event"});
  }
  return options;
}

std::vector<std::string> waveform_headers(const Circuit& circuit) {
  std::vector<std::string> headers;
  for (const auto& node : circuit.node_names()) headers.push_back(fmt::format("{} [V]", node));
  for (const auto& column : circuit.signal_columns()) headers.push_back(column.header);
  return headers;
}

namespace {

// Owns the SUNDIALS objects for one run.
struct CvodeHandles {
  SUNContext context = nullptr;
  N_Vector states = nullptr;
  N_Vector scratch = nullptr;
  N_Vector tolerances = nullptr;
  N_Vector accounts = nullptr;          // energy accounts and ∫i² dt, integrated as quadratures
  N_Vector account_tolerances = nullptr;  // their absolute tolerances (solver/absolute_tolerances.h)
  SUNMatrix matrix = nullptr;
  SUNLinearSolver linear_solver = nullptr;
  void* memory = nullptr;
  // The release calls fail only for a null object, which the guards exclude; nothing is left to report then.
  ~CvodeHandles() {
    if (memory) CVodeFree(&memory);
    if (linear_solver) SUNLinSolFree(linear_solver);
    if (matrix) SUNMatDestroy(matrix);
    if (states) N_VDestroy(states);
    if (scratch) N_VDestroy(scratch);
    if (tolerances) N_VDestroy(tolerances);
    if (accounts) N_VDestroy(accounts);
    if (account_tolerances) N_VDestroy(account_tolerances);
    if (context) SUNContext_Free(&context);
  }
};

class Driver {
 public:
  Driver(const Circuit& circuit, const Options& options)
      : circuit_(circuit),
        options_(options),
        equations_(circuit),
        states_(circuit.part_state_count()),
        n_(std::max(states_, 1)),
        accounts_(circuit.quadrature_count()),
        modes_(circuit.initial_modes()),
        unknowns_(circuit.unknown_count(), 0.0),
        row_(circuit.node_names().size() + circuit.signal_columns().size(), 0.0),
        carried_accounts_(circuit),
        carried_rates_(circuit.quadrature_count(), 0.0) {
    pending_ = options.commands;
    std::stable_sort(pending_.begin(), pending_.end(),
                     [](const Command& a, const Command& b) { return a.time < b.time; });
    auto headers = waveform_headers(circuit);
    if (options.step_store) {
      result_.steps = std::move(*options.step_store);
      result_.steps.restart(headers);
    } else {
      result_.steps = Waveform(headers);
    }
    if (!options.output_columns.empty()) {
      std::vector<std::string> chosen;
      for (int column : options.output_columns) chosen.push_back(headers.at(static_cast<std::size_t>(column)));
      result_.samples = Waveform(std::move(chosen));
      chosen_row_.resize(options.output_columns.size());
    } else {
      result_.samples = Waveform(std::move(headers));
    }
    if (!options.output_times.empty()) result_.samples.reserve(options.output_times.size());
    // Growing the row store step by step would copy it a dozen times per run; a sequence run takes about a
    // thousand steps.
    if (options.record_steps) result_.steps.reserve(2048);
  }

  Result run();

  // CVODE callbacks
  // CVODE's vector holds y = x − carried(t) (solver/carried_transient.h); the callbacks see the circuit's x.
  int rhs(double t, const double* y, double* xdot) {
    const double* x = circuit_states(t, y);
    if (!network_solved(t, x)) return 1;
    equations_.state_rates(t, x, modes_.data(), unknowns_.data(), xdot);
    if (states_ == 0) xdot[0] = 0.0;
    carried_.subtract_rate(t, xdot);
    return 0;
  }
  int account_rates(double t, const double* y, double* out) {
    const double* x = circuit_states(t, y);
    if (!network_solved(t, x)) return 1;
    equations_.account_rates(t, x, modes_.data(), unknowns_.data(), out);
    if (carried_accounts_.active()) {
      if (!carried_accounts_.rates(t, carried_rates_.data())) return 1;
      for (int a = 0; a < accounts_; ++a) out[a] -= carried_rates_[a];
    }
    return 0;
  }
  int jacobian(double t, const double* y, double* matrix) {
    if (states_ == 0) {
      matrix[0] = 0.0;  // the idle state of a circuit without dynamic states
      return 0;
    }
    const double* x = circuit_states(t, y);
    if (!network_solved(t, x)) return 1;
    equations_.jacobian(t, x, modes_.data(), unknowns_.data(), matrix);
    return 0;
  }
  int roots(double t, const double* y, double* out) {
    const double* x = circuit_states(t, y);
    if (!network_solved(t, x)) return 1;
    models::Point point = equations_.point(t, x, modes_.data(), unknowns_.data());
    for (int p = 0; p < circuit_.part_count(); ++p) {
      if (circuit_.part(p).root_count() > 0)
        circuit_.part(p).roots(point, circuit_.layout(p), out + circuit_.root_first(p));
    }
    double* watch_out = out + circuit_.root_count();
    for (std::size_t w = 0; w < options_.watches.size(); ++w) {
      const Watch& watch = options_.watches[w];
      double a = point.node_voltage(watch.plus_a) - point.node_voltage(watch.minus_a);
      double b = point.node_voltage(watch.plus_b) - point.node_voltage(watch.minus_b);
      watch_out[w] = a - watch.ratio * b - watch.offset;
      // A root function exactly zero at a root and just after it makes CVODE stop with "root found at and very
      // near t" (a voltage difference rounds to 0.0 as its ringing decays): count an exact zero as one rounding
      // step above it. Not the smallest double: CVODE's root search divides by differences of root values.
      if (watch_out[w] == 0.0) {
        watch_out[w] = 1e-15 * (1.0 + std::fabs(a) + std::fabs(watch.ratio * b) + std::fabs(watch.offset));
      }
    }
    for (int r = 0; r < circuit_.root_count(); ++r) {
      if (out[r] == 0.0) out[r] = 1e-15;  // part roots are voltages in V
    }
    return 0;
  }
  // The error weights of y from the circuit's states x = y + carried(t) at CVODE's current time, so each state
  // keeps its tolerance relative to its own size while a transient is carried.
  int error_weights(const double* y, double* weights) {
    double t = 0.0;
    if (CVodeGetCurrentTime(handles_.memory, &t) != CV_SUCCESS) return -1;
    const double* x = circuit_states(t, y);
    for (int i = 0; i < n_; ++i) {
      const double scale = tolerance_scale(i, x[i]);
      if (!(scale > 0.0)) return -1;
      weights[i] = 1.0 / scale;
    }
    return 0;
  }
  // rtol·|x_i| + atol_i: what CVODE's error test holds state i to (its weight is the inverse).
  double tolerance_scale(int i, double value) const {
    return options_.relative_tolerance * std::fabs(value) + N_VGetArrayPointer(handles_.tolerances)[i];
  }

 private:
  // x = y + carried(t) for a callback (y itself while nothing is carried).
  const double* circuit_states(double t, const double* y) {
    if (!carried_.active()) return y;
    std::copy(y, y + n_, callback_states_.begin());
    carried_.add_offset(t, callback_states_.data());
    return callback_states_.data();
  }
  // The circuit's states at `time` inside the last step, from CVODE's dense output of y, into the scratch vector.
  double* dense_states(double time) {
    check(CVodeGetDky(handles_.memory, time, 0, handles_.scratch), "CVodeGetDky", time);
    double* dense = N_VGetArrayPointer(handles_.scratch);
    carried_.add_offset(time, dense);
    return dense;
  }
  // Where CVODE's dense output starts: the last step it took, [t_n − h, t_n] (after a root return the run stands
  // inside that step).
  double dense_start() {
    double now = 0.0, step = 0.0;
    check(CVodeGetCurrentTime(handles_.memory, &now), "CVodeGetCurrentTime", now);
    check(CVodeGetLastStep(handles_.memory, &step), "CVodeGetLastStep", now);
    return now - step;
  }
  // The circuit's states after CVODE returned y at `time`.
  void states_from_solver(double time) {
    const double* y = N_VGetArrayPointer(handles_.states);
    std::copy(y, y + n_, states_now_.begin());
    carried_.add_offset(time, states_now_.data());
  }
  // At a (re)start: the transient carried from `time` on, and CVODE's y = x there (the offset starts at zero).
  void carry_from(double time, bool carry);
  // Where the circuit leaves its linearisation (y, which holds what the offset does not explain, has moved by a
  // quarter of the transient's whole excursion, weighted by the tolerances), the carry ends: CVODE restarts from
  // x with nothing carried (a PTC that heats up tenfold in its own charge would otherwise leave y the transient's
  // negative to integrate).
  void end_carry_if_departed(double t) {
    if (!carried_.active() || carried_.decayed(t)) return;
    const double* y = N_VGetArrayPointer(handles_.states);
    double departure = 0.0;
    for (int i = 0; i < states_; ++i) departure = std::max(departure, std::fabs(y[i] - carry_origin_[i]) * carry_weights_[i]);
    if (departure <= 0.25 * carry_excursion_) return;
    reinitialise(t, false);
    limit_steps_while_ringing(t);
  }
  void reset_guess() { std::fill(unknowns_.begin(), unknowns_.end(), 0.0); }
  // The network at (t, x) into unknowns_ for a callback; false (after clearing the guess) tells CVODE the
  // failure is recoverable: it retries with a smaller step.
  bool network_solved(double t, const double* x) {
    if (equations_.solve_network(t, x, modes_.data(), unknowns_.data())) return true;
    reset_guess();
    return false;
  }
  double* x() { return states_now_.data(); }
  double* accounts() { return accounts_ > 0 ? N_VGetArrayPointer(handles_.accounts) : nullptr; }
  // Part states, energy accounts, then ∫i² dt, the layout of Result::initial_states/final_states.
  std::vector<double> full_state() {
    std::vector<double> full(x(), x() + states_);
    if (accounts_ > 0) full.insert(full.end(), accounts(), accounts() + accounts_);
    return full;
  }
  // Solves the network at (t, states) into unknowns_; throws SolverError on failure.
  void solve_at(double t, const double* states) {
    if (!equations_.solve_network(t, states, modes_.data(), unknowns_.data())) {
      reset_guess();
      if (!equations_.solve_network(t, states, modes_.data(), unknowns_.data())) {
        throw SolverError(fmt::format("the circuit equations have no solution at t = {:.9g} s (Newton did not "
                                      "converge): check for a constant-power load without an operating point",
                                      t),
                          t);
      }
    }
  }
  void fill_row(double t, const double* states) {
    models::Point point = equations_.point(t, states, modes_.data(), unknowns_.data());
    std::size_t column = 0;
    for (std::size_t n = 0; n < circuit_.node_names().size(); ++n) row_[column++] = unknowns_[n];
    for (int p = 0; p < circuit_.part_count(); ++p) {
      circuit_.part(p).signal_values(point, circuit_.layout(p), row_.data() + column + circuit_.signal_first(p));
    }
  }
  // One column of the row at (t, states), the network solved: the owning part's signals alone (the in-step peak
  // search evaluates one column a dozen times per peak).
  double column_value(double t, const double* states, std::size_t column) {
    const std::size_t nodes = circuit_.node_names().size();
    if (column < nodes) return unknowns_[column];
    const int signal = static_cast<int>(column - nodes);
    int part = circuit_.part_count() - 1;
    while (part > 0 && circuit_.signal_first(part) > signal) --part;
    models::Point point = equations_.point(t, states, modes_.data(), unknowns_.data());
    circuit_.part(part).signal_values(point, circuit_.layout(part),
                                      row_.data() + nodes + circuit_.signal_first(part));
    return row_[column];
  }
  void record_step_row(double t, const double* states) {
    if (!options_.record_steps) return;
    solve_at(t, states);
    fill_row(t, states);
    add_step_row(t, row_);
  }
  // The next output time: the uniform grid's or the listed one's; +infinity past the last.
  double output_time(long index) const {
    if (!options_.output_times.empty()) {
      return index < static_cast<long>(options_.output_times.size()) ? options_.output_times[index]
                                                                      : std::numeric_limits<double>::infinity();
    }
    if (options_.sample) return static_cast<double>(index) * *options_.sample;
    return std::numeric_limits<double>::infinity();
  }
  void add_sample_row(double time) {
    if (options_.output_columns.empty()) {
      result_.samples.add_row(time, row_);
      return;
    }
    for (std::size_t c = 0; c < chosen_row_.size(); ++c) chosen_row_[c] = row_[options_.output_columns[c]];
    result_.samples.add_row(time, chosen_row_);
  }
  // Output rows in (recorded_until_, t] from dense output, then a step row at t (states at t given).
  void record_until(double t, double* states) {
    double* dense = N_VGetArrayPointer(handles_.scratch);
    while (true) {
      double when = output_time(next_grid_index_);
      if (when > t * (1.0 + 1e-14) || when > options_.duration * (1.0 + 1e-14)) break;
      if (when < t) {
        dense_states(when);
        solve_at(when, dense);
        fill_row(when, dense);
      } else {
        solve_at(t, states);
        fill_row(t, states);
      }
      add_sample_row(when);
      ++next_grid_index_;
    }
    if (options_.record_steps) {
      // `states` may be the dense-output scratch vector, which the carried transient's rows reuse.
      record_carried_rows(t, states);
      record_step_end(t, states);
    }
    recorded_until_ = t;
  }
  // A carried transient's grid rows inside the step ending at t (solver/carried_transient.h). A grid row within
  // half a spacing of the last row or of t is left out, so the intervals stay between half and one and a half
  // spacings: the metrics' piecewise parabolas join only rows of like spacing (analysis/trace.h).
  void record_carried_rows(double t, double* states) {
    if (!carried_.active()) return;
    const double from = std::max(recorded_until_, dense_start());
    double row = carried_.row_after(from);
    while (row < t && row - from < 0.5 * carried_.row_spacing(row)) row = carried_.row_after(row);
    if (!(row < t)) return;
    step_end_kept_.assign(states, states + n_);
    for (; row < t; row = carried_.row_after(row)) {
      if (t - row < 0.5 * carried_.row_spacing(row)) break;
      record_step_end(row, dense_states(row));
    }
    std::copy(step_end_kept_.begin(), step_end_kept_.end(), states);
  }
  // A step row at t (or a row of a carried transient inside the step) and the peaks between it and the last row.
  void record_step_end(double t, double* states) {
    // The step row first (the peak search compares with it), added after the peaks it finds before it;
    // `states` may be the dense-output scratch vector, which the peak search reuses.
    solve_at(t, states);
    fill_row(t, states);
    step_row_ = row_;
    peak_kept_.assign(states, states + n_);
    record_peaks_inside_step(t);
    std::copy(peak_kept_.begin(), peak_kept_.end(), states);
    add_step_row(t, step_row_);
  }
  void record_peaks_inside_step(double t);
  double magnitude_at(double time, std::size_t column);
  double refine_peak(double start, double end, double guess, double at_guess, std::size_t column, double a, double e);
  // A step row, keeping each column's largest |value| so far (the in-step peak search refines only the peaks
  // that may top it).
  void add_step_row(double t, const std::vector<double>& row) {
    result_.steps.add_row(t, row);
    if (largest_.size() != row.size()) largest_.assign(row.size(), 0.0);
    for (std::size_t c = 0; c < row.size(); ++c) {
      if (std::fabs(row[c]) > largest_[c]) largest_[c] = std::fabs(row[c]);
    }
  }
  double largest_magnitude(std::size_t column) const { return column < largest_.size() ? largest_[column] : 0.0; }
  // Where the run ends: its duration, or earlier where the supervisor has ended the sequence.
  double end() const {
    return options_.supervisor ? std::min(options_.duration, options_.supervisor->end_time()) : options_.duration;
  }
  // CVODE set up for a run from t0; the error handler is installed before any call that could report.
  void initialise_cvode(double t0);
  void create_vectors(double t0);
  void attach_solver(double t0);
  void attach_roots(double t0);
  // The accounts vector holds the quadratures at the last step's end only after this (fetched on demand:
  // most steps need no copy).
  void sync_accounts(double t) {
    if (!accounts_stale_) return;
    accounts_stale_ = false;
    if (accounts_ == 0) return;
    double at = t;
    check(CVodeGetQuad(handles_.memory, &at, handles_.accounts), "CVodeGetQuad", t);
    add_carried_accounts(t);
  }
  // CVODE integrates the accounts less their share along the carried trajectory (solver/carried_accounts.h).
  void add_carried_accounts(double t) {
    if (!carried_accounts_.active()) return;
    if (!carried_accounts_.integral(t, carried_rates_.data())) {
      throw SolverError(fmt::format("the circuit equations have no solution on the linearised transient at "
                                    "t = {:.9g} s", t), t);
    }
    for (int a = 0; a < accounts_; ++a) accounts()[a] += carried_rates_[a];
  }
  void reinitialise(double t, bool carry = true) {
    sync_accounts(t);
    harvest_statistics(t);
    carry_from(t, carry);
    check(CVodeReInit(handles_.memory, t, handles_.states), "CVodeReInit", t);
    if (accounts_ > 0) check(CVodeQuadReInit(handles_.memory, handles_.accounts), "CVodeQuadReInit", t);
    ++result_.statistics.reinitialisations;
  }
  // After a switching: fast states to quasi-steady, then CVODE from there.
  void restart(double t) {
    const double slow_time = settle(t);
    reinitialise(t);
    current_squared_tolerances(t);
    // CVODE's own first-step estimate differences f along a step that leaves the slow manifold, so it sees
    // the settled fast mode and starts a thousand times too short. On the manifold the first-order local
    // error of a step h is about h²/2 · |x|/τ_S², within rtol for h = sqrt(2·rtol)·τ_S; a tenth of that.
    const double first_step = slow_time > 0.0 ? 0.1 * std::sqrt(2.0 * options_.relative_tolerance) * slow_time : 0.0;
    check(CVodeSetInitStep(handles_.memory, first_step), "CVodeSetInitStep", t);
    refresh_jacobian_while_sweeping(t);
    limit_steps_while_ringing(t);
  }
  // The run's max_step, shortened while a carried mode rings (CarriedTransient::step_limit).
  void limit_steps_while_ringing(double t) {
    const double limit = carried_.step_limit(t);
    if (!std::isfinite(limit) && !steps_limited_) return;
    steps_limited_ = std::isfinite(limit);
    double longest = options_.max_step;
    if (steps_limited_) longest = longest > 0.0 ? std::min(longest, limit) : limit;
    check(CVodeSetMaxStep(handles_.memory, longest), "CVodeSetMaxStep", t);
  }
  // While a part's conductance sweeps through decades (a contact's parting ramp), a Jacobian kept over CVODE's
  // usual 20 to 50 steps is decades off: Newton then stops on a wrong point that passes its convergence test
  // (a cable current left microamperes away from its quasi-steady value, with a rate of 1e8 A/s that no later
  // step can follow). Every step gets a fresh one then; CVODE's defaults (SUNDIALS 6) otherwise.
  void refresh_jacobian_while_sweeping(double t) {
    const bool swept = sweeping();
    check(CVodeSetJacEvalFrequency(handles_.memory, swept ? 1 : 51), "CVodeSetJacEvalFrequency", t);
    check(CVodeSetLSetupFrequency(handles_.memory, swept ? 1 : 20), "CVodeSetLSetupFrequency", t);
  }
  bool sweeping() const {
    for (int p = 0; p < circuit_.part_count(); ++p) {
      if (circuit_.part(p).sweeping(circuit_.layout(p), modes_.data())) return true;
    }
    return false;
  }
  // The ∫i² dt quadratures' tolerances from each part's resistance at the new modes (solver/absolute_tolerances.h).
  void current_squared_tolerances(double t);
  // Fast states to quasi-steady; returns the slowest remaining time constant τ_S, or 0 when nothing moved.
  double settle(double t);
  void record_skipped_peaks(double t, const SkippedTransient& transient);
  // Adds CVODE's counters since the last (re)initialisation to harvested_ (all or none).
  void harvest_statistics(double t);
  // The run's phases: initial operating point, the integration loop, and the bookkeeping after a failure.
  void prepare(double t0);
  void integrate(double t0);
  double advance(double t);
  std::optional<double> visit_step(double reached);
  void switch_inside_step(double command_time, double reached);
  void back_up_to(double time);
  std::optional<double> finish_inside_step(double reached);
  void take_sample(double sample_time);
  void handle_roots(double reached);
  void record_failure(const SolverError& error);
  FailureEvidence failure_evidence(const SolverError& error);
  void check_budgets(double reached);
  void collect_statistics(std::chrono::steady_clock::time_point started);
  // Applies every pending command at time t (states in x()). Returns true when a mode changed.
  bool apply_commands(double t);
  // A part that has started breaking at t: the time constant of the circuit it breaks, into Result::breaks.
  // Its own equations, so the perturbed solves leave the integration's caches alone.
  void record_break(double t, int part) {
    if (circuit_.part(part).breaking_state(circuit_.layout(part), modes_.data()) < 0) return;
    if (!break_equations_) break_equations_ = std::make_unique<Equations>(circuit_);
    result_.breaks.push_back(break_circuit(*break_equations_, t, x(), modes_.data(), unknowns_.data(), part));
  }
  void stored_energies(double t, const double* states, std::vector<double>& out) {
    solve_at(t, states);
    models::Point point = equations_.point(t, states, modes_.data(), unknowns_.data());
    out.resize(circuit_.part_count());
    for (int p = 0; p < circuit_.part_count(); ++p) out[p] = circuit_.part(p).stored_energy(point, circuit_.layout(p));
  }

  const Circuit& circuit_;
  const Options& options_;
  Equations equations_;
  std::unique_ptr<Equations> break_equations_;  // for record_break, made at the first break
  int states_;    // part states
  int n_;         // CVODE's state size: the part states, or one idle state for a circuit without any
  int accounts_;  // quadratures: energy accounts, then ∫i² dt (Circuit::quadrature_count)
  bool accounts_stale_ = false;
  std::vector<int> modes_;
  std::vector<double> unknowns_;
  std::vector<double> row_;
  std::vector<double> chosen_row_;  // the output columns of row_
  std::vector<double> step_row_;   // the row at a step's end while the peak search fills row_
  std::vector<double> middle_row_;  // the row at a step's middle while the peak search refines
  std::vector<double> largest_;     // per column, the largest |value| of the step rows so far
  std::vector<double> step_end_kept_;  // the states at a step's end while its carried transient's rows are added
  std::vector<double> peak_kept_;  // the states of a step row while the peak search uses the scratch vector
  std::vector<Command> pending_;
  CvodeHandles handles_;
  ToleranceScales scales_;  // the case's (solver/absolute_tolerances.h), from the initial operating point
  Result result_;
  double recorded_until_ = 0.0;
  CarriedTransient carried_;             // the switching's transient in closed form (inactive: y = x)
  bool steps_limited_ = false;           // CVODE's max step shortened for a ringing carried mode
  std::vector<double> carry_origin_;     // x at the carry's start
  std::vector<double> carry_weights_;    // 1/(rtol·|x0| + atol) there
  double carry_excursion_ = 0.0;         // the final offset's largest weighted magnitude
  std::vector<double> states_now_;       // the circuit's states x at the time the run stands at
  std::vector<double> callback_states_;  // scratch: x in a callback
  CarriedAccounts carried_accounts_;     // the accounts along the carried transient
  std::vector<double> carried_rates_;    // scratch: its rates or integrals
  long next_grid_index_ = 0;
  double last_sample_ = -std::numeric_limits<double>::infinity();
  // The sample at which the supervisor finished the sequence: the run ends there, not where the step that
  // holds it happens to end (which moved the end, and every integral up to it, with the step placement).
  std::optional<double> finished_at_;
  Statistics harvested_;
  bool cvode_ready_ = false;  // every CVODE object attached: the statistics can be read
  long steps_taken_ = 0;      // CVODE steps of the whole run, against Options::max_steps
  GiveUp give_up_ = GiveUp::SolverTrouble;  // why a SolverError ended the run (a budget, or CVODE's trouble)
  std::chrono::steady_clock::time_point started_ = std::chrono::steady_clock::now();
};

// CVODE's own messages are replaced by check(), which names the call and the time.
void quiet_error_handler(int, const char*, const char*, char*, void*) {}

int rhs_callback(double t, N_Vector x, N_Vector xdot, void* user) {
  return static_cast<Driver*>(user)->rhs(t, N_VGetArrayPointer(x), N_VGetArrayPointer(xdot));
}
int jacobian_callback(double t, N_Vector x, N_Vector, SUNMatrix matrix, void* user, N_Vector, N_Vector, N_Vector) {
  return static_cast<Driver*>(user)->jacobian(t, N_VGetArrayPointer(x), SUNDenseMatrix_Data(matrix));
}
int quadrature_callback(double t, N_Vector x, N_Vector rates, void* user) {
  return static_cast<Driver*>(user)->account_rates(t, N_VGetArrayPointer(x), N_VGetArrayPointer(rates));
}
int error_weight_callback(N_Vector y, N_Vector weights, void* user) {
  return static_cast<Driver*>(user)->error_weights(N_VGetArrayPointer(y), N_VGetArrayPointer(weights));
}
int root_callback(double t, N_Vector x, double* out, void* user) {
  return static_cast<Driver*>(user)->roots(t, N_VGetArrayPointer(x), out);
}

void Driver::create_vectors(double t0) {
  check(SUNContext_Create(nullptr, &handles_.context), "SUNContext_Create", t0);
  handles_.states = N_VNew_Serial(n_, handles_.context);
  check_pointer(handles_.states, "N_VNew_Serial");
  check(N_VEnableFusedOps_Serial(handles_.states, SUNTRUE), "N_VEnableFusedOps_Serial", t0);
  if (options_.eigen_kernels) use_eigen_kernels(handles_.states);
  handles_.scratch = N_VNew_Serial(n_, handles_.context);
  check_pointer(handles_.scratch, "N_VNew_Serial");
  if (options_.eigen_kernels) use_eigen_kernels(handles_.scratch);
  handles_.tolerances = N_VNew_Serial(n_, handles_.context);
  check_pointer(handles_.tolerances, "N_VNew_Serial");
  double* tolerance = N_VGetArrayPointer(handles_.tolerances);
  std::fill(tolerance, tolerance + n_, options_.absolute_tolerance);
  scales_ = case_scales(circuit_, unknowns_.data());
  const auto per_state = state_tolerances(circuit_, options_.relative_tolerance, options_.absolute_tolerance,
                                          options_.scale_absolute_tolerance, scales_);
  std::copy(per_state.begin(), per_state.end(), tolerance);
  if (accounts_ > 0) {
    handles_.accounts = N_VNew_Serial(accounts_, handles_.context);
    check_pointer(handles_.accounts, "N_VNew_Serial");
    handles_.account_tolerances = N_VNew_Serial(accounts_, handles_.context);
    check_pointer(handles_.account_tolerances, "N_VNew_Serial");
    N_VConst(options_.absolute_tolerance, handles_.account_tolerances);
    check(N_VEnableFusedOps_Serial(handles_.accounts, SUNTRUE), "N_VEnableFusedOps_Serial", t0);
    if (options_.eigen_kernels) use_eigen_kernels(handles_.accounts);
    std::copy(result_.initial_states.begin() + states_, result_.initial_states.end(), accounts());
  }
  states_now_.assign(n_, 0.0);
  callback_states_.assign(n_, 0.0);
  std::copy(result_.initial_states.begin(), result_.initial_states.begin() + states_, x());
  std::copy(x(), x() + n_, N_VGetArrayPointer(handles_.states));
}

void Driver::carry_from(double time, bool carry) {
  carried_ = CarriedTransient();
  if (carry && options_.carry_transients && states_ > 0 && !sweeping()) {
    solve_at(time, x());
    Eigen::MatrixXd jacobian(states_, states_);
    Eigen::VectorXd rates(states_);
    equations_.jacobian(time, x(), modes_.data(), unknowns_.data(), jacobian.data());
    equations_.state_rates(time, x(), modes_.data(), unknowns_.data(), rates.data());
    Eigen::VectorXd tolerances(states_);
    for (int i = 0; i < states_; ++i) tolerances[i] = tolerance_scale(i, x()[i]);
    carried_ = CarriedTransient(jacobian, rates, time, options_.duration, tolerances);
    carry_origin_.assign(x(), x() + states_);
    carry_weights_.resize(states_);
    std::vector<double> final(states_, 0.0);
    carried_.add_final_offset(final.data());
    carry_excursion_ = 0.0;
    for (int i = 0; i < states_; ++i) {
      carry_weights_[i] = 1.0 / tolerances[i];
      carry_excursion_ = std::max(carry_excursion_, std::fabs(final[i]) * carry_weights_[i]);
    }
  }
  carried_accounts_.stop();
  if (carried_.active() && accounts_ > 0 &&
      !carried_accounts_.start(carried_, x(), modes_.data(), unknowns_.data())) {
    carried_ = CarriedTransient();
  }
  std::copy(x(), x() + n_, N_VGetArrayPointer(handles_.states));
  if (carried_.active()) {
    check(CVodeWFtolerances(handles_.memory, error_weight_callback), "CVodeWFtolerances", time);
  } else {
    check(CVodeSVtolerances(handles_.memory, options_.relative_tolerance, handles_.tolerances), "CVodeSVtolerances",
          time);
  }
}

void Driver::initialise_cvode(double t0) {
  create_vectors(t0);
  handles_.memory = CVodeCreate(CV_BDF, handles_.context);
  check_pointer(handles_.memory, "CVodeCreate");
  // First, so that no later call (CVodeInit, tolerances, the linear solver) prints CVODE's own text.
  check(CVodeSetErrHandlerFn(handles_.memory, quiet_error_handler, nullptr), "CVodeSetErrHandlerFn", t0);
  check(CVodeSetMaxHnilWarns(handles_.memory, -1), "CVodeSetMaxHnilWarns", t0);
  check(CVodeInit(handles_.memory, rhs_callback, t0, handles_.states), "CVodeInit", t0);
  if (accounts_ > 0) {
    // Quadratures stay out of the Newton system and out of the error test: they are as accurate as the
    // states they are integrated from, and the dense matrix stays the size of the part states.
    check(CVodeQuadInit(handles_.memory, quadrature_callback, handles_.accounts), "CVodeQuadInit", t0);
    check(CVodeQuadSVtolerances(handles_.memory, options_.relative_tolerance, handles_.account_tolerances),
          "CVodeQuadSVtolerances", t0);
    check(CVodeSetQuadErrCon(handles_.memory, SUNTRUE), "CVodeSetQuadErrCon", t0);
  }
  check(CVodeSetUserData(handles_.memory, this), "CVodeSetUserData", t0);
  check(CVodeSVtolerances(handles_.memory, options_.relative_tolerance, handles_.tolerances), "CVodeSVtolerances", t0);
  attach_solver(t0);
  attach_roots(t0);
  cvode_ready_ = true;
}

void Driver::attach_solver(double t0) {
  handles_.matrix = SUNDenseMatrix(n_, n_, handles_.context);
  check_pointer(handles_.matrix, "SUNDenseMatrix");
  handles_.linear_solver = SUNLinSol_Dense(handles_.states, handles_.matrix, handles_.context);
  check_pointer(handles_.linear_solver, "SUNLinSol_Dense");
  if (options_.eigen_kernels) use_eigen_kernels(handles_.matrix, handles_.linear_solver);
  check(CVodeSetLinearSolver(handles_.memory, handles_.linear_solver, handles_.matrix), "CVodeSetLinearSolver", t0);
  check(CVodeSetJacFn(handles_.memory, jacobian_callback), "CVodeSetJacFn", t0);
  check(CVodeSetMaxNumSteps(handles_.memory, 100000), "CVodeSetMaxNumSteps", t0);
  if (options_.max_step > 0.0) check(CVodeSetMaxStep(handles_.memory, options_.max_step), "CVodeSetMaxStep", t0);
}

void Driver::attach_roots(double t0) {
  int root_total = circuit_.root_count() + static_cast<int>(options_.watches.size());
  if (root_total == 0) return;
  check(CVodeRootInit(handles_.memory, root_total, root_callback), "CVodeRootInit", t0);
  std::vector<int> directions(root_total, 0);
  for (int r = 0; r < circuit_.root_count(); ++r) {
    int owner = circuit_.root_owner(r);
    directions[r] = circuit_.part(owner).root_direction(r - circuit_.root_first(owner));
  }
  check(CVodeSetRootDirection(handles_.memory, directions.data()), "CVodeSetRootDirection", t0);
}

void Driver::harvest_statistics(double t) {
  if (!cvode_ready_) return;
  struct Counter {
    int (*read)(void*, long*);
    const char* call;
    long Statistics::*total;
  };
  static const Counter counters[] = {
      {CVodeGetNumSteps, "CVodeGetNumSteps", &Statistics::steps},
      {CVodeGetNumRhsEvals, "CVodeGetNumRhsEvals", &Statistics::rhs_evaluations},
      {CVodeGetNumJacEvals, "CVodeGetNumJacEvals", &Statistics::jacobian_evaluations},
      {CVodeGetNumNonlinSolvIters, "CVodeGetNumNonlinSolvIters", &Statistics::nonlinear_iterations},
      {CVodeGetNumErrTestFails, "CVodeGetNumErrTestFails", &Statistics::error_test_failures},
      {CVodeGetNumGEvals, "CVodeGetNumGEvals", &Statistics::root_evaluations}};
  // CVODE counts root evaluations only with rootfinding on; without it the last counter stays zero.
  const bool roots = circuit_.root_count() + options_.watches.size() > 0;
  const std::size_t used = std::size(counters) - (roots ? 0 : 1);
  long values[std::size(counters)] = {};
  for (std::size_t c = 0; c < used; ++c) check(counters[c].read(handles_.memory, &values[c]), counters[c].call, t);
  for (std::size_t c = 0; c < used; ++c) harvested_.*counters[c].total += values[c];
}

bool Driver::apply_commands(double t) {
  bool any = false;
  bool first = true;
  // The circuit just before the switching: a contact that opens on a current arcs (models/contactor.h).
  std::vector<int> modes_before;
  std::vector<double> states_before, unknowns_before;
  models::Point before;
  std::vector<int> moved;  // switches whose modes the commands changed
  while (!pending_.empty() && pending_.front().time <= t) {
    Command command = pending_.front();
    pending_.erase(pending_.begin());
    if (first) {
      // The row before the switching, unless the step that reached t has just recorded it.
      if (result_.steps.row_count() == 0 || result_.steps.times().back() != t) record_step_row(t, x());
      first = false;
      solve_at(t, x());
      modes_before = modes_;
      states_before.assign(x(), x() + states_);
      unknowns_before = unknowns_;
      before = equations_.point(t, states_before.data(), modes_before.data(), unknowns_before.data());
    }
    const auto& part = circuit_.part(command.part);
    auto change = part.command(command.action, circuit_.layout(command.part), modes_.data(), x(), &before);
    if (!change.problem.empty()) throw SolverError(change.problem, t);
    ++result_.statistics.events;
    result_.timeline.push_back(TimelineEntry{t, fmt::format("{} {}", netlist::action_word(command.action), part.name()), command.reason});
    any = any || change.changed;
    if (change.changed && part.role() == models::Role::Switch) moved.push_back(command.part);
  }
  if (!moved.empty()) {
    // A contact that struck an arc may find the circuit unable to drive the minimum arc current through it (a
    // parallel path took the current): it settles at once rather than through a root already crossed.
    solve_at(t, x());
    models::Point after = equations_.point(t, x(), modes_.data(), unknowns_.data());
    for (int part : moved) circuit_.part(part).settle(after, circuit_.layout(part), modes_.data());
    for (int part : moved) record_break(t, part);
  }
  if (!first) record_step_row(t, x());  // the row after
  return any;
}

// Initial network, then let modes follow the initial voltages; then CVODE.
void Driver::prepare(double t0) {
  for (const Command& command : options_.initial_commands) {
    auto change = circuit_.part(command.part).command(command.action, circuit_.layout(command.part), modes_.data(),
                                                      result_.initial_states.data());
    if (!change.problem.empty()) throw SolverError(change.problem, t0);
  }
  solve_at(t0, result_.initial_states.data());
  models::Point point = equations_.point(t0, result_.initial_states.data(), modes_.data(), unknowns_.data());
  bool changed = false;
  for (int p = 0; p < circuit_.part_count(); ++p) {
    changed = circuit_.part(p).settle(point, circuit_.layout(p), modes_.data()).changed || changed;
  }
  if (changed) solve_at(t0, result_.initial_states.data());
  stored_energies(t0, result_.initial_states.data(), result_.initial_stored);
  initialise_cvode(t0);
}

void Driver::integrate(double t0) {
  double t = t0;
  record_until(t0, x());
  // The initial state too may hold a fast mode away from its quasi-steady value (a cable current of zero
  // where the open contacts pass microamperes), so the run starts with a settling whether or not a command
  // applied at t0.
  apply_commands(t0);
  restart(t0);
  while (t < end()) {
    if (options_.supervisor && options_.supervisor->finished()) {
      result_.outcome = Outcome::SupervisorFinished;
      break;
    }
    t = advance(t);
  }
  if (t < options_.duration && !(t < end())) result_.outcome = Outcome::SupervisorFinished;
  result_.end_time = t;
  sync_accounts(t);
  result_.final_states = full_state();
  stored_energies(t, result_.final_states.data(), result_.final_stored);
}

// One CVODE step towards the next known-time command (or the end); returns the time the run stands at.
double Driver::advance(double t) {
  // After a root return that changed no mode, CVODE's own step already reaches past t; samples there may have
  // scheduled a command inside it, which must be met from the dense output (a stop time behind CVODE's time is
  // refused), as any command inside a step is.
  double internal = t;
  check(CVodeGetCurrentTime(handles_.memory, &internal), "CVodeGetCurrentTime", t);
  if (internal > t) {
    if (auto switched = visit_step(internal)) return *switched;
    if (auto finished = finish_inside_step(internal)) return *finished;
  }
  if (steps_limited_) limit_steps_while_ringing(t);
  double stop = pending_.empty() ? end() : std::min(end(), pending_.front().time);
  check(CVodeSetStopTime(handles_.memory, stop), "CVodeSetStopTime", t);
  double reached = t;
  int flag = CVode(handles_.memory, stop, handles_.states, &reached, CV_ONE_STEP);
  check(flag, "CVode", reached);
  states_from_solver(reached);
  accounts_stale_ = true;
  check_budgets(reached);
  if (auto switched = visit_step(reached)) return *switched;
  if (auto finished = finish_inside_step(reached)) return *finished;
  record_until(reached, x());
  if (flag == CV_ROOT_RETURN) handle_roots(reached);
  end_carry_if_departed(reached);
  return reached;
}

// Supervisor samples and commands inside the step just taken, in time order (commands first on a tie).
// Returns the command time when one was applied there: the run continues from it.
std::optional<double> Driver::visit_step(double reached) {
  while (true) {
    double command_time = pending_.empty() ? std::numeric_limits<double>::infinity() : pending_.front().time;
    double sample_time = options_.supervisor ? options_.supervisor->next_sample(last_sample_)
                                             : std::numeric_limits<double>::infinity();
    if (std::min(command_time, sample_time) > reached) return std::nullopt;
    if (command_time <= sample_time) {
      switch_inside_step(command_time, reached);
      return command_time;
    }
    take_sample(sample_time);
  }
}

// Goes back to a command inside the step (state from dense output, later rows dropped), applies it, restarts.
void Driver::switch_inside_step(double command_time, double reached) {
  if (command_time < reached) {
    back_up_to(command_time);
    ++result_.statistics.step_backs;
  } else {
    record_until(reached, x());
  }
  apply_commands(command_time);
  restart(command_time);
}

// The run back at `time` inside the step just taken: states and accounts from dense output, later rows dropped.
void Driver::back_up_to(double time) {
  double* dense = dense_states(time);
  if (accounts_ > 0) {
    check(CVodeGetQuadDky(handles_.memory, time, 0, handles_.accounts), "CVodeGetQuadDky", time);
    add_carried_accounts(time);
  }
  accounts_stale_ = false;
  result_.steps.truncate_after(time);
  // The state goes to its own vector first: recording the output rows before it reuses the dense-output
  // scratch vector (it once restarted the run from the last such row's state).
  std::copy(dense, dense + n_, x());
  record_until(time, x());
}

// Where the supervisor finished the sequence at a sample inside the step, the run ends at that sample.
std::optional<double> Driver::finish_inside_step(double reached) {
  if (!finished_at_ || !(*finished_at_ < reached) || !(*finished_at_ > recorded_until_)) return std::nullopt;
  back_up_to(*finished_at_);
  return *finished_at_;
}

void Driver::take_sample(double sample_time) {
  double* dense = dense_states(sample_time);
  solve_at(sample_time, dense);
  Probe probe{&circuit_, sample_time, dense, unknowns_.data(), modes_.data()};
  std::vector<Command> decided;
  options_.supervisor->sample(probe, decided, result_.timeline);
  if (!finished_at_ && options_.supervisor->finished()) finished_at_ = sample_time;
  for (auto& command : decided) {
    command.time = std::max(command.time, sample_time);
    auto position = std::upper_bound(pending_.begin(), pending_.end(), command,
                                     [](const Command& a, const Command& b) { return a.time < b.time; });
    pending_.insert(position, command);
  }
  last_sample_ = sample_time;
}

// A part's resistance at the new modes is its heat over its current squared; a part carrying no current keeps
// the tolerance it had (at the start: the energy accounts' own).
void Driver::current_squared_tolerances(double t) {
  const auto& parts = circuit_.current_squared_parts();
  if (parts.empty()) return;
  solve_at(t, x());
  models::Point point = equations_.point(t, x(), modes_.data(), unknowns_.data());
  double* tolerance = N_VGetArrayPointer(handles_.account_tolerances);
  const std::size_t first = circuit_.energy_accounts().size();
  for (std::size_t k = 0; k < parts.size(); ++k) {
    const models::Part& part = circuit_.part(parts[k]);
    const double current = part.current(point, circuit_.layout(parts[k]));
    const double heat = part.powers(point, circuit_.layout(parts[k])).heat;
    if (!(current * current > 0.0) || !(heat > 0.0)) continue;
    tolerance[first + k] = current_squared_tolerance(options_.relative_tolerance, options_.absolute_tolerance,
                                                     scales_, heat / (current * current));
  }
  check(CVodeQuadSVtolerances(handles_.memory, options_.relative_tolerance, handles_.account_tolerances),
        "CVodeQuadSVtolerances", t);
}

// The rows before and just after the switching hold the fast transient's start; the row recorded here its end
// (a monotone transient has its extremes there). The stored-energy jump goes to Result::settled_energy.
double Driver::settle(double t) {
  if (!options_.settle_fast_states || states_ < 2) return 0.0;
  std::vector<double> before, after;
  stored_energies(t, x(), before);
  const FastSettling settings{100.0 * options_.relative_tolerance, options_.duration};
  const auto settled = settle_fast_states(equations_, t, x(), modes_.data(), unknowns_.data(), settings);
  if (!settled.settled) {
    reset_guess();
    return 0.0;
  }
  stored_energies(t, x(), after);
  // The skipped transient's energy goes to the accounts that would have integrated it; what the linearised
  // transient does not explain of the stored-energy jump stays in Result::settled_energy.
  sync_accounts(t);
  double booked = 0.0;
  const auto& channels = circuit_.energy_accounts();
  for (int a = 0; a < accounts_; ++a) accounts()[a] += settled.skipped_accounts[a];
  for (std::size_t a = 0; a < channels.size(); ++a) {
    booked += channels[a].channel == models::EnergyChannel::Source ? settled.skipped_accounts[a]
                                                                   : -settled.skipped_accounts[a];
  }
  for (int p = 0; p < circuit_.part_count(); ++p) result_.settled_energy += after[p] - before[p];
  result_.settled_energy -= booked;
  ++result_.statistics.settlings;
  record_skipped_peaks(t, settled.transient);
  record_step_row(t, x());
  return settled.split.slow_time;
}

// A signal that peaks inside a step would be sampled short of its peak by the rows at the step's ends. The
// dense output at the step's middle shows such a peak (larger in magnitude than both ends); the parabola through
// the three gives its time, and a row there holds it. Where the peak may be the column's largest so far, it is
// found exactly (refine_peak), also when the parabola puts it between the middle and an end. Only within the
// step just taken, where dense output holds.
void Driver::record_peaks_inside_step(double t) {
  if (!options_.record_steps || result_.steps.row_count() == 0) return;
  const std::size_t last = result_.steps.row_count() - 1;
  const double start = result_.steps.time(last);
  double step = 0.0;
  check(CVodeGetLastStep(handles_.memory, &step), "CVodeGetLastStep", t);
  // Only where the dense output holds from the last row on (a carried transient's grid rows need not be step ends).
  if (!(start < t) || start < dense_start() - 1e-9 * step) return;
  double* dense = N_VGetArrayPointer(handles_.scratch);
  const double middle = 0.5 * (start + t);
  const std::vector<double>& at_end = step_row_;
  dense_states(middle);
  solve_at(middle, dense);
  fill_row(middle, dense);
  middle_row_ = row_;  // row_ is the scratch of every later evaluation
  // Where CVODE's dense output holds: the last step it took, [t_n − h, t_n].
  double dense_to = t;
  check(CVodeGetCurrentTime(handles_.memory, &dense_to), "CVodeGetCurrentTime", t);
  const double dense_from = dense_to - step;
  std::vector<double> peaks;
  const double half = 0.5 * (t - start);
  for (std::size_t c = 0; c < middle_row_.size(); ++c) {
    const double a = std::fabs(result_.steps.value(last, static_cast<int>(c))), b = std::fabs(middle_row_[c]),
                 e = std::fabs(at_end[c]);
    // The parabola through (−1, a), (0, b), (1, e) in half-steps from the middle: its vertex and top.
    const double curvature = a - 2.0 * b + e;
    if (!(curvature < 0.0)) continue;
    const double offset = 0.5 * (a - e) / curvature;
    const double top = b - 0.125 * (a - e) * (a - e) / curvature;
    const double vertex = middle + std::clamp(offset, -1.0, 1.0) * half;
    const bool above_ends = b > a && b > e;
    // Where the column may reach its largest |value| so far, the peak is searched for exactly — also one the
    // parabola puts between the middle and an end (the middle then lies below that end). Not where the top rises
    // less than 10·rtol above the step's ends: those rows hold the peak to that already (a plateau's wiggles at
    // the solver's tolerance would otherwise each cost a search).
    const bool may_be_largest = top >= (1.0 - 1e-3) * largest_magnitude(c) &&
                                top - std::max(a, e) > 10.0 * options_.relative_tolerance * top &&
                                start >= dense_from && t <= dense_to && middle > start && middle < t;
    if (may_be_largest && (above_ends || (std::fabs(offset) < 1.0 && top > std::max(a, e)))) {
      if (above_ends) {
        peaks.push_back(refine_peak(start, t, middle, b, c, a, e));
      } else if (vertex > start && vertex < t) {
        const double at_vertex = magnitude_at(vertex, c);
        if (at_vertex > a && at_vertex > e) peaks.push_back(refine_peak(start, t, vertex, at_vertex, c, a, e));
      }
    } else if (above_ends) {
      peaks.push_back(vertex);
    }
  }
  std::sort(peaks.begin(), peaks.end());
  peaks.erase(std::unique(peaks.begin(), peaks.end()), peaks.end());
  for (double peak : peaks) {
    if (!(peak > start && peak < t)) continue;
    dense_states(peak);
    solve_at(peak, dense);
    fill_row(peak, dense);
    add_step_row(peak, row_);
  }
}

// |value| of column `column` at `time` inside the step just taken, from the dense output; 0 where it is not finite
// (the minimiser then moves away from it).
double Driver::magnitude_at(double time, std::size_t column) {
  double* dense = dense_states(time);
  solve_at(time, dense);
  const double value = std::fabs(column_value(time, dense, column));
  return std::isfinite(value) ? value : 0.0;
}

// The time of the largest |value| of `column` inside (start, end), from a guess inside whose magnitude `at_guess`
// is above both ends' (a at start, e at end), by Brent's minimisation of −|value| on the dense output (GSL,
// docs/references.md [R-GSL-Brent-minimum]). A parabola through three points alone misses a sharp peak — the
// main-closure inrush of a step of microseconds — by up to 1e-4, and by how the steps happen to fall.
double Driver::refine_peak(double start, double end, double guess, double at_guess, std::size_t column, double a,
                           double e) {
  // In the step's own coordinate u = (time − start)/(end − start): GSL's Brent keeps a step of √ε·|u| at least,
  // which at an absolute time of seconds would exceed a step of nanoseconds.
  struct Search {
    Driver* driver;
    std::size_t column;
    double start, length;
  } search{this, column, start, end - start};
  gsl_function objective{[](double u, void* data) {
                           auto* s = static_cast<Search*>(data);
                           return -s->driver->magnitude_at(s->start + u * s->length, s->column);
                         },
                         &search};
  std::unique_ptr<gsl_min_fminimizer, void (*)(gsl_min_fminimizer*)> minimiser(
      gsl_min_fminimizer_alloc(gsl_min_fminimizer_brent), gsl_min_fminimizer_free);
  gsl_min_fminimizer_set_with_values(minimiser.get(), &objective, (guess - start) / search.length, -at_guess, 0.0,
                                     -a, 1.0, -e);
  // To a millionth of the step: the peak's value is then exact to (1e-6)² of the step's curvature.
  for (int iteration = 0; iteration < 40; ++iteration) {
    if (gsl_min_fminimizer_iterate(minimiser.get()) != GSL_SUCCESS) break;
    const double lower = gsl_min_fminimizer_x_lower(minimiser.get()), upper = gsl_min_fminimizer_x_upper(minimiser.get());
    if (gsl_min_test_interval(lower, upper, 1e-6, 0.0) == GSL_SUCCESS) break;
  }
  // A largest value at (or within a thousandth of the step of) either end is that end's row: no row of its own,
  // as a row a hair from another one makes the rows' parabolas (analysis/trace.cc) amplify rounding.
  const double u = gsl_min_fminimizer_x_minimum(minimiser.get());
  return u > 1e-3 && u < 1.0 - 1e-3 ? start + u * search.length : start;
}

// Rows at time t (no width in any integral) where a signal peaks inside the skipped transient: the transient on
// a grid of a tenth of its shortest time constant (a twentieth moves no stored result, a quarter does), then each
// column's largest value and largest magnitude refined by the parabola through the grid points around it.
void Driver::record_skipped_peaks(double t, const SkippedTransient& transient) {
  if (!options_.record_steps) return;
  std::vector<double> grid;
  for (double e = 0.0; e < 3.0 * transient.shortest_time(); e += 0.1 * transient.shortest_time()) grid.push_back(e);
  for (double e = 3.0 * transient.shortest_time(); e < 10.0 * transient.longest_time(); e *= 1.2) grid.push_back(e);
  std::vector<double> state(states_), values;
  const std::size_t columns = row_.size();
  for (double elapsed : grid) {
    transient.states_at(elapsed, state.data());
    solve_at(t, state.data());
    fill_row(t, state.data());
    values.insert(values.end(), row_.begin(), row_.end());
  }
  std::vector<double> peaks;
  for (std::size_t c = 0; c < columns; ++c) {
    for (bool magnitude : {false, true}) {
      auto value = [&](std::size_t k) { return magnitude ? std::fabs(values[k * columns + c]) : values[k * columns + c]; };
      std::size_t best = 0;
      for (std::size_t k = 1; k < grid.size(); ++k)
        if (value(k) > value(best)) best = k;
      if (best == 0 || best + 1 >= grid.size()) continue;  // at an end: the rows around the switching hold it
      const double x0 = grid[best - 1], x1 = grid[best], x2 = grid[best + 1];
      const double y0 = value(best - 1), y1 = value(best), y2 = value(best + 1);
      const double denominator = (x0 - x1) * (x0 - x2) * (x1 - x2);
      const double a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / denominator;
      const double b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / denominator;
      const double vertex = a < 0.0 ? -b / (2.0 * a) : x1;
      peaks.push_back(std::clamp(vertex, x0, x2));
    }
  }
  std::sort(peaks.begin(), peaks.end());
  peaks.erase(std::unique(peaks.begin(), peaks.end()), peaks.end());
  for (double elapsed : peaks) {
    transient.states_at(elapsed, state.data());
    solve_at(t, state.data());
    fill_row(t, state.data());
    add_step_row(t, row_);
  }
}

// State events flip the parts' modes (then CVODE restarts); level watches record their crossings.
void Driver::handle_roots(double reached) {
  int total = circuit_.root_count() + static_cast<int>(options_.watches.size());
  std::vector<int> found(total, 0);
  check(CVodeGetRootInfo(handles_.memory, found.data()), "CVodeGetRootInfo", reached);
  bool changed = false;
  for (int r = 0; r < circuit_.root_count(); ++r) {
    if (found[r] == 0) continue;
    int owner = circuit_.root_owner(r);
    auto change = circuit_.part(owner).on_root(r - circuit_.root_first(owner), found[r], circuit_.layout(owner),
                                               modes_.data());
    if (!change.changed) continue;
    changed = true;
    ++result_.statistics.events;
    if (change.silent) continue;
    TimelineEntry entry{reached, fmt::format("state event {}", circuit_.part(owner).name()),
                        found[r] > 0 ? "voltage rose through a threshold" : "voltage fell through a threshold"};
    entry.state_event = true;
    result_.timeline.push_back(std::move(entry));
  }
  for (std::size_t w = 0; w < options_.watches.size(); ++w) {
    int direction = found[circuit_.root_count() + w];
    if (direction != 0) result_.crossings.push_back(Crossing{reached, static_cast<int>(w), direction});
  }
  if (changed) {
    record_step_row(reached, x());
    restart(reached);
  }
}

// The step budget (run.max_steps) every step; the wall-clock budget (run.max_wall_time) every 64 steps, since
// reading the clock costs about as much as a small step.
void Driver::check_budgets(double reached) {
  if (++steps_taken_ > options_.max_steps) {
    give_up_ = GiveUp::StepBudget;
    throw SolverError(fmt::format("more than {} steps (run.max_steps) before t = {:.9g} s", options_.max_steps,
                                  reached),
                      reached);
  }
  if (steps_taken_ % 64 != 0) return;
  double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - started_).count();
  if (wall > options_.max_wall_time) {
    give_up_ = GiveUp::WallBudget;
    throw SolverError(fmt::format("more than {:g} s of wall-clock time (run.max_wall_time) before t = {:.9g} s, "
                                  "after {} steps",
                                  options_.max_wall_time, reached, steps_taken_),
                      reached);
  }
}

// What CVODE can still tell after it stopped: the step size, the error weights and local error estimates of the
// last step, and the Jacobian at the last accepted state. Each read is best effort.
FailureEvidence Driver::failure_evidence(const SolverError& error) {
  FailureEvidence evidence;
  evidence.reason = give_up_;
  evidence.cause = error.what();
  evidence.time = error.time();
  evidence.duration = options_.duration;
  evidence.max_step = options_.max_step;
  const auto& info = circuit_.state_info();
  for (const auto& state : info) {
    evidence.state_quantities.push_back(state.name);
    evidence.state_units.push_back(state.unit);
  }
  evidence.state_parts.resize(info.size());
  for (int p = 0; p < circuit_.part_count(); ++p) {
    int first = circuit_.layout(p).state;
    std::size_t count = first < 0 ? 0 : circuit_.part(p).states(circuit_.spec().ambient).size();
    for (std::size_t k = 0; k < count; ++k) evidence.state_parts[first + k] = circuit_.part(p).name();
  }
  if (!cvode_ready_ || states_ == 0) return evidence;
  double step = 0.0;
  if (CVodeGetCurrentStep(handles_.memory, &step) == CV_SUCCESS && step > 0.0) evidence.step = step;
  N_Vector vector = N_VClone(handles_.states);
  if (vector != nullptr) {
    const double* values = N_VGetArrayPointer(vector);
    if (CVodeGetErrWeights(handles_.memory, vector) == CV_SUCCESS) evidence.error_weights.assign(values, values + states_);
    if (CVodeGetEstLocalErrors(handles_.memory, vector) == CV_SUCCESS) evidence.local_errors.assign(values, values + states_);
    N_VDestroy(vector);
  }
  try {
    solve_at(error.time(), x());
    evidence.jacobian.resize(states_, states_);
    equations_.jacobian(error.time(), x(), modes_.data(), unknowns_.data(), evidence.jacobian.data());
  } catch (const SolverError&) {
    evidence.jacobian.resize(0, 0);  // no operating point at the last state: no modes to report
  }
  return evidence;
}

void Driver::record_failure(const SolverError& error) {
  result_.outcome = Outcome::SolverFailure;
  result_.end_time = error.time();
  FailureEvidence evidence = failure_evidence(error);
  result_.message = std::string(error.what()) + "\n" + failure_text(evidence, diagnose_failure(evidence));
  if (!handles_.states) return;
  // After a failure these reads are best effort: the failure's own message is what the run reports, and the
  // accounts and counters keep their last values read.
  try {
    sync_accounts(result_.end_time);
  } catch (const SolverError&) {
  }
  result_.final_states = full_state();
  try {
    harvest_statistics(result_.end_time);
  } catch (const SolverError&) {
  }
}

void Driver::collect_statistics(std::chrono::steady_clock::time_point started) {
  Statistics& s = result_.statistics;
  s.steps = harvested_.steps;
  s.rhs_evaluations = harvested_.rhs_evaluations;
  s.jacobian_evaluations = harvested_.jacobian_evaluations;
  s.nonlinear_iterations = harvested_.nonlinear_iterations;
  s.error_test_failures = harvested_.error_test_failures;
  s.root_evaluations = harvested_.root_evaluations;
  s.network_newton_iterations = equations_.newton_iterations();
  s.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
}

Result Driver::run() {
  auto started = started_;
  const double t0 = 0.0;
  result_.initial_states = circuit_.initial_states();
  try {
    prepare(t0);
    integrate(t0);
    harvest_statistics(result_.end_time);
  } catch (const SolverError& error) {
    record_failure(error);
  }
  result_.final_modes = modes_;
  collect_statistics(started);
  return std::move(result_);
}

}  // namespace

Result simulate(const Circuit& circuit, const Options& options) {
  check_outputs(circuit, options);
  Driver driver(circuit, options);
  return driver.run();
}

}  // namespace linkrise::solver
