#include "models/inductive_branch.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

class InductiveBranch final : public Part {
 public:
  InductiveBranch(const netlist::PartSpec& spec, bool is_cable) : Part(spec) {
    auto reader = open_parameters(spec);
    if (is_cable) {
      resistance_ = reader.required("resistance", Dimension::resistance(), Bound::NonNegative);
      inductance_ = reader.required("inductance", Dimension::inductance(), Bound::NonNegative);
      if (inductance_ == 0.0 && resistance_ == 0.0) {
        reader.fail("resistance", "a cable with zero inductance needs a resistance above zero",
                    "give the loop resistance, e.g. '2 mOhm'");
      }
    } else {
      inductance_ = reader.required("inductance", Dimension::inductance(), Bound::Positive);
      resistance_ = reader.quantity("resistance", Dimension::resistance(), Bound::NonNegative, 0.0);
    }
    initial_current_ = reader.quantity("initial_current", Dimension::current(), Bound::Any, 0.0);
    reader.finish();
  }

 private:
  bool inductive() const { return inductance_ > 0.0; }
  std::vector<StateInfo> do_states(double) const override {
    if (!inductive()) return {};
    return {{"current", "A", initial_current_, 1.0}};
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return inductive() ? point.states[layout.state] : point.voltage(layout) / resistance_;
  }
  Link do_link() const override { return inductive() ? Link::CurrentDefined : Link::Conductive; }
  PowerChannels do_power_channels() const override { return {false, resistance_ > 0.0, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    if (!inductive()) {
      stamp.terminal_current(layout, point.voltage(layout) / resistance_, 1.0 / resistance_);
      return;
    }
    int s = layout.state;
    double i = point.states[s];
    stamp.network(layout.node[0], i);
    stamp.network(layout.node[1], -i);
    stamp.terminal_current_by_state(layout, s, 1.0);
    stamp.rate(s, (point.voltage(layout) - resistance_ * i) / inductance_);
    stamp.rate_by_unknown(s, layout.node[0], 1.0 / inductance_);
    stamp.rate_by_unknown(s, layout.node[1], -1.0 / inductance_);
    stamp.rate_by_state(s, s, -resistance_ / inductance_);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double i = do_current(point, layout);
    return Powers{0.0, resistance_ * i * i, 0.0};
  }
  double do_stored_energy(const Point& point, const Layout& layout) const override {
    if (!inductive()) return 0.0;
    double i = point.states[layout.state];
    return 0.5 * inductance_ * i * i;
  }

  double inductance_ = 0.0;
  double resistance_ = 0.0;
  double initial_current_ = 0.0;
};
}  // namespace

std::unique_ptr<Part> make_inductor(const netlist::PartSpec& spec) {
  return std::make_unique<InductiveBranch>(spec, false);
}
std::unique_ptr<Part> make_cable(const netlist::PartSpec& spec) { return std::make_unique<InductiveBranch>(spec, true); }
}  // namespace linkrise::models
