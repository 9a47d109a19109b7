#include "models/fuse.h"

#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

constexpr int kIntact = 0;
constexpr int kMelted = 1;

class Fuse final : public Part {
 public:
  explicit Fuse(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    resistance_ = reader.required("resistance", Dimension::resistance(), Bound::Positive);
    melting_i2t_ = reader.required("melting_i2t", Dimension::current().power(2) * Dimension::time(), Bound::Positive);
    read_curve(reader);
    derating_ = reader.quantity("pulse_derating", Dimension::none(), Bound::Fraction, 1.0);
    rating_mark_ = reader.mark(reader.has("pulse_derating") ? "pulse_derating" : "melting_i2t");
    if (!(derating_ > 0.0)) reader.fail("pulse_derating", "must be above 0 %");
    open_resistance_ = reader.quantity("open_resistance", Dimension::resistance(), Bound::Positive, 1e8);
    reader.finish();
  }

 private:
  // The time-current rows as logarithms, checked: current rising, time falling.
  void read_curve(netlist::ParameterReader& reader) {
    for (const auto& row : reader.table("time_current", {Dimension::current(), Dimension::time()})) {
      const std::size_t n = log_current_.size() + 1;
      if (!(row[0] > 0.0) || !(row[1] > 0.0)) reader.fail("time_current", fmt::format("row {}: current and time must be above zero", n));
      if (n > 1 && !(std::log(row[0]) > log_current_.back())) {
        reader.fail("time_current", fmt::format("row {}: the current must increase from row to row", n));
      }
      if (n > 1 && !(std::log(row[1]) < log_time_.back())) {
        reader.fail("time_current", fmt::format("row {}: the melting time must fall as the current rises", n));
      }
      log_current_.push_back(std::log(row[0]));
      log_time_.push_back(std::log(row[1]));
    }
    if (log_current_.size() == 1) {
      reader.fail("time_current", "one row gives no curve", "give at least two rows [current, melting time], or none");
    }
  }

  // The melting rate 1/t_m at |i| and its derivative by |i|.
  std::pair<double, double> melting_rate(double current) const {
    const double i = std::fabs(current);
    if (log_current_.empty() || std::log(std::max(i, 1e-300)) >= log_current_.back()) {
      const double i2t = log_current_.empty() ? melting_i2t_ : std::exp(2.0 * log_current_.back() + log_time_.back());
      return {i * i / i2t, 2.0 * i / i2t};
    }
    if (i <= 0.0) return {0.0, 0.0};
    const double x = std::log(i);
    std::size_t k = 1;
    while (k + 1 < log_current_.size() && x > log_current_[k]) ++k;
    // ln t = ln t_{k-1} + slope·(ln i − ln i_{k-1}); the first segment also serves below the table.
    const double slope = (log_time_[k] - log_time_[k - 1]) / (log_current_[k] - log_current_[k - 1]);
    const double rate = std::exp(-(log_time_[k - 1] + slope * (x - log_current_[k - 1])));
    return {rate, -slope * rate / i};
  }

  double conductance(const Point& point, const Layout& layout) const {
    return point.modes[layout.mode] == kMelted ? 1.0 / open_resistance_ : 1.0 / resistance_;
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) * conductance(point, layout);
  }
  std::vector<StateInfo> do_states(double) const override { return {{"melt", "1", 0.0, 1.0}}; }
  std::vector<int> do_initial_modes() const override { return {kIntact}; }
  std::vector<SignalInfo> do_extra_signals() const override { return {{"melt", "1"}}; }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    out[0] = point.states[layout.state];
  }
  Link do_link() const override { return Link::Conductive; }
  Role do_role() const override { return Role::Conductor; }
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  std::vector<Rating> do_ratings() const override {
    Rating melt{"peak_melt", "1", derating_,
                fmt::format("{:g} % of the melting integral (pulse derating)", 100.0 * derating_),
                "melting_i2t × pulse_derating", rating_mark_};
    melt.protection = true;
    return {melt};
  }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    const double g = conductance(point, layout);
    const double i = point.voltage(layout) * g;
    stamp.terminal_current(layout, i, g);
    // A melted link carries only leakage: its melt stays where it stopped.
    if (point.modes[layout.mode] == kMelted) return;
    const auto [rate, slope] = melting_rate(i);
    stamp.rate(layout.state, rate);
    const double by_voltage = slope * (i < 0.0 ? -g : g);
    stamp.rate_by_unknown(layout.state, layout.node[0], by_voltage);
    stamp.rate_by_unknown(layout.state, layout.node[1], -by_voltage);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    const double v = point.voltage(layout);
    return Powers{0.0, v * v * conductance(point, layout), 0.0};
  }
  int do_root_count() const override { return 1; }
  void do_roots(const Point& point, const Layout& layout, double* out) const override {
    out[0] = point.modes[layout.mode] == kMelted ? 1.0 : point.states[layout.state] - 1.0;
  }
  int do_root_direction(int) const override { return 1; }
  ModeChange do_on_root(int, int, const Layout& layout, int* modes) const override {
    if (modes[layout.mode] == kMelted) return {};
    modes[layout.mode] = kMelted;
    return {true, ""};
  }

  double resistance_ = 0.0;
  double melting_i2t_ = 0.0;
  netlist::SourceMark rating_mark_;  // the data-sheet entry the rating comes from
  double derating_ = 1.0;
  double open_resistance_ = 1e8;
  std::vector<double> log_current_, log_time_;  // the time-current rows, natural logarithms
};
}  // namespace

std::unique_ptr<Part> make_fuse(const netlist::PartSpec& spec) { return std::make_unique<Fuse>(spec); }
}  // namespace linkrise::models
