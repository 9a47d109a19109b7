#include "models/resistor.h"

#include "models/resistance_law.h"
#include "models/thermal_resistor.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

// A fixed resistor's value is its resistance alone, with or without a TCR and a thermal model.
DefiningValue fixed_resistance() { return {"resistance", "Ohm", true}; }

class Resistor final : public Part {
 public:
  Resistor(const netlist::PartSpec& spec, double resistance) : Part(spec), resistance_(resistance) {}

 private:
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) / resistance_;
  }
  Link do_link() const override { return Link::Conductive; }
  Role do_role() const override { return Role::Resistive; }
  std::optional<DefiningValue> do_defining_value() const override { return fixed_resistance(); }
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

std::unique_ptr<Part> make_resistor(const netlist::PartSpec& spec) {
  auto reader = open_parameters(spec);
  double resistance = reader.required("resistance", Dimension::resistance(), Bound::Positive);
  auto tcr = reader.optional("tcr", Dimension::per_kelvin(), Bound::Any);
  if (!tcr && !reader.has("thermal") && !reader.has("ratings")) {
    reader.accept("thermal");  // known keys, so a misspelt one gets its did-you-mean
    reader.accept("ratings");
    reader.finish();
    return std::make_unique<Resistor>(spec, resistance);
  }
  LinearTcrParameters law{};
  law.reference_resistance = resistance;
  law.temperature_coefficient = tcr.value_or(0.0);
  return finish_thermal_resistor(spec, reader,
                                 law_or_fail(make_resistance_law(law), reader, tcr ? "tcr" : "resistance"),
                                 fixed_resistance());
}
}  // namespace linkrise::models
