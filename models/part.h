#pragma once
// The interface every part kind implements.
//
// The solver keeps all changing data: dynamic states x (capacitor voltages, inductor currents, SOC,
// temperatures...), network unknowns y (node voltages, then branch currents) and discrete modes
// (contactor open/closed, load enabled). Parts are immutable parameter objects, so one circuit may be
// evaluated from many threads at once.
//
// Network equations G(y, x) = 0: one KCL row per non-ground node (sum of currents leaving the node
// into parts) and one row per branch unknown. State equations dx/dt = f(x, y). Sign convention: a part's
// current is positive when it enters the part at its first (positive) node.
//
// Public entries are non-virtual: they check the call is consistent, then call the kind's do_ hook.
#include <array>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "models/breaking_capacity.h"
#include "models/pulse_curve.h"
#include "netlist/case.h"
#include "netlist/parameter_reader.h"

namespace linkrise::models {

/// How a part ties its two nodes together, for the topology checks before a solve.
enum class Link {
  Conductive,      // a finite resistance between the nodes (resistor, contactor, Thevenin source with R > 0)
  VoltageDefined,  // fixes the voltage between the nodes (ideal source, capacitor without ESR)
  CurrentDefined,  // fixes or draws a current, gives no voltage path (inductor, constant power/current load)
};

/// What a part is in the circuit. Later layers find parts by function (the pack source, the link capacitor,
/// the contactors, the resistors that take heat) through this, never through kind words.
enum class Role {
  Source,     // delivers energy: an ideal source, a cell string
  Storage,    // holds charge: a capacitor (the DC link)
  Switch,     // opened and closed by commands: a contactor
  Load,       // takes energy out as useful work: constant-power and constant-current loads
  Resistive,  // turns current into heat and nothing else: resistors and thermistors
  Conductor,  // connects parts with series R and L: an inductor, a cable
  Rectifier,  // conducts one way: a diode
  Sensor,     // measures a voltage for the BMS (its divider may load the nodes): a voltage sensor
};
/// The role as a lower-case word for summaries ("source", "storage"...).
const char* role_word(Role role);

/// How a switching part moves when commanded (its data-sheet actuation data).
struct Actuation {
  double closing_delay = 0.0;     // s, command to first contact
  double opening_delay = 0.0;     // s, command to contact parting
  int bounce_count = 0;           // re-openings after the first touch
  double bounce_interval = 2e-4;  // s, between bounce transitions
  double parting_time = 0.0;      // s, resistance rise while the contacts part (0: instantaneous)
  double closed_resistance = 0.0; // Ohm
  double open_resistance = 0.0;   // Ohm
};

/// What a load draws once enabled, and where it falls back to a resistance.
struct LoadDemand {
  bool constant_power = true;  // false: constant current
  double demand = 0.0;         // W (constant power) or A (constant current)
  double resistive_below = 0.0;  // V: below this the load behaves as the resistance it has there
  double enable_voltage = 0.0;   // V
  double disable_voltage = 0.0;  // V
};

/// A value the part derived from its inputs (e.g. a cable's loop resistance from its geometry), for reports.
struct DerivedValue {
  std::string name;  // e.g. "loop resistance"
  double value = 0.0;
  std::string unit;  // SI symbol
  std::string origin;  // how it was derived, e.g. "from length, cross-section and material at 20 degC"
};

/// The parameter that sets a part's defining value (a resistor's resistance, a capacitor's capacitance).
/// `alone` is false when other parameters shape the part's law too (a thermistor's curve), so setting this
/// one value does not make the part a plain element of that value.
struct DefiningValue {
  std::string parameter;
  std::string unit;
  bool alone = true;
};

/// Where a part's data sits in the solver's vectors.
struct Layout {
  std::array<int, 2> node{-1, -1};  // unknown index of each terminal; -1 is ground
  int branch = -1;                  // first branch-current unknown, -1 if none
  int state = -1;                   // first dynamic state, -1 if none
  int mode = -1;                    // first discrete mode, -1 if none
};

/// One evaluation point: the solver's current vectors.
struct Point {
  double time = 0.0;
  const double* states = nullptr;    // dynamic states x
  const double* unknowns = nullptr;  // y: node voltages, then branch currents
  const int* modes = nullptr;
  double ambient = 298.15;  // K

