#include "models/diode.h"

#include <cmath>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

class Diode final : public Part {
 public:
  explicit Diode(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    forward_voltage_ = reader.quantity("forward_voltage", Dimension::voltage(), Bound::NonNegative, 0.7);
    on_resistance_ = reader.quantity("on_resistance", Dimension::resistance(), Bound::Positive, 10e-3);
    off_resistance_ = reader.quantity("off_resistance", Dimension::resistance(), Bound::Positive, 10e6);
    knee_width_ = reader.quantity("knee_width", Dimension::voltage(), Bound::Positive, 20e-3);
    if (off_resistance_ <= on_resistance_) {
      reader.fail("off_resistance", "must be larger than on_resistance", "use e.g. '10 MOhm'");
    }
    reader.finish();
  }

  // Current and di/dv at voltage v.
  std::pair<double, double> law(double v) const {
    double x = (v - forward_voltage_) / knee_width_;
    double softplus = x > 0.0 ? x + std::log1p(std::exp(-x)) : std::log1p(std::exp(x));
    double logistic = x > 0.0 ? 1.0 / (1.0 + std::exp(-x)) : std::exp(x) / (1.0 + std::exp(x));
    return {v / off_resistance_ + knee_width_ / on_resistance_ * softplus,
            1.0 / off_resistance_ + logistic / on_resistance_};
  }

 private:
  double do_current(const Point& point, const Layout& layout) const override {
    return law(point.voltage(layout)).first;
  }
  Role do_role() const override { return Role::Rectifier; }
  Link do_link() const override { return Link::Conductive; }
  bool do_linear_network() const override { return false; }
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    auto [current, slope] = law(point.voltage(layout));
    stamp.terminal_current(layout, current, slope);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double v = point.voltage(layout);
    return Powers{0.0, v * law(v).first, 0.0};
  }

  double forward_voltage_ = 0.7;
  double on_resistance_ = 10e-3;
  double off_resistance_ = 10e6;
  double knee_width_ = 20e-3;
};
}  // namespace

std::unique_ptr<Part> make_diode(const netlist::PartSpec& spec) { return std::make_unique<Diode>(spec); }
}  // namespace linkrise::models
