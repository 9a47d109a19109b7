#include "solver/transient.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <memory>

#include <cvodes/cvodes.h>
#include <fmt/format.h>
#include <nvector/nvector_serial.h>
#include <sundials/sundials_context.h>
#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

#include "solver/equations.h"
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

Options options_from(const Circuit& circuit) {
  const auto& spec = circuit.spec();
  Options options;
  options.duration = spec.run.duration;
  options.relative_tolerance = spec.run.relative_tolerance;
  options.absolute_tolerance = spec.run.absolute_tolerance;
  options.max_step = spec.run.max_step;
  options.max_steps = spec.run.max_steps;
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
  N_Vector accounts = nullptr;          // energy accounts, integrated as quadratures
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
        accounts_(static_cast<int>(circuit.energy_accounts().size())),
        modes_(circuit.initial_modes()),
        unknowns_(circuit.unknown_count(), 0.0),
        row_(circuit.node_names().size() + circuit.signal_columns().size(), 0.0) {
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
    result_.samples = Waveform(std::move(headers));
    // Growing the row store step by step would copy it a dozen times per run; a sequence run takes about a
    // thousand steps.
    if (options.record_steps) result_.steps.reserve(2048);
  }

  Result run();

  // CVODE callbacks
  int rhs(double t, const double* x, double* xdot) {
    if (!network_solved(t, x)) return 1;
    equations_.state_rates(t, x, modes_.data(), unknowns_.data(), xdot);
    if (states_ == 0) xdot[0] = 0.0;
    return 0;
  }
  int account_rates(double t, const double* x, double* out) {
    if (!network_solved(t, x)) return 1;
    equations_.account_rates(t, x, modes_.data(), unknowns_.data(), out);
    return 0;
  }
  int jacobian(double t, const double* x, double* matrix) {
    if (states_ == 0) {
      matrix[0] = 0.0;  // the idle state of a circuit without dynamic states
      return 0;
    }
    if (!network_solved(t, x)) return 1;
    equations_.jacobian(t, x, modes_.data(), unknowns_.data(), matrix);
    return 0;
  }
  int roots(double t, const double* x, double* out) {
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

 private:
  void reset_guess() { std::fill(unknowns_.begin(), unknowns_.end(), 0.0); }
  // The network at (t, x) into unknowns_ for a callback; false (after clearing the guess) tells CVODE the
  // failure is recoverable: it retries with a smaller step.
  bool network_solved(double t, const double* x) {
    if (equations_.solve_network(t, x, modes_.data(), unknowns_.data())) return true;
    reset_guess();
    return false;
  }
  double* x() { return N_VGetArrayPointer(handles_.states); }
  double* accounts() { return accounts_ > 0 ? N_VGetArrayPointer(handles_.accounts) : nullptr; }
  // Part states then energy accounts, the layout of Result::initial_states/final_states.
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
  void record_step_row(double t, const double* states) {
    if (!options_.record_steps) return;
    solve_at(t, states);
    fill_row(t, states);
    result_.steps.add_row(t, row_);
  }
  // Grid rows in (recorded_until_, t] from dense output, then a step row at t (states at t given).
  void record_until(double t, const double* states) {
    if (options_.sample) {
      double step = *options_.sample;
      double* dense = N_VGetArrayPointer(handles_.scratch);
      while (true) {
        double grid = static_cast<double>(next_grid_index_) * step;
        if (grid > t * (1.0 + 1e-14) || grid > options_.duration * (1.0 + 1e-14)) break;
        if (grid < t) {
          check(CVodeGetDky(handles_.memory, grid, 0, handles_.scratch), "CVodeGetDky", grid);
          solve_at(grid, dense);
          fill_row(grid, dense);
        } else {
          solve_at(t, states);
          fill_row(t, states);
        }
        result_.samples.add_row(grid, row_);
        ++next_grid_index_;
      }
    }
    record_step_row(t, states);
    recorded_until_ = t;
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
  }
  void reinitialise(double t) {
    sync_accounts(t);
    harvest_statistics(t);
    check(CVodeReInit(handles_.memory, t, handles_.states), "CVodeReInit", t);
    if (accounts_ > 0) check(CVodeQuadReInit(handles_.memory, handles_.accounts), "CVodeQuadReInit", t);
    ++result_.statistics.reinitialisations;
  }
  // Adds CVODE's counters since the last (re)initialisation to harvested_ (all or none).
  void harvest_statistics(double t);
  // The run's phases: initial operating point, the integration loop, and the bookkeeping after a failure.
  void prepare(double t0);
  void integrate(double t0);
  double advance(double t);
  std::optional<double> visit_step(double reached);
  void switch_inside_step(double command_time, double reached);
  void take_sample(double sample_time);
  void handle_roots(double reached);
  void record_failure(const SolverError& error);
  FailureEvidence failure_evidence(const SolverError& error);
  void check_budgets(double reached);
  void collect_statistics(std::chrono::steady_clock::time_point started);
  // Applies every pending command at time t (states in x()). Returns true when a mode changed.
  bool apply_commands(double t);
  void stored_energies(double t, const double* states, std::vector<double>& out) {
    solve_at(t, states);
    models::Point point = equations_.point(t, states, modes_.data(), unknowns_.data());
    out.resize(circuit_.part_count());
    for (int p = 0; p < circuit_.part_count(); ++p) out[p] = circuit_.part(p).stored_energy(point, circuit_.layout(p));
  }

  const Circuit& circuit_;
  const Options& options_;
  Equations equations_;
  int states_;    // part states
  int n_;         // CVODE's state size: the part states, or one idle state for a circuit without any
  int accounts_;  // energy accounts (CVODES quadratures)
  bool accounts_stale_ = false;
  std::vector<int> modes_;
  std::vector<double> unknowns_;
  std::vector<double> row_;
  std::vector<Command> pending_;
  CvodeHandles handles_;
  Result result_;
  double recorded_until_ = 0.0;
  long next_grid_index_ = 0;
  double last_sample_ = -std::numeric_limits<double>::infinity();
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
int root_callback(double t, N_Vector x, double* out, void* user) {
  return static_cast<Driver*>(user)->roots(t, N_VGetArrayPointer(x), out);
}

void Driver::create_vectors(double t0) {
  check(SUNContext_Create(nullptr, &handles_.context), "SUNContext_Create", t0);
  handles_.states = N_VNew_Serial(n_, handles_.context);
  check_pointer(handles_.states, "N_VNew_Serial");
  check(N_VEnableFusedOps_Serial(handles_.states, SUNTRUE), "N_VEnableFusedOps_Serial", t0);
  handles_.scratch = N_VNew_Serial(n_, handles_.context);
  check_pointer(handles_.scratch, "N_VNew_Serial");
  handles_.tolerances = N_VNew_Serial(n_, handles_.context);
  check_pointer(handles_.tolerances, "N_VNew_Serial");
  const auto& info = circuit_.state_info();
  double* tolerance = N_VGetArrayPointer(handles_.tolerances);
  for (int i = 0; i < n_; ++i) {
    tolerance[i] = options_.absolute_tolerance * (i < static_cast<int>(info.size()) ? info[i].tolerance_scale : 1.0);
  }
  if (accounts_ > 0) {
    handles_.accounts = N_VNew_Serial(accounts_, handles_.context);
    check_pointer(handles_.accounts, "N_VNew_Serial");
    check(N_VEnableFusedOps_Serial(handles_.accounts, SUNTRUE), "N_VEnableFusedOps_Serial", t0);
    std::copy(result_.initial_states.begin() + states_, result_.initial_states.end(), accounts());
  }
  std::fill(x(), x() + n_, 0.0);
  std::copy(result_.initial_states.begin(), result_.initial_states.begin() + states_, x());
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
    check(CVodeQuadSStolerances(handles_.memory, options_.relative_tolerance, options_.absolute_tolerance),
          "CVodeQuadSStolerances", t0);
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
  while (!pending_.empty() && pending_.front().time <= t) {
    Command command = pending_.front();
    pending_.erase(pending_.begin());
    if (first) {
      // The row before the switching, unless the step that reached t has just recorded it.
      if (result_.steps.row_count() == 0 || result_.steps.times().back() != t) record_step_row(t, x());
      first = false;
    }
    const auto& part = circuit_.part(command.part);
    auto change = part.command(command.action, circuit_.layout(command.part), modes_.data(), x());
    if (!change.problem.empty()) throw SolverError(change.problem, t);
    ++result_.statistics.events;
    result_.timeline.push_back(TimelineEntry{t, fmt::format("{} {}", netlist::action_word(command.action), part.name()), command.reason});
    any = any || change.changed;
  }
  if (!first) record_step_row(t, x());  // the row after
  return any;
}

// Initial network, then let modes follow the initial voltages; then CVODE.
void Driver::prepare(double t0) {
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
  if (apply_commands(t0)) reinitialise(t0);
  while (t < options_.duration) {
    if (options_.supervisor && options_.supervisor->finished()) {
      result_.outcome = Outcome::SupervisorFinished;
      break;
    }
    t = advance(t);
  }
  result_.end_time = t;
  sync_accounts(t);
  result_.final_states = full_state();
  stored_energies(t, result_.final_states.data(), result_.final_stored);
}

// One CVODE step towards the next known-time command (or the end); returns the time the run stands at.
double Driver::advance(double t) {
  double stop = pending_.empty() ? options_.duration : std::min(options_.duration, pending_.front().time);
  check(CVodeSetStopTime(handles_.memory, stop), "CVodeSetStopTime", t);
  double reached = t;
  int flag = CVode(handles_.memory, stop, handles_.states, &reached, CV_ONE_STEP);
  check(flag, "CVode", reached);
  accounts_stale_ = true;
  check_budgets(reached);
  if (auto switched = visit_step(reached)) return *switched;
  record_until(reached, x());
  if (flag == CV_ROOT_RETURN) handle_roots(reached);
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
    double* dense = N_VGetArrayPointer(handles_.scratch);
    check(CVodeGetDky(handles_.memory, command_time, 0, handles_.scratch), "CVodeGetDky", command_time);
    if (accounts_ > 0) {
      check(CVodeGetQuadDky(handles_.memory, command_time, 0, handles_.accounts), "CVodeGetQuadDky", command_time);
    }
    accounts_stale_ = false;
    result_.steps.truncate_after(command_time);
    record_until(command_time, dense);
    std::copy(dense, dense + n_, x());
    ++result_.statistics.step_backs;
  } else {
    record_until(reached, x());
  }
  apply_commands(command_time);
  reinitialise(command_time);
}

void Driver::take_sample(double sample_time) {
  double* dense = N_VGetArrayPointer(handles_.scratch);
  check(CVodeGetDky(handles_.memory, sample_time, 0, handles_.scratch), "CVodeGetDky", sample_time);
  solve_at(sample_time, dense);
  Probe probe{&circuit_, sample_time, dense, unknowns_.data(), modes_.data()};
  std::vector<Command> decided;
  options_.supervisor->sample(probe, decided, result_.timeline);
  for (auto& command : decided) {
    command.time = std::max(command.time, sample_time);
    auto position = std::upper_bound(pending_.begin(), pending_.end(), command,
                                     [](const Command& a, const Command& b) { return a.time < b.time; });
    pending_.insert(position, command);
  }
  last_sample_ = sample_time;
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
    if (change.changed) {
      changed = true;
      ++result_.statistics.events;
      result_.timeline.push_back(TimelineEntry{reached, fmt::format("state event {}", circuit_.part(owner).name()),
                                               found[r] > 0 ? "voltage rose through a threshold"
                                                            : "voltage fell through a threshold"});
    }
  }
  for (std::size_t w = 0; w < options_.watches.size(); ++w) {
    int direction = found[circuit_.root_count() + w];
    if (direction != 0) result_.crossings.push_back(Crossing{reached, static_cast<int>(w), direction});
  }
  if (changed) {
    record_step_row(reached, x());
    reinitialise(reached);
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
  Driver driver(circuit, options);
  return driver.run();
}

}  // namespace linkrise::solver