  double node_voltage(int index) const { return index < 0 ? 0.0 : unknowns[index]; }
  double voltage(const Layout& layout) const {
    return node_voltage(layout.node[0]) - node_voltage(layout.node[1]);
  }
};

/// Receives a part's contributions. Dense column-major storage owned by the solver; any pointer may be null
/// when that part of the system is not needed for this call. Rows or columns of -1 (ground) are ignored.
class Stamp {
 public:
  struct Storage {
    double* network = nullptr;           // G, size unknowns
    double* network_by_unknown = nullptr;  // dG/dy, unknowns x unknowns
    double* network_by_state = nullptr;    // dG/dx, unknowns x states
    double* rate = nullptr;              // f, size states
    double* rate_by_state = nullptr;     // df/dx, states x states
    double* rate_by_unknown = nullptr;   // df/dy, states x unknowns
    int unknowns = 0;
    int states = 0;
  };
  explicit Stamp(Storage storage) : storage_(storage) {}

  void network(int row, double value) {
    if (row >= 0 && storage_.network) storage_.network[row] += value;
  }
  void network_by_unknown(int row, int column, double value) {
    if (row >= 0 && column >= 0 && storage_.network_by_unknown)
      storage_.network_by_unknown[row + column * storage_.unknowns] += value;
  }
  void network_by_state(int row, int column, double value) {
    if (row >= 0 && column >= 0 && storage_.network_by_state)
      storage_.network_by_state[row + column * storage_.unknowns] += value;
  }
  void rate(int row, double value) {
    if (row >= 0 && storage_.rate) storage_.rate[row] += value;
  }
  void rate_by_state(int row, int column, double value) {
    if (row >= 0 && column >= 0 && storage_.rate_by_state)
      storage_.rate_by_state[row + column * storage_.states] += value;
  }
  void rate_by_unknown(int row, int column, double value) {
    if (row >= 0 && column >= 0 && storage_.rate_by_unknown)
      storage_.rate_by_unknown[row + column * storage_.states] += value;
  }
  bool wants_derivatives() const { return storage_.network_by_unknown || storage_.rate_by_state; }

  /// A current `current` entering at the positive node, with di/dv = `conductance` (v = v+ - v-).
  void terminal_current(const Layout& layout, double current, double conductance) {
    network(layout.node[0], current);
    network(layout.node[1], -current);
    for (int row = 0; row < 2; ++row) {
      double sign = row == 0 ? 1.0 : -1.0;
      network_by_unknown(layout.node[row], layout.node[0], sign * conductance);
      network_by_unknown(layout.node[row], layout.node[1], -sign * conductance);
    }
  }
  /// How the terminal current depends on a dynamic state.
  void terminal_current_by_state(const Layout& layout, int state, double derivative) {
    network_by_state(layout.node[0], state, derivative);
    network_by_state(layout.node[1], state, -derivative);
  }
  /// A Thevenin branch: unknown current j = y[branch] entering the positive node, branch row
  /// v+ - v- - (source terms) - series_resistance·j = 0 with `residual` the row's value. Adds the KCL entries
  /// and the row's derivatives by the unknowns; the caller adds the source terms' state derivatives.
  void thevenin_branch(const Layout& layout, double current, double residual, double series_resistance) {
    int b = layout.branch;
    network(layout.node[0], current);
    network(layout.node[1], -current);
    branch_current(layout, b);
    network(b, residual);
    network_by_unknown(b, layout.node[0], 1.0);
    network_by_unknown(b, layout.node[1], -1.0);
    network_by_unknown(b, b, -series_resistance);
  }
  /// A branch-current unknown `branch` flowing into the positive node: its KCL entries.
  void branch_current(const Layout& layout, int branch) {
    network_by_unknown(layout.node[0], branch, 1.0);
    network_by_unknown(layout.node[1], branch, -1.0);
  }

 private:
  Storage storage_;
};

struct StateInfo {
  std::string name;         // e.g. "voltage", "soc", "temperature"
  std::string unit;         // SI symbol of the value the solver holds ("1" for a fraction such as SOC); outputs
                            // for people show fractions in % through a signal (SignalInfo)
  double initial = 0.0;
  double tolerance_scale = 1.0;  // multiplies the run's atol for this state
};

struct SignalInfo {
  std::string quantity;  // column "<part>.<quantity> [unit]"
  std::string unit;
};

/// The three ways energy enters or leaves the circuit through a part.
enum class EnergyChannel { Source, Heat, Load };

/// Power flows of a part at one instant, in W, for the energy audit.
struct Powers {
  double source = 0.0;  // converted into electrical energy (an ideal source, a cell's OCV)
  double heat = 0.0;    // dissipated in resistances
  double load = 0.0;    // taken out of the circuit as useful work (constant power/current loads)

