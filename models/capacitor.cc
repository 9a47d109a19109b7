#include "models/capacitor.h"

#include <fmt/format.h>
#include <gsl/gsl_interp.h>

#include <memory>
#include <string>
#include <vector>

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
    if (auto factors = reader.block("temperature_factors")) {
      capacitance_factor_ = read_factors(*factors, "capacitance");
      esr_factor_ = read_factors(*factors, "esr");
      factors->finish();
    }
    reader.finish();
  }

 private:
  // A factor over temperature: rows [temperature, factor > 0], temperature strictly increasing, linear between rows
  // and held beyond them; empty when absent (factor 1).
  struct Factor {
    std::vector<double> kelvin, value;
    double at(double t) const {
      if (kelvin.empty()) return 1.0;
      if (t <= kelvin.front()) return value.front();
      if (t >= kelvin.back()) return value.back();
      return gsl_interp_eval(curve(), kelvin.data(), value.data(), t, nullptr);
    }
    const gsl_interp* curve() const { return line.get(); }
    struct Deleter {
      void operator()(gsl_interp* c) const { gsl_interp_free(c); }
    };
    std::shared_ptr<gsl_interp> line;  // read-only after construction
  };
  static Factor read_factors(netlist::ParameterReader& reader, const std::string& key) {
    Factor factor;
    for (const auto& row : reader.table(key, {Dimension::temperature(), Dimension::none()})) {
      if (!factor.kelvin.empty() && !(row[0] > factor.kelvin.back())) {
        reader.fail(key, fmt::format("row {}: the temperature must increase from row to row", factor.kelvin.size() + 1));
      }
      if (!(row[1] > 0.0)) reader.fail(key, fmt::format("row {}: the factor must be above zero", factor.kelvin.size() + 1));
      factor.kelvin.push_back(row[0]);
      factor.value.push_back(row[1]);
    }
    if (factor.kelvin.size() == 1) {
      reader.fail(key, "one row gives no dependence", "give at least two rows [temperature, factor], or none");
    }
    if (factor.kelvin.size() >= 2) {
      factor.line.reset(gsl_interp_alloc(gsl_interp_linear, factor.kelvin.size()), Factor::Deleter{});
      gsl_interp_init(factor.line.get(), factor.kelvin.data(), factor.value.data(), factor.kelvin.size());
    }
    return factor;
  }
  double capacitance(const Point& point) const { return capacitance_ * capacitance_factor_.at(point.ambient); }
  double esr(const Point& point) const { return esr_ * esr_factor_.at(point.ambient); }

  int do_branch_count() const override { return 1; }
  std::vector<StateInfo> do_states(double) const override { return {{"charge_voltage", "V", initial_voltage_, 1.0}}; }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.unknowns[layout.branch];
  }
  Role do_role() const override { return Role::Storage; }
  bool do_stores_energy() const override { return true; }
  std::optional<DefiningValue> do_defining_value() const override { return DefiningValue{"capacitance", "F", true}; }
  Link do_link() const override { return esr_ > 0.0 ? Link::Conductive : Link::VoltageDefined; }
  PowerChannels do_power_channels() const override { return {false, esr_ > 0.0 || leak_conductance_ > 0.0, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    int b = layout.branch;
    int s = layout.state;
    double j = point.unknowns[b];
    double vc = point.states[s];
    const double c = capacitance(point), r = esr(point);
    stamp.thevenin_branch(layout, j, point.voltage(layout) - vc - r * j, r);
    stamp.network_by_state(b, s, -1.0);
    stamp.rate(s, (j - vc * leak_conductance_) / c);
    stamp.rate_by_unknown(s, b, 1.0 / c);
    stamp.rate_by_state(s, s, -leak_conductance_ / c);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double j = point.unknowns[layout.branch];
    double vc = point.states[layout.state];
    return Powers{0.0, esr(point) * j * j + vc * vc * leak_conductance_, 0.0};
  }
  double do_stored_energy(const Point& point, const Layout& layout) const override {
    double vc = point.states[layout.state];
    return 0.5 * capacitance(point) * vc * vc;
  }

  double capacitance_ = 0.0;
  double esr_ = 0.0;
  double initial_voltage_ = 0.0;
  double leak_conductance_ = 0.0;
  Factor capacitance_factor_, esr_factor_;  // over the ambient (temperature_factors); 1 when absent
};
}  // namespace

std::unique_ptr<Part> make_capacitor(const netlist::PartSpec& spec) { return std::make_unique<Capacitor>(spec); }
}  // namespace linkrise::models
