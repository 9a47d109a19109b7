#include "models/resistor.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

class Resistor final : public Part {
 public:
  explicit Resistor(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    resistance_ = reader.required("resistance", Dimension::resistance(), Bound::Positive);
    reader.finish();
  }

 private:
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) / resistance_;
  }
  Link do_link() const override { return Link::Conductive; }
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    stamp.terminal_current(layout, point.voltage(layout) / resistance_, 1.0 / resistance_);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double v = point.voltage(layout);
    return Powers{0.0, v * v / resistance_, 0.0};
  }

  double resistance_ = 0.0;
};
}  // namespace

std::unique_ptr<Part> make_resistor(const netlist::PartSpec& spec) { return std::make_unique<Resistor>(spec); }
}  // namespace linkrise::models