  double of(EnergyChannel channel) const {
    return channel == EnergyChannel::Source ? source : channel == EnergyChannel::Heat ? heat : load;
  }
};

/// Which power flows a part can have; the solver integrates only these.
struct PowerChannels {
  bool source = false;
  bool heat = false;
  bool load = false;
};

/// Result of a command or root: whether modes changed, and a message when the command is not accepted.
struct ModeChange {
  bool changed = false;
  std::string problem;  // non-empty: the command does not apply to this part
  // The mode changed but not what the part does (a commanded-off load crossing its lockout thresholds): the
  // solver restarts as for any change, but the timeline does not list it.
  bool silent = false;
};

/// Declared ratings of a part (resistive parts), carried into the summary and judged as limits.
struct Rating {
  std::string metric;  // e.g. "peak_temperature", "energy"
  std::string unit;
  double value = 0.0;
  std::string note;  // e.g. pulse length the energy rating applies to
  std::string entry;  // the data-sheet entry it was read from, e.g. "ratings.max_temperature"; empty: the part's
  netlist::SourceMark mark;  // where that entry is written (empty file: the part's own block)
  // A protective device's operating point (a fuse's melting integral): in a fault scenario, reaching it is the
  // protection doing its job, so the detection matrix reports its margin but does not fail the row for it.
  bool protection = false;

  Rating() = default;
  Rating(std::string metric_, std::string unit_, double value_, std::string note_ = "", std::string entry_ = "",
         netlist::SourceMark mark_ = {})
      : metric(std::move(metric_)), unit(std::move(unit_)), value(value_), note(std::move(note_)),
        entry(std::move(entry_)), mark(std::move(mark_)) {}
};

/// A parameter reader for a part's block that already knows the keys every part has (name, kind, nodes).
netlist::ParameterReader open_parameters(const netlist::PartSpec& spec);

class Part {
 public:
  Part(const netlist::PartSpec& spec);
  virtual ~Part() = default;
  Part(const Part&) = delete;
  Part& operator=(const Part&) = delete;

  const std::string& name() const { return name_; }
  const std::string& kind() const { return kind_; }
  const std::array<std::string, 2>& nodes() const { return nodes_; }
  const netlist::SourceMark& mark() const { return mark_; }

  int branch_count() const { return do_branch_count(); }
  std::vector<StateInfo> states(double ambient) const { return do_states(ambient); }
  std::vector<int> initial_modes() const { return do_initial_modes(); }
  std::vector<SignalInfo> signals() const;
  Link link() const { return do_link(); }
  /// True when the part's network equations are linear in y (Newton then converges in one step).
  bool linear_network() const { return do_linear_network(); }
  PowerChannels power_channels() const { return do_power_channels(); }
  std::vector<Rating> ratings() const { return do_ratings(); }
  /// The data sheet's pulse curves (resistive parts with them in their ratings block; none otherwise).
  std::vector<PulseCurve> pulse_curves() const { return do_pulse_curves(); }
  /// The data sheet's breaking capacity (contactors with one in their ratings block; none otherwise).
  std::optional<BreakingCapacity> breaking_capacity() const { return do_breaking_capacity(); }

  Role role() const { return do_role(); }
  /// Actuation data of a switching part; std::nullopt for every other role.
  std::optional<Actuation> actuation() const { return do_actuation(); }
  /// What a load draws; std::nullopt for every other role.
  std::optional<LoadDemand> load_demand() const { return do_load_demand(); }
  /// True when the part carries a thermal model (temperature states and self-heating).
  bool has_thermal_model() const { return do_has_thermal_model(); }
  /// True when the part can hold electrical energy in its states (a capacitor, an inductance, RC pairs): it then
  /// has a `stored_power` signal, the power into that energy, apart from its heat.
  bool stores_energy() const { return do_stores_energy(); }
  /// Values the part computed from its inputs, for the summary and the report.
  std::vector<DerivedValue> derived_values() const { return do_derived_values(); }
  std::optional<DefiningValue> defining_value() const { return do_defining_value(); }

  /// Adds network residual rows, state rates and, when asked, their derivatives.
  void stamp(const Point& point, const Layout& layout, Stamp& stamp) const;
  /// Signal values in the order of signals(): current, voltage, power (at the terminals), heat_power (parts with
  /// a heat channel), stored_power (parts that store energy), then the kind's extras.
  void signal_values(const Point& point, const Layout& layout, double* out) const;
  Powers powers(const Point& point, const Layout& layout) const { return do_powers(point, layout); }
  /// The current entering at the positive node (A).
  double current(const Point& point, const Layout& layout) const { return do_current(point, layout); }
  /// Energy held in the part's states (capacitor, inductor, RC pairs), J.
  double stored_energy(const Point& point, const Layout& layout) const { return do_stored_energy(point, layout); }

