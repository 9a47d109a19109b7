#include "models/contactor.h"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "netlist/units.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

// Modes. Parting: the gap's resistance rises from the closed resistance (no arc); clearing: it rises from the
// extinguished arc's U/I_min. Arcs: at a bounce gap (constant voltage) or at an opening (rising voltage), each
// with the sign of the current it carries, fixed when it strikes.
enum Mode : int {
  kOpen = 0,
  kClosed = 1,
  kParting = 2,
  kClearing = 3,
  kBounceArcForward = 4,
  kBounceArcReverse = 5,
  kOpeningArcForward = 6,
  kOpeningArcReverse = 7,
};
bool arcing(int mode) { return mode >= kBounceArcForward; }
bool opening_arc(int mode) { return mode >= kOpeningArcForward; }
bool ramping(int mode) { return mode == kParting || mode == kClearing; }
double arc_sign(int mode) { return mode == kBounceArcForward || mode == kOpeningArcForward ? 1.0 : -1.0; }

BreakingCapacity read_breaking_capacity(netlist::ParameterReader& ratings) {
  const std::string fix =
      "write '- {voltage: 450 V, current: 200 A}' per row (optional 'time_constant: 1 ms', 'direction: forward')";
  auto rows = ratings.blocks("breaking_capacity", "breaking capacity row", std::numeric_limits<std::size_t>::max(),
                             "must be a list of rows", fix);
  if (rows.empty()) ratings.fail("breaking_capacity", "must be a list of at least one row", fix);
  BreakingCapacity capacity;
  for (auto& row : rows) {
    BreakingRow read;
    read.voltage = row.required("voltage", Dimension::voltage(), Bound::Positive);
    read.current = row.required("current", Dimension::current(), Bound::Positive);
    read.time_constant = row.optional("time_constant", Dimension::time(), Bound::Positive);
    const std::string way = row.word("direction", {"both", "forward", "reverse"}, "both");
    read.direction = way == "forward"   ? CurrentDirection::Forward
                     : way == "reverse" ? CurrentDirection::Reverse
                                        : CurrentDirection::Both;
    for (const auto& earlier : capacity.rows) {
      const bool overlap = earlier.direction == CurrentDirection::Both || read.direction == CurrentDirection::Both ||
                           earlier.direction == read.direction;
      if (overlap && earlier.voltage == read.voltage && earlier.time_constant == read.time_constant) {
        row.fail("voltage", "repeats the voltage and time constant of an earlier row for the same current direction",
                 "give each voltage once per direction and time constant (mark the rows 'direction: forward' and "
                 "'reverse', or give each its 'time_constant')");
      }
    }
    row.finish();
    capacity.rows.push_back(read);
  }
  return capacity;
}

class Contactor final : public Part {
 public:
  explicit Contactor(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    closed_resistance_ = reader.quantity("closed_resistance", Dimension::resistance(), Bound::Positive, 0.3e-3);
    open_resistance_ = reader.quantity("open_resistance", Dimension::resistance(), Bound::Positive, 100e6);
    initially_closed_ = reader.word("initial", {"open", "closed"}, "open") == "closed";
    const std::string stuck = reader.word("stuck", {"no", "closed", "open"}, "no");
    stuck_closed_ = stuck == "closed";
    stuck_open_ = stuck == "open";
    timing_.closing_delay = reader.quantity("closing_delay", Dimension::time(), Bound::NonNegative, 0.0);
    timing_.opening_delay = reader.quantity("opening_delay", Dimension::time(), Bound::NonNegative, 0.0);
    timing_.bounce_count = reader.count("bounce_count", 0, 0);
    timing_.bounce_interval =
        reader.quantity("bounce_interval", Dimension::time(), Bound::Positive, timing_.bounce_interval);
    parting_time_ = reader.quantity("parting_time", Dimension::time(), Bound::NonNegative, 10e-6);
    arc_ = reader.word("arc", {"on", "off"}, "on") == "on";
    arc_voltage_ = reader.quantity("arc_voltage", Dimension::voltage(), Bound::Positive, 15.0);
    arc_voltage_rise_ =
        reader.quantity("arc_voltage_rise", Dimension::voltage() / Dimension::time(), Bound::NonNegative, 200e3);
    minimum_arc_current_ = reader.quantity("minimum_arc_current", Dimension::current(), Bound::Positive, 0.5);
    if (open_resistance_ <= closed_resistance_) {
      reader.fail("open_resistance", "must be larger than closed_resistance",
                  "an open contact is an insulator: use e.g. '100 MOhm'");
    }
    if (arc_ && arc_voltage_ / minimum_arc_current_ >= open_resistance_) {
      reader.fail("minimum_arc_current", "leaves the arc's resistance U/I at or above open_resistance",
                  "an arc conducts far better than the open gap: use e.g. '0.5 A'");
    }
    if (auto ratings = reader.block("ratings")) read_ratings(*ratings);
    reader.finish();
    const int first = parts_gradually() ? 1 : 0;
    progress_ = parts_gradually() ? 0 : -1;
    voltage_ = arc_ ? first : -1;
    energy_ = arc_ ? first + 1 : -1;
  }

