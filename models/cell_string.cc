#include "models/cell_string.h"

#include <fmt/format.h>
#include <gsl/gsl_interp.h>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

struct Pair {
  double resistance = 0.0;   // string level
  double capacitance = 0.0;  // string level
};

class CellString final : public Part {
 public:
  explicit CellString(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    series_ = reader.count("cells_in_series", 0, 1);
    if (series_ == 0) reader.required("cells_in_series", Dimension::none());  // names the missing key
    parallel_ = reader.count("cells_in_parallel", 1, 1);
    auto constant = reader.optional("cell_voltage", Dimension::voltage(), Bound::Positive);
    auto table = reader.table("cell_voltage_table", {Dimension::none(), Dimension::voltage()});
    if (constant && !table.empty()) {
      reader.fail("cell_voltage_table", "give either cell_voltage or cell_voltage_table, not both",
                  "keep the table for a voltage that follows the state of charge, or the single cell_voltage");
    }
    if (!constant && table.empty()) {
      reader.required("cell_voltage", Dimension::voltage(), Bound::Positive);
    }
    if (constant) {
      soc_points_ = {0.0};
      ocv_points_ = {*constant};
    } else {
      for (std::size_t i = 0; i < table.size(); ++i) {
        if (table[i][0] < 0.0 || table[i][0] > 1.0) {
          reader.fail("cell_voltage_table", fmt::format("row {}: SOC {} lies outside 0..100 %", i + 1, table[i][0]));
        }
        if (i > 0 && !(table[i][0] > table[i - 1][0])) {
          reader.fail("cell_voltage_table", fmt::format("row {}: SOC must increase from row to row", i + 1));
        }
        if (!(table[i][1] > 0.0)) {
          reader.fail("cell_voltage_table", fmt::format("row {}: the voltage must be above zero", i + 1));
        }
        soc_points_.push_back(table[i][0]);
        ocv_points_.push_back(table[i][1]);
      }
    }
    if (soc_points_.size() >= gsl_interp_type_min_size(gsl_interp_steffen)) {
      curve_.reset(gsl_interp_alloc(gsl_interp_steffen, soc_points_.size()));
      gsl_interp_init(curve_.get(), soc_points_.data(), ocv_points_.data(), soc_points_.size());
    }
    double r0 = reader.required("cell_resistance", Dimension::resistance(), Bound::NonNegative);
    resistance_ = r0 * series_ / parallel_;
    double capacity = reader.required("cell_capacity", Dimension::charge(), Bound::Positive);
    charge_ = capacity * parallel_;  // C, whole string
    initial_soc_ = reader.quantity("initial_soc", Dimension::none(), Bound::Fraction, 1.0);
    auto pairs = reader.blocks("polarisation", "polarisation pair", 2, "must list zero to two RC pairs",
                               "write '- {resistance: 1 mOhm, capacitance: 20 kF}' per pair");
    for (auto& pair_reader : pairs) {
      double r = pair_reader.required("resistance", Dimension::resistance(), Bound::Positive);
      double c = pair_reader.required("capacitance", Dimension::capacitance(), Bound::Positive);
      pair_reader.finish();
      pairs_.push_back(Pair{r * series_ / parallel_, c * parallel_ / series_});
    }
    reader.finish();
  }

 private:
  // Cell OCV and its slope at `soc`.
  std::pair<double, double> cell_ocv(double soc) const {
    if (soc_points_.size() == 1 || soc <= soc_points_.front()) return {ocv_points_.front(), 0.0};
    if (soc >= soc_points_.back()) return {ocv_points_.back(), 0.0};
    if (curve_) {
      // Steffen's monotone cubic: smooth slope inside the table, so the right-hand side has no kinks there.
      return {gsl_interp_eval(curve_.get(), soc_points_.data(), ocv_points_.data(), soc, nullptr),
              gsl_interp_eval_deriv(curve_.get(), soc_points_.data(), ocv_points_.data(), soc, nullptr)};
    }
    double slope = (ocv_points_[1] - ocv_points_[0]) / (soc_points_[1] - soc_points_[0]);
    return {ocv_points_[0] + slope * (soc - soc_points_[0]), slope};
  }

