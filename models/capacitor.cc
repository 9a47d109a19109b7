#include "models/capacitor.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

class Capacitor final : public Part {
 public:
  explicit Capacitor(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    capacitance_ = reader.required("capacitance", Dimension::capacitance(), Bound::Positive);
    esr_ = reader.quantity("esr", Dimension::resistance(), Bound::NonNegative, 0.0);
    initial_voltage_ = reader.quantity("initial_voltage", Dimension::voltage(), Bound::Any, 0.0);
    if (auto leak = reader.optional("leakage_resistance", Dimension::resistance(), Bound::Positive)) {
      leak_conductance_ = 1.0 / *leak;
    }
    reader.finish();
  }

 private:
  int do_branch_count() const override { return 1; }
  std::vector<StateInfo> do_states(double) const override { return {{"charge_voltage", "V", initial_voltage_, 1.0}}; }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.unknowns[layout.branch];
  }
  Role do_role() const override { return Role::Storage; }
  std::optional<DefiningValue> do_defining_value() const override { return DefiningValue{"capacitance", "F", true}; }
  Link do_link() const override { return esr_ > 0.0 ? Link::Conductive : Link::VoltageDefined; }
  PowerChannels do_power_channels() const override { return {false, esr_ > 0.0 || leak_conductance_ > 0.0, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    int b = layout.branch;
    int s = layout.state;
    double j = point.unknowns[b];
    double vc = point.states[s];
    stamp.thevenin_branch(layout, j, point.voltage(layout) - vc - esr_ * j, esr_);
    stamp.network_by_state(b, s, -1.0);
    stamp.rate(s, (j - vc * leak_conductance_) / capacitance_);
    stamp.rate_by_unknown(s, b, 1.0 / capacitance_);
    stamp.rate_by_state(s, s, -leak_conductance_ / capacitance_);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double j = point.unknowns[layout.branch];
    double vc = point.states[layout.state];
    return Powers{0.0, esr_ * j * j + vc * vc * leak_conductance_, 0.0};
  }
  double do_stored_energy(const Point& point, const Layout& layout) const override {
    double vc = point.states[layout.state];
    return 0.5 * capacitance_ * vc * vc;
  }

  double capacitance_ = 0.0;
  double esr_ = 0.0;
  double initial_voltage_ = 0.0;
  double leak_conductance_ = 0.0;
};
}  // namespace

std::unique_ptr<Part> make_capacitor(const netlist::PartSpec& spec) { return std::make_unique<Capacitor>(spec); }
}  // namespace linkrise::models
