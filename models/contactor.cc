#include "models/contactor.h"

#include <cmath>

#include <fmt/format.h>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

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
    parting_time_ = reader.quantity("parting_time", Dimension::time(), Bound::NonNegative, 0.0);
    if (open_resistance_ <= closed_resistance_) {
      reader.fail("open_resistance", "must be larger than closed_resistance",
                  "an open contact is an insulator: use e.g. '100 MOhm'");
    }
    reader.finish();
    span_ = std::log(open_resistance_ / closed_resistance_);
  }

 private:
  static constexpr int kOpen = 0, kClosed = 1, kParting = 2;
  bool parts_gradually() const { return parting_time_ > 0.0; }
  // ln(R_open / R_closed): the parting resistance is R_closed·exp(progress·span).
  double span() const { return span_; }
  double resistance(const Point& point, const Layout& layout) const {
    int mode = point.modes[layout.mode];
    if (mode == kClosed) return closed_resistance_;
    if (mode == kParting) return closed_resistance_ * std::exp(span() * point.states[layout.state]);
    return open_resistance_;
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) / resistance(point, layout);
  }
  std::vector<StateInfo> do_states(double) const override {
    if (!parts_gradually()) return {};
    // Progress 0 -> 1 through the parting; linear in time, so a loose tolerance is exact enough.
    return {{"parting", "1", 0.0, 1e4}};
  }
  std::vector<int> do_initial_modes() const override {
    if (stuck_closed_ || stuck_open_) return {stuck_closed_ ? kClosed : kOpen};
    return {initially_closed_ ? kClosed : kOpen};
  }
  std::vector<SignalInfo> do_extra_signals() const override { return {{"closed", "1"}}; }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    out[0] = point.modes[layout.mode] == kClosed ? 1.0 : 0.0;
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
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    double r = resistance(point, layout);
    double v = point.voltage(layout);
    stamp.terminal_current(layout, v / r, 1.0 / r);
    if (!parts_gradually()) return;
    if (point.modes[layout.mode] == kParting) {
      stamp.terminal_current_by_state(layout, layout.state, -span() * v / r);  // d(v/R)/dp = -v·span/R
      stamp.rate(layout.state, 1.0 / parting_time_);
    }
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double v = point.voltage(layout);
    return Powers{0.0, v * v / resistance(point, layout), 0.0};
  }
  int do_root_count() const override { return parts_gradually() ? 1 : 0; }
  int do_root_direction(int) const override { return 1; }
  void do_roots(const Point& point, const Layout& layout, double* out) const override {
    out[0] = point.modes[layout.mode] == kParting ? point.states[layout.state] - 1.0 : -1.0;
  }
  ModeChange do_on_root(int, int direction, const Layout& layout, int* modes) const override {
    if (direction <= 0 || modes[layout.mode] != kParting) return {};
    modes[layout.mode] = kOpen;  // parting complete: the gap now holds off the full open resistance
    return {true, ""};
  }
  ModeChange do_command(netlist::Action action, const Layout& layout, int* modes, double* states) const override {
    if (action != netlist::Action::Close && action != netlist::Action::Open) {
      return ModeChange{false, fmt::format("contactor '{}' can only 'close' or 'open', not '{}'", name(),
                                           netlist::action_word(action))};
    }
    int& mode = modes[layout.mode];
    int before = mode;
    if (stuck_closed_ || stuck_open_) return {};  // welded or failed: the coil moves nothing
    if (action == netlist::Action::Close) {
      mode = kClosed;
    } else if (mode == kClosed && parts_gradually()) {
      mode = kParting;
      if (states != nullptr) states[layout.state] = 0.0;
    } else if (mode != kParting) {
      mode = kOpen;
    }
    return ModeChange{mode != before, ""};
  }

  double closed_resistance_ = 0.0;
  double open_resistance_ = 0.0;
  bool initially_closed_ = false;
  bool stuck_closed_ = false, stuck_open_ = false;  // welded / failed to close
  double parting_time_ = 0.0;
  double span_ = 0.0;  // ln(R_open / R_closed)
  Actuation timing_;  // delays and bounce as read; do_actuation() adds the contact data
};
}  // namespace

std::unique_ptr<Part> make_contactor(const netlist::PartSpec& spec) { return std::make_unique<Contactor>(spec); }
}  // namespace linkrise::models