 private:
  void read_ratings(netlist::ParameterReader& ratings) {
    if (ratings.has("breaking_capacity")) {
      breaking_ = read_breaking_capacity(ratings);
      ratings_.push_back({"break_use", "1", 1.0,
                          fmt::format("breaking capacity (ratings.breaking_capacity, {} rows): the worst opening's "
                                      "current as a share of what its row permits (the row is break_row)",
                                      breaking_->rows.size())});
    }
    if (auto e = ratings.optional("max_arc_energy", Dimension::energy(), Bound::Positive)) {
      ratings_.push_back({"arc_energy", "J", *e, "arc energy per opening or bounce gap (ratings.max_arc_energy)"});
    }
    if (auto i = ratings.optional("max_making_current", Dimension::current(), Bound::Positive)) {
      ratings_.push_back({"making_current", "A", *i, "peak current while making (ratings.max_making_current)"});
    }
    for (const char* key : {"breaking_capacity", "max_arc_energy"}) {
      if (!arc_ && ratings.has(key)) {
        ratings.fail(key, "is judged on the arcs of the openings, and this contactor has 'arc: off'",
                     "remove 'arc: off' (the arc model is on by default)");
      }
    }
    ratings.finish();
  }
  bool parts_gradually() const { return parting_time_ > 0.0; }
  double state(const Point& point, const Layout& layout, int offset) const {
    return offset < 0 ? 0.0 : point.states[layout.state + offset];
  }
  // ln R of the gap in the ramping modes: from ln R_start at progress 0 to ln R_open at 1.
  double ramp_start_log(const Point& point, const Layout& layout, int mode) const {
    if (mode == kClearing) return std::log(state(point, layout, voltage_) / minimum_arc_current_);
    return std::log(closed_resistance_);
  }
  double resistance(const Point& point, const Layout& layout) const {
    int mode = point.modes[layout.mode];
    if (mode == kClosed || arcing(mode)) return closed_resistance_;
    if (ramping(mode)) {
      const double p = state(point, layout, progress_), start = ramp_start_log(point, layout, mode);
      return std::exp(start + p * (std::log(open_resistance_) - start));
    }
    return open_resistance_;
  }
  // The arc's counter-voltage s·U (0 outside the arc modes).
  double arc_counter_voltage(const Point& point, const Layout& layout) const {
    int mode = point.modes[layout.mode];
    return arcing(mode) ? arc_sign(mode) * state(point, layout, voltage_) : 0.0;
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return (point.voltage(layout) - arc_counter_voltage(point, layout)) / resistance(point, layout);
  }
  std::vector<StateInfo> do_states(double) const override {
    std::vector<StateInfo> states;
    // Progress 0 -> 1 through the parting; linear in time, so a loose tolerance is exact enough.
    if (parts_gradually()) states.push_back({"parting", "1", 0.0, 1e4});
    if (arc_) {
      states.push_back({"arc_voltage", "V", 0.0, 1.0});
      states.push_back({arc_energy_state, "J", 0.0, 1.0});
    }
    return states;
  }
  std::vector<int> do_initial_modes() const override {
    if (stuck_closed_ || stuck_open_) return {stuck_closed_ ? kClosed : kOpen};
    return {initially_closed_ ? kClosed : kOpen};
  }
  std::vector<SignalInfo> do_extra_signals() const override {
    return {{"closed", "1"}, {"arcing", "1"}, {"arc_voltage", "V"}, {arc_energy_state, "J"}};
  }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    const int mode = point.modes[layout.mode];
    out[0] = mode == kClosed ? 1.0 : 0.0;
    out[1] = !arcing(mode) ? 0.0 : opening_arc(mode) ? 2.0 : 1.0;
    out[2] = arcing(mode) ? state(point, layout, voltage_) : 0.0;
    out[3] = state(point, layout, energy_);
  }
  Link do_link() const override { return Link::Conductive; }
  Role do_role() const override { return Role::Switch; }
  std::optional<Actuation> do_actuation() const override {
    Actuation actuation = timing_;
    actuation.parting_time = parting_time_;
    actuation.closed_resistance = closed_resistance_;
    actuation.open_resistance = open_resistance_;
    return actuation;
  }
  std::vector<Rating> do_ratings() const override { return ratings_; }
  std::optional<BreakingCapacity> do_breaking_capacity() const override { return breaking_; }
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    const int mode = point.modes[layout.mode];
    const double r = resistance(point, layout);
    const double v = point.voltage(layout);
    const double i = (v - arc_counter_voltage(point, layout)) / r;
    stamp.terminal_current(layout, i, 1.0 / r);
    if (ramping(mode)) stamp_ramp(point, layout, stamp, i);
    if (arcing(mode)) stamp_arc(point, layout, stamp, i);
  }
  // ln R = (1 − p)·ln R_start + p·ln R_open, R_start = U/I_min when clearing: di/dp = −i·(ln R_open − ln R_start),
  // di/dU = −i·(1 − p)/U.
  void stamp_ramp(const Point& point, const Layout& layout, Stamp& stamp, double i) const {
    const int mode = point.modes[layout.mode];
    const double p = state(point, layout, progress_), start = ramp_start_log(point, layout, mode);
    stamp.terminal_current_by_state(layout, layout.state + progress_, -i * (std::log(open_resistance_) - start));
    stamp.rate(layout.state + progress_, 1.0 / parting_time_);
    if (mode == kClearing) {
      stamp.terminal_current_by_state(layout, layout.state + voltage_,
                                      -i * (1.0 - p) / state(point, layout, voltage_));
    }
  }
  // i = (v − s·U)/Rc; the arc's energy rises at s·U·i = U·|i|; U rises at the opening only.
  void stamp_arc(const Point& point, const Layout& layout, Stamp& stamp, double i) const {
    const int mode = point.modes[layout.mode];
    const double s = arc_sign(mode), u = state(point, layout, voltage_), g = 1.0 / closed_resistance_;
    const int voltage = layout.state + voltage_, energy = layout.state + energy_;
    stamp.terminal_current_by_state(layout, voltage, -s * g);
    if (opening_arc(mode)) stamp.rate(voltage, arc_voltage_rise_);
    stamp.rate(energy, s * u * i);
    stamp.rate_by_state(energy, voltage, s * i - u * g);
    stamp.rate_by_unknown(energy, layout.node[0], s * u * g);
    stamp.rate_by_unknown(energy, layout.node[1], -s * u * g);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    return Powers{0.0, point.voltage(layout) * do_current(point, layout), 0.0};
  }
  // Roots: the ramp's end (with a parting_time), then the arc's end (with the arc model).
  int do_root_count() const override { return (parts_gradually() ? 1 : 0) + (arc_ ? 1 : 0); }
  int do_root_direction(int index) const override { return index == 0 && parts_gradually() ? 1 : -1; }
  void do_roots(const Point& point, const Layout& layout, double* out) const override {
    const int mode = point.modes[layout.mode];
    if (parts_gradually()) out[0] = ramping(mode) ? state(point, layout, progress_) - 1.0 : -1.0;
    if (!arc_) return;
    double& arc_end = out[parts_gradually() ? 1 : 0];
    arc_end = arcing(mode) ? arc_sign(mode) * do_current(point, layout) - minimum_arc_current_ : 1.0;
  }
  ModeChange do_on_root(int index, int direction, const Layout& layout, int* modes) const override {
    int& mode = modes[layout.mode];
    const bool ramp_root = parts_gradually() && index == 0;
    if (ramp_root) {
      if (direction <= 0 || !ramping(mode)) return {};
      mode = kOpen;  // parting complete: the gap now holds off the full open resistance
      return {true, ""};
    }
    if (direction >= 0 || !arcing(mode)) return {};
    // The current fell to the minimum arc current: the arc goes out and the gap's resistance rises from the arc's
    // U/I_min (the parting progress stayed 0 while the arc burned).
    mode = parts_gradually() ? kClearing : kOpen;
    return {true, ""};
  }
  // Right after a switching: an arc whose circuit cannot drive the minimum arc current through it goes out.
  ModeChange do_settle(const Point& point, const Layout& layout, int* modes) const override {
    int& mode = modes[layout.mode];
    if (!arcing(mode) || arc_sign(mode) * do_current(point, layout) >= minimum_arc_current_) return {};
    mode = parts_gradually() ? kClearing : kOpen;
    return {true, ""};
  }
  // An opening arc: its voltage s·U is in series with the contact (i = (v − s·U)/R_closed).
  int do_breaking_state(const Layout& layout, const int* modes) const override {
    return opening_arc(modes[layout.mode]) ? layout.state + voltage_ : -1;
  }
  // The ramp moves the gap's conductance by some 25 decades within parting_time.
  bool do_sweeping(const Layout& layout, const int* modes) const override { return ramping(modes[layout.mode]); }
  ModeChange do_command(netlist::Action action, const Layout& layout, int* modes, double* states,
                        const Point* before) const override {
    if (action != netlist::Action::Close && action != netlist::Action::Open && action != netlist::Action::Bounce) {
      return ModeChange{false, fmt::format("contactor '{}' can only 'close', 'open' or 'bounce', not '{}'", name(),
                                           netlist::action_word(action))};
    }
    int& mode = modes[layout.mode];
    const int was = mode;
    if (stuck_closed_ || stuck_open_) return {};  // welded or failed: the coil moves nothing
    if (action == netlist::Action::Close) {
      mode = kClosed;
    } else if (mode == kClosed) {
      mode = part(action == netlist::Action::Bounce, before ? do_current(*before, layout) : 0.0, layout, states);
    } else if (action == netlist::Action::Open && arcing(mode) && !opening_arc(mode)) {
      // Released during a bounce gap: the arc there now lengthens as an opening arc.
      mode = mode == kBounceArcForward ? kOpeningArcForward : kOpeningArcReverse;
    }
    return ModeChange{mode != was, ""};
  }
  // The contacts part carrying `current`: an arc strikes when it is at least the minimum arc current.
  int part(bool bounce, double current, const Layout& layout, double* states) const {
    if (states != nullptr && progress_ >= 0) states[layout.state + progress_] = 0.0;
    if (arc_ && std::fabs(current) >= minimum_arc_current_) {
      if (states != nullptr) states[layout.state + voltage_] = arc_voltage_;
      const bool forward = current > 0.0;
      if (bounce) return forward ? kBounceArcForward : kBounceArcReverse;
      return forward ? kOpeningArcForward : kOpeningArcReverse;
    }
    // Below the minimum arc current, with the arc model, the break is clean and at once: the driver settles the
    // circuit's fast states (a cable current through the open gaps) as for any switching. A ramp there made a
    // femtosecond cable current follow 25 decades of gap resistance within 10 us, which CVODE's Newton, with its
    // convergence rate carried over from earlier steps, could not (sequence_clean_close's fault matrix).
    if (arc_) return kOpen;
    return parts_gradually() ? kParting : kOpen;
  }

  double closed_resistance_ = 0.0;
  double open_resistance_ = 0.0;
  bool initially_closed_ = false;
  bool stuck_closed_ = false, stuck_open_ = false;  // welded / failed to close
  double parting_time_ = 0.0;
  bool arc_ = true;
  double arc_voltage_ = 0.0, arc_voltage_rise_ = 0.0, minimum_arc_current_ = 0.0;
  int progress_ = -1, voltage_ = -1, energy_ = -1;  // state offsets; -1 when the part has no such state
  Actuation timing_;  // delays and bounce as read; do_actuation() adds the contact data
  std::vector<Rating> ratings_;
  std::optional<BreakingCapacity> breaking_;
};
}  // namespace

std::unique_ptr<Part> make_contactor(const netlist::PartSpec& spec) { return std::make_unique<Contactor>(spec); }
}  // namespace linkrise::models
