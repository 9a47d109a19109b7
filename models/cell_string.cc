#include "models/cell_string.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>
#include <gsl/gsl_interp.h>
#include <gsl/gsl_interp2d.h>

#include "models/resistance_law.h"

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
    read_resistance(reader);
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
    read_temperature_law(reader);
    reader.finish();
  }

 private:
  // R0 as one value (`cell_resistance`) or as a grid over SOC and temperature (`cell_resistance_table`, rows
  // [SOC, temperature, R0] covering every combination once), interpolated bilinearly (GSL).
  void read_resistance(netlist::ParameterReader& reader) {
    auto rows = reader.table("cell_resistance_table", {Dimension::none(), Dimension::temperature(), Dimension::resistance()});
    if (rows.empty()) {
      resistance_ = reader.required("cell_resistance", Dimension::resistance(), Bound::NonNegative) * series_ / parallel_;
      return;
    }
    if (reader.has("cell_resistance")) {
      reader.fail("cell_resistance_table", "give either cell_resistance or cell_resistance_table, not both",
                  "keep the table for an R0 that follows SOC and temperature, or the single cell_resistance");
    }
    for (const auto& row : rows) {
      if (row[0] < 0.0 || row[0] > 1.0) reader.fail("cell_resistance_table", fmt::format("SOC {} lies outside 0..100 %", row[0]));
      if (!(row[2] > 0.0)) reader.fail("cell_resistance_table", "every resistance must be above zero");
      grid_soc_.push_back(row[0]);
      grid_kelvin_.push_back(row[1]);
    }
    for (auto* axis : {&grid_soc_, &grid_kelvin_}) {
      std::sort(axis->begin(), axis->end());
      axis->erase(std::unique(axis->begin(), axis->end()), axis->end());
    }
    if (grid_soc_.size() < 2 || grid_kelvin_.size() < 2 || rows.size() != grid_soc_.size() * grid_kelvin_.size()) {
      reader.fail("cell_resistance_table",
                  fmt::format("{} rows do not form a full grid of {} SOC values × {} temperatures (each pair once)",
                              rows.size(), grid_soc_.size(), grid_kelvin_.size()),
                  "give a row [SOC, temperature, R0] for every combination of at least two SOC values and two "
                  "temperatures");
    }
    grid_resistance_.assign(rows.size(), std::nan(""));
    for (const auto& row : rows) {
      const auto i = std::lower_bound(grid_soc_.begin(), grid_soc_.end(), row[0]) - grid_soc_.begin();
      const auto j = std::lower_bound(grid_kelvin_.begin(), grid_kelvin_.end(), row[1]) - grid_kelvin_.begin();
      double& cell = grid_resistance_[static_cast<std::size_t>(j) * grid_soc_.size() + static_cast<std::size_t>(i)];
      if (!std::isnan(cell)) reader.fail("cell_resistance_table", "an SOC and temperature pair appears twice");
      cell = row[2];
    }
    grid_.reset(gsl_interp2d_alloc(gsl_interp2d_bilinear, grid_soc_.size(), grid_kelvin_.size()));
    gsl_interp2d_init(grid_.get(), grid_soc_.data(), grid_kelvin_.data(), grid_resistance_.data(), grid_soc_.size(),
                      grid_kelvin_.size());
  }

  // `resistance_temperature: {reference, activation}`: every cell resistance (R0 and the pairs') follows the
  // Arrhenius law R(T) = R(T_ref)·exp(B·(1/T − 1/T_ref)) with B = Ea/k (the B-parameter form), at the ambient.
  void read_temperature_law(netlist::ParameterReader& reader) {
    auto block = reader.block("resistance_temperature");
    if (!block) return;
    if (grid_) {
      reader.fail("resistance_temperature", "cell_resistance_table already gives R0 over temperature",
                  "drop resistance_temperature, or give a single cell_resistance with it");
    }
    reference_kelvin_ = block->quantity("reference", Dimension::temperature(), Bound::Positive, kelvin_at_25_celsius);
    activation_kelvin_ = block->required("activation", Dimension::temperature(), Bound::Positive);
    block->finish();
  }

  // Factor on the pairs' resistances at `kelvin`: Arrhenius, or 1.
  double pair_factor(double kelvin) const {
    return activation_kelvin_ > 0.0 ? std::exp(activation_kelvin_ * (1.0 / kelvin - 1.0 / reference_kelvin_)) : 1.0;
  }
  // String R0 at `kelvin`. The table is read at the initial SOC: a pre-charge moves the SOC by less than 1e-4, and
  // a fixed value keeps the right-hand side free of the bilinear grid's kinks.
  double series_resistance(double kelvin) const {
    if (!grid_) return resistance_ * pair_factor(kelvin);
    const double soc = std::clamp(initial_soc_, grid_soc_.front(), grid_soc_.back());
    const double t = std::clamp(kelvin, grid_kelvin_.front(), grid_kelvin_.back());
    return gsl_interp2d_eval(grid_.get(), grid_soc_.data(), grid_kelvin_.data(), grid_resistance_.data(), soc, t,
                             nullptr, nullptr) *
           series_ / parallel_;
  }

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
  bool do_stores_energy() const override { return !pairs_.empty(); }
  Link do_link() const override { return resistance_ > 0.0 || grid_ ? Link::Conductive : Link::VoltageDefined; }
  PowerChannels do_power_channels() const override {
    return {true, resistance_ > 0.0 || grid_ || !pairs_.empty(), false};
  }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    int b = layout.branch;
    int soc_state = layout.state;
    double j = point.unknowns[b];
    auto [ocv, slope] = cell_ocv(point.states[soc_state]);
    const double r0 = series_resistance(point.ambient);
    const double factor = pair_factor(point.ambient);
    double residual = point.voltage(layout) - series_ * ocv - r0 * j;
    for (std::size_t k = 0; k < pairs_.size(); ++k) residual += point.states[soc_state + 1 + k];
    stamp.thevenin_branch(layout, j, residual, r0);
    stamp.network_by_state(b, soc_state, -series_ * slope);
    // discharge current id = -j
    stamp.rate(soc_state, j / charge_);
    stamp.rate_by_unknown(soc_state, b, 1.0 / charge_);
    for (std::size_t k = 0; k < pairs_.size(); ++k) {
      int s = soc_state + 1 + static_cast<int>(k);
      const Pair& pair = pairs_[k];
      const double rk = pair.resistance * factor;
      double vk = point.states[s];
      stamp.network_by_state(b, s, 1.0);
      stamp.rate(s, (-j - vk / rk) / pair.capacitance);
      stamp.rate_by_unknown(s, b, -1.0 / pair.capacitance);
      stamp.rate_by_state(s, s, -1.0 / (rk * pair.capacitance));
    }
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double j = point.unknowns[layout.branch];
    double soc = point.states[layout.state];
    double heat = series_resistance(point.ambient) * j * j;
    const double factor = pair_factor(point.ambient);
    for (std::size_t k = 0; k < pairs_.size(); ++k) {
      double vk = point.states[layout.state + 1 + k];
      heat += vk * vk / (pairs_[k].resistance * factor);
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
  double resistance_ = 0.0;  // string R0 at the reference temperature (single-value form)
  std::vector<double> grid_soc_, grid_kelvin_, grid_resistance_;  // cell R0 grid, resistance[j·n_soc + i]
  struct GridDeleter {
    void operator()(gsl_interp2d* grid) const { gsl_interp2d_free(grid); }
  };
  std::unique_ptr<gsl_interp2d, GridDeleter> grid_;  // read-only after construction
  double reference_kelvin_ = kelvin_at_25_celsius;
  double activation_kelvin_ = 0.0;  // 0: no temperature dependence
  double charge_ = 0.0;
  double initial_soc_ = 1.0;
  std::vector<Pair> pairs_;
};
}  // namespace

std::unique_ptr<Part> make_cell_string(const netlist::PartSpec& spec) { return std::make_unique<CellString>(spec); }
}  // namespace linkrise::models
