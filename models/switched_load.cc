#include "models/switched_load.h"

#include <fmt/format.h>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

enum class Law { Power, Current };

class SwitchedLoad final : public Part {
 public:
  SwitchedLoad(const netlist::PartSpec& spec, Law law) : Part(spec), law_(law) {
    auto reader = open_parameters(spec);
    if (law_ == Law::Power) {
      demand_ = reader.required("power", Dimension::power_(), Bound::NonNegative);
    } else {
      demand_ = reader.required("current", Dimension::current(), Bound::NonNegative);
    }
    enable_voltage_ = reader.quantity("enable_voltage", Dimension::voltage(), Bound::NonNegative, 0.0);
    disable_voltage_ =
        reader.quantity("disable_voltage", Dimension::voltage(), Bound::NonNegative, 0.9 * enable_voltage_);
    if (enable_voltage_ > 0.0 && !(disable_voltage_ < enable_voltage_)) {
      reader.fail("disable_voltage",
                  fmt::format("{} V must lie below enable_voltage ({} V) so the lockout has hysteresis",
                              disable_voltage_, enable_voltage_),
                  "lower disable_voltage, e.g. to 90 % of enable_voltage");
    }
    resistive_below_ = reader.quantity("resistive_below", Dimension::voltage(), Bound::Positive,
                                       law_ == Law::Power ? 10.0 : 1.0);
    initially_on_ = reader.word("initial", {"enabled", "disabled"}, "enabled") == "enabled";
    reader.finish();
  }

 private:
  bool drawing(const Point& point, const Layout& layout) const {
    return point.modes[layout.mode] != 0 && point.modes[layout.mode + 1] != 0;
  }
  // Current and its slope di/dv while drawing.
  std::pair<double, double> law(double v) const {
    double floor = resistive_below_;
    if (law_ == Law::Power) {
      if (v >= floor) return {demand_ / v, -demand_ / (v * v)};
      return {demand_ * v / (floor * floor), demand_ / (floor * floor)};
    }
    if (v >= floor) return {demand_, 0.0};
    return {demand_ * v / floor, demand_ / floor};
  }

  std::vector<int> do_initial_modes() const override { return {enable_voltage_ > 0.0 ? 0 : 1, initially_on_ ? 1 : 0}; }
  double do_current(const Point& point, const Layout& layout) const override {
    return drawing(point, layout) ? law(point.voltage(layout)).first : 0.0;
  }
  std::vector<SignalInfo> do_extra_signals() const override { return {{"drawing", "1"}}; }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    out[0] = drawing(point, layout) ? 1.0 : 0.0;
  }
  Role do_role() const override { return Role::Load; }
  std::optional<LoadDemand> do_load_demand() const override {
    return LoadDemand{law_ == Law::Power, demand_, resistive_below_, enable_voltage_, disable_voltage_};
  }
  Link do_link() const override { return Link::CurrentDefined; }
  bool do_linear_network() const override { return false; }
  PowerChannels do_power_channels() const override { return {false, false, true}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    if (!drawing(point, layout)) return;
    auto [current, slope] = law(point.voltage(layout));
    stamp.terminal_current(layout, current, slope);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    return Powers{0.0, 0.0, point.voltage(layout) * do_current(point, layout)};
  }
  int do_root_count() const override { return enable_voltage_ > 0.0 ? 1 : 0; }
  void do_roots(const Point& point, const Layout& layout, double* out) const override {
    bool released = point.modes[layout.mode] != 0;
    out[0] = point.voltage(layout) - (released ? disable_voltage_ : enable_voltage_);
  }
  ModeChange do_on_root(int, int direction, const Layout& layout, int* modes) const override {
    int& released = modes[layout.mode];
    const bool commanded_off = modes[layout.mode + 1] == 0;
    if (released == 0 && direction > 0) {
      released = 1;
      return {true, "", commanded_off};
    }
    if (released != 0 && direction < 0) {
      released = 0;
      return {true, "", commanded_off};
    }
    return {};
  }
  ModeChange do_settle(const Point& point, const Layout& layout, int* modes) const override {
    if (enable_voltage_ <= 0.0) return {};
    int wanted = point.voltage(layout) >= enable_voltage_ ? 1 : 0;
    bool changed = modes[layout.mode] != wanted;
    modes[layout.mode] = wanted;
    return {changed, ""};
  }
  ModeChange do_command(netlist::Action action, const Layout& layout, int* modes, double*,
                        const Point*) const override {
    if (action != netlist::Action::Enable && action != netlist::Action::Disable) {
      return {false, fmt::format("load '{}' can only 'enable' or 'disable', not '{}'", name(),
                                 netlist::action_word(action))};
    }
    int wanted = action == netlist::Action::Enable ? 1 : 0;
    bool changed = modes[layout.mode + 1] != wanted;
    modes[layout.mode + 1] = wanted;
    return {changed, ""};
  }

  Law law_;
  double demand_ = 0.0;
  double enable_voltage_ = 0.0;
  double disable_voltage_ = 0.0;
  double resistive_below_ = 10.0;
  bool initially_on_ = true;
};
}  // namespace

std::unique_ptr<Part> make_constant_power_load(const netlist::PartSpec& spec) {
  return std::make_unique<SwitchedLoad>(spec, Law::Power);
}
std::unique_ptr<Part> make_constant_current_load(const netlist::PartSpec& spec) {
  return std::make_unique<SwitchedLoad>(spec, Law::Current);
}
}  // namespace linkrise::models
