#include "models/voltage_sensor.h"

#include <cmath>
#include <vector>

namespace linkrise::models {

double quantised_reading(double value, double gain, double offset, double resolution) {
  const double reading = gain * value + offset;
  return resolution > 0.0 ? std::round(reading / resolution) * resolution : reading;
}

namespace {
using netlist::Bound;
using netlist::Dimension;

class VoltageSensor final : public Part {
 public:
  explicit VoltageSensor(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    if (auto divider = reader.optional("divider_resistance", Dimension::resistance(), Bound::Positive)) {
      conductance_ = 1.0 / *divider;
    }
    time_constant_ = reader.quantity("filter_time_constant", Dimension::time(), Bound::NonNegative, 0.0);
    gain_ = reader.quantity("gain", Dimension::none(), Bound::Positive, 1.0);
    offset_ = reader.quantity("offset", Dimension::voltage(), Bound::Any, 0.0);
    resolution_ = reader.quantity("resolution", Dimension::voltage(), Bound::NonNegative, 0.0);
    skew_ = reader.quantity("sample_skew", Dimension::time(), Bound::Any, 0.0);
    if (skew_ != 0.0 && !(time_constant_ > 0.0)) {
      reader.fail("sample_skew", "needs a filter: the skewed reading follows the filtered voltage's slope",
                  "give filter_time_constant (the channel's anti-alias filter), or drop sample_skew");
    }
    reader.finish();
  }

 private:
  bool filtered() const { return time_constant_ > 0.0; }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) * conductance_;
  }
  std::vector<StateInfo> do_states(double) const override {
    if (!filtered()) return {};
    return {{"filtered_voltage", "V", 0.0, 1.0}};
  }
  std::vector<SignalInfo> do_extra_signals() const override { return {{"reading", "V"}}; }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    const double v = point.voltage(layout);
    double sensed = v;
    if (filtered()) {
      const double filtered_voltage = point.states[layout.state];
      sensed = filtered_voltage + skew_ * (v - filtered_voltage) / time_constant_;
    }
    out[0] = quantised_reading(sensed, gain_, offset_, resolution_);
  }
  Link do_link() const override { return conductance_ > 0.0 ? Link::Conductive : Link::CurrentDefined; }
  Role do_role() const override { return Role::Sensor; }
  PowerChannels do_power_channels() const override { return {false, conductance_ > 0.0, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    if (conductance_ > 0.0) stamp.terminal_current(layout, point.voltage(layout) * conductance_, conductance_);
    if (!filtered()) return;
    const int s = layout.state;
    stamp.rate(s, (point.voltage(layout) - point.states[s]) / time_constant_);
    stamp.rate_by_state(s, s, -1.0 / time_constant_);
    stamp.rate_by_unknown(s, layout.node[0], 1.0 / time_constant_);
    stamp.rate_by_unknown(s, layout.node[1], -1.0 / time_constant_);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    const double v = point.voltage(layout);
    return Powers{0.0, v * v * conductance_, 0.0};
  }

  double conductance_ = 0.0;
  double time_constant_ = 0.0;
  double gain_ = 1.0;
  double offset_ = 0.0;
  double resolution_ = 0.0;
  double skew_ = 0.0;
};
}  // namespace

std::unique_ptr<Part> make_voltage_sensor(const netlist::PartSpec& spec) { return std::make_unique<VoltageSensor>(spec); }
}  // namespace linkrise::models