  /// State events: root functions g(x, y) whose sign changes flip a mode.
  int root_count() const { return do_root_count(); }
  void roots(const Point& point, const Layout& layout, double* out) const;
  /// Called when root `index` crossed in `direction` (+1 rising, -1 falling); updates the mode vector.
  ModeChange on_root(int index, int direction, const Layout& layout, int* modes) const;
  /// Called once at the start, after the first network solve, so modes can follow the initial voltages
  /// (a load already above its enable voltage starts enabled).
  ModeChange settle(const Point& point, const Layout& layout, int* modes) const {
    return do_settle(point, layout, modes);
  }
  /// True while the part's conductance sweeps through decades by itself in its present mode (a contact's parting
  /// ramp): the solver then refreshes its Jacobian at every step, since one from a step earlier is decades off.
  bool sweeping(const Layout& layout, const int* modes) const { return do_sweeping(layout, modes); }
  /// The crossing direction root `index` reacts to: +1 rising, -1 falling, 0 both.
  int root_direction(int index) const { return do_root_direction(index); }
  /// While the part breaks a current in its present mode (a contact's opening arc): the index in the state vector
  /// of a voltage acting in series with its current (the arc's), through which the solver reads the time
  /// constant L/R of the circuit being broken (solver/break_circuit.h); -1 when the part is not breaking.
  int breaking_state(const Layout& layout, const int* modes) const { return do_breaking_state(layout, modes); }
  /// A scheduled or controller action (close, open for switches; enable, disable for loads).
  /// `states` is the solver's state vector (may be null when only checking that the action applies): a
  /// command may re-initialise the part's own states, e.g. restart a contact's parting progress. `before` is the
  /// solved circuit just before the switching (null at the start of a run): what flows through the part then
  /// (a contact that opens on a current arcs).
  ModeChange command(netlist::Action action, const Layout& layout, int* modes, double* states = nullptr,
                     const Point* before = nullptr) const;

 protected:
  /// Current entering the positive node (passive convention).
  virtual double do_current(const Point& point, const Layout& layout) const = 0;
  virtual int do_branch_count() const { return 0; }
  virtual std::vector<StateInfo> do_states(double ambient) const { (void)ambient; return {}; }
  virtual std::vector<int> do_initial_modes() const { return {}; }
  virtual std::vector<SignalInfo> do_extra_signals() const { return {}; }
  virtual void do_extra_signal_values(const Point&, const Layout&, double*) const {}
  virtual Link do_link() const = 0;
  virtual bool do_linear_network() const { return true; }
  virtual PowerChannels do_power_channels() const = 0;
  virtual std::vector<Rating> do_ratings() const { return {}; }
  virtual std::vector<PulseCurve> do_pulse_curves() const { return {}; }
  virtual std::optional<BreakingCapacity> do_breaking_capacity() const { return std::nullopt; }
  virtual Role do_role() const = 0;
  virtual std::optional<Actuation> do_actuation() const { return std::nullopt; }
  virtual std::optional<LoadDemand> do_load_demand() const { return std::nullopt; }
  virtual bool do_has_thermal_model() const { return false; }
  virtual bool do_stores_energy() const { return false; }
  virtual std::vector<DerivedValue> do_derived_values() const { return {}; }
  virtual std::optional<DefiningValue> do_defining_value() const { return std::nullopt; }
  virtual void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const = 0;
  virtual Powers do_powers(const Point& point, const Layout& layout) const = 0;
  virtual double do_stored_energy(const Point&, const Layout&) const { return 0.0; }
  virtual int do_root_count() const { return 0; }
  virtual void do_roots(const Point&, const Layout&, double*) const {}
  virtual ModeChange do_on_root(int, int, const Layout&, int*) const { return {}; }
  virtual ModeChange do_settle(const Point&, const Layout&, int*) const { return {}; }
  virtual bool do_sweeping(const Layout&, const int*) const { return false; }
  virtual int do_root_direction(int) const { return 0; }
  virtual int do_breaking_state(const Layout&, const int*) const { return -1; }
  virtual ModeChange do_command(netlist::Action action, const Layout&, int*, double* states,
                                const Point* before) const;
  /// Sign applied to current and power in the output: +1 passive, -1 for sources (delivering is positive).
  virtual double do_output_sign() const { return 1.0; }

 private:
  std::string name_;
  std::string kind_;
  std::array<std::string, 2> nodes_;
  netlist::SourceMark mark_;
};

}  // namespace linkrise::models
