#include "models/dc_source.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

class DcSource final : public Part {
 public:
  explicit DcSource(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    voltage_ = reader.required("voltage", Dimension::voltage());
    series_resistance_ = reader.quantity("series_resistance", Dimension::resistance(), Bound::NonNegative, 0.0);
    reader.finish();
  }

 private:
  int do_branch_count() const override { return 1; }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.unknowns[layout.branch];
  }
  double do_output_sign() const override { return -1.0; }
  Role do_role() const override { return Role::Source; }
  Link do_link() const override { return series_resistance_ > 0.0 ? Link::Conductive : Link::VoltageDefined; }
  PowerChannels do_power_channels() const override { return {true, series_resistance_ > 0.0, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    double j = point.unknowns[layout.branch];
    stamp.thevenin_branch(layout, j, point.voltage(layout) - voltage_ - series_resistance_ * j, series_resistance_);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double j = point.unknowns[layout.branch];
    return Powers{-voltage_ * j, series_resistance_ * j * j, 0.0};
  }

  double voltage_ = 0.0;
  double series_resistance_ = 0.0;
};
}  // namespace

std::unique_ptr<Part> make_dc_source(const netlist::PartSpec& spec) { return std::make_unique<DcSource>(spec); }
}  // namespace linkrise::models
