#include "models/inductive_branch.h"

#include <optional>

#include <fmt/format.h>

#include "models/conductor.h"
#include "models/thermal_resistor.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

const char* const cable_fix =
    "give either resistance and inductance of the loop, or its geometry: length, cross_section (or radius), "
    "spacing and material";

Cable read_geometry(netlist::ParameterReader& reader) {
  CableParameters p{};
  p.length = reader.required("length", Dimension::length(), Bound::Positive);
  int size = choose_form(reader, {{"cross_section"}, {"radius"}}, true,
                         "give the metal cross-section of one conductor, e.g. 'cross_section: 35 mm²', or its radius");
  if (size == 0) {
    p.cross_section = reader.required("cross_section", Dimension::area(), Bound::Positive);
  } else {
    p.cross_section = cross_section_from_radius(reader.required("radius", Dimension::length(), Bound::Positive));
  }
  p.centre_spacing = reader.required("spacing", Dimension::length(), Bound::Positive);
  p.material = reader.word("material", {"copper", "aluminium"}, "copper") == "aluminium"
                   ? ConductorMaterial::aluminium
                   : ConductorMaterial::copper;
  p.inductance_form = InductanceForm::direct_current;
  auto created = Cable::create(p);
  if (auto* problem = std::get_if<std::string>(&created)) {
    reader.fail("spacing", fmt::format("the cable geometry is not possible ({})", *problem),
                "the centre spacing must exceed the conductor diameter (two radii)");
  }
  return std::get<Cable>(std::move(created));
}

class InductiveBranch final : public Part {
 public:
  InductiveBranch(const netlist::PartSpec& spec, bool is_cable) : Part(spec) {
    auto reader = open_parameters(spec);
    if (is_cable) {
      int form = choose_form(reader,
                             {{"resistance", "inductance"},
                              {"length", "cross_section", "radius", "spacing", "material", "conductor_temperature"}},
                             true, cable_fix);
      if (form == 0) {
        resistance_ = reader.required("resistance", Dimension::resistance(), Bound::NonNegative);
        inductance_ = reader.required("inductance", Dimension::inductance(), Bound::NonNegative);
        if (inductance_ == 0.0 && resistance_ == 0.0) {
          reader.fail("resistance", "a cable with zero inductance needs a resistance above zero",
                      "give the loop resistance, e.g. '2 mOhm'");
        }
      } else {
        geometry_ = read_geometry(reader);
        conductor_temperature_ = reader.optional("conductor_temperature", Dimension::temperature(), Bound::Positive);
        inductance_ = geometry_->loop_inductance();
        resistance_ = geometry_->loop_resistance(conductor_temperature_.value_or(kelvin_at_20_celsius));
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
  // The loop resistance at this point: from geometry it follows the ambient unless a temperature is given.
  double resistance(const Point& point) const {
    if (geometry_ && !conductor_temperature_) return geometry_->loop_resistance(point.ambient);
    return resistance_;
  }
  std::vector<StateInfo> do_states(double) const override {
    if (!inductive()) return {};
    return {{"current", "A", initial_current_, 1.0}};
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return inductive() ? point.states[layout.state] : point.voltage(layout) / resistance(point);
  }
  Role do_role() const override { return Role::Conductor; }
  bool do_stores_energy() const override { return inductive(); }
  std::vector<DerivedValue> do_derived_values() const override {
    if (!geometry_) return {};
    const std::string at = conductor_temperature_
                               ? fmt::format("at {:.4g} degC", *conductor_temperature_ - netlist::kelvin_offset)
                               : std::string("at 20 degC, then following the ambient");
    return {{"loop resistance", resistance_, "Ohm", "from length, cross-section and material " + at},
            {"loop inductance", inductance_, "H", "from length, conductor radius and spacing"}};
  }
  Link do_link() const override { return inductive() ? Link::CurrentDefined : Link::Conductive; }
  PowerChannels do_power_channels() const override { return {false, resistance_ > 0.0, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    const double r = resistance(point);
    if (!inductive()) {
      stamp.terminal_current(layout, point.voltage(layout) / r, 1.0 / r);
      return;
    }
    int s = layout.state;
    double i = point.states[s];
    stamp.network(layout.node[0], i);
    stamp.network(layout.node[1], -i);
    stamp.terminal_current_by_state(layout, s, 1.0);
    stamp.rate(s, (point.voltage(layout) - r * i) / inductance_);
    stamp.rate_by_unknown(s, layout.node[0], 1.0 / inductance_);
    stamp.rate_by_unknown(s, layout.node[1], -1.0 / inductance_);
    stamp.rate_by_state(s, s, -r / inductance_);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double i = do_current(point, layout);
    return Powers{0.0, resistance(point) * i * i, 0.0};
  }
  double do_stored_energy(const Point& point, const Layout& layout) const override {
    if (!inductive()) return 0.0;
    double i = point.states[layout.state];
    return 0.5 * inductance_ * i * i;
  }

  double inductance_ = 0.0;
  double resistance_ = 0.0;  // the given R, or from geometry at conductor_temperature (20 °C when following ambient)
  double initial_current_ = 0.0;
  std::optional<Cable> geometry_;
  std::optional<double> conductor_temperature_;
};
}  // namespace

std::unique_ptr<Part> make_inductor(const netlist::PartSpec& spec) {
  return std::make_unique<InductiveBranch>(spec, false);
}
std::unique_ptr<Part> make_cable(const netlist::PartSpec& spec) { return std::make_unique<InductiveBranch>(spec, true); }
}  // namespace linkrise::models