  int do_branch_count() const override { return 1; }
  std::vector<StateInfo> do_states(double) const override {
    std::vector<StateInfo> list = {{"soc", "1", initial_soc_, 1.0}};
    for (std::size_t k = 0; k < pairs_.size(); ++k) list.push_back({fmt::format("polarisation_{}", k + 1), "V", 0.0, 1.0});
    return list;
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.unknowns[layout.branch];
  }
  double do_output_sign() const override { return -1.0; }
  std::vector<SignalInfo> do_extra_signals() const override {
    return {{"soc", "%"}, {"open_circuit_voltage", "V"}};
  }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    double soc = point.states[layout.state];
    out[0] = 100.0 * soc;
    out[1] = series_ * cell_ocv(soc).first;
  }
  Role do_role() const override { return Role::Source; }
  Link do_link() const override { return resistance_ > 0.0 ? Link::Conductive : Link::VoltageDefined; }
  PowerChannels do_power_channels() const override {
    return {true, resistance_ > 0.0 || !pairs_.empty(), false};
  }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    int b = layout.branch;
    int soc_state = layout.state;
    double j = point.unknowns[b];
    auto [ocv, slope] = cell_ocv(point.states[soc_state]);
    double residual = point.voltage(layout) - series_ * ocv - resistance_ * j;
    for (std::size_t k = 0; k < pairs_.size(); ++k) residual += point.states[soc_state + 1 + k];
    stamp.thevenin_branch(layout, j, residual, resistance_);
    stamp.network_by_state(b, soc_state, -series_ * slope);
    // discharge current id = -j
    stamp.rate(soc_state, j / charge_);
    stamp.rate_by_unknown(soc_state, b, 1.0 / charge_);
    for (std::size_t k = 0; k < pairs_.size(); ++k) {
      int s = soc_state + 1 + static_cast<int>(k);
      const Pair& pair = pairs_[k];
      double vk = point.states[s];
      stamp.network_by_state(b, s, 1.0);
      stamp.rate(s, (-j - vk / pair.resistance) / pair.capacitance);
      stamp.rate_by_unknown(s, b, -1.0 / pair.capacitance);
      stamp.rate_by_state(s, s, -1.0 / (pair.resistance * pair.capacitance));
    }
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double j = point.unknowns[layout.branch];
    double soc = point.states[layout.state];
    double heat = resistance_ * j * j;
    for (std::size_t k = 0; k < pairs_.size(); ++k) {
      double vk = point.states[layout.state + 1 + k];
      heat += vk * vk / pairs_[k].resistance;
    }
    return Powers{-series_ * cell_ocv(soc).first * j, heat, 0.0};
  }
  double do_stored_energy(const Point& point, const Layout& layout) const override {
    double energy = 0.0;
    for (std::size_t k = 0; k < pairs_.size(); ++k) {
      double vk = point.states[layout.state + 1 + k];
      energy += 0.5 * pairs_[k].capacitance * vk * vk;
    }
    return energy;
  }

  int series_ = 1;
  int parallel_ = 1;
  std::vector<double> soc_points_;
  std::vector<double> ocv_points_;
  struct CurveDeleter {
    void operator()(gsl_interp* curve) const { gsl_interp_free(curve); }
  };
  std::unique_ptr<gsl_interp, CurveDeleter> curve_;  // read-only after construction: safe from many threads
  double resistance_ = 0.0;
  double charge_ = 0.0;
  double initial_soc_ = 1.0;
  std::vector<Pair> pairs_;
};
}  // namespace

std::unique_ptr<Part> make_cell_string(const netlist::PartSpec& spec) { return std::make_unique<CellString>(spec); }
}  // namespace linkrise::models
