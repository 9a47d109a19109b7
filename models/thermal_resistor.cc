#include "models/thermal_resistor.h"

#include <array>
#include <cmath>
#include <limits>
#include <span>

#include <fmt/format.h>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

using netlist::kelvin_offset;
constexpr double temperature_tolerance_scale = 1e3;
constexpr double current_squared_tolerance_scale = 1e2;

ThermalNetwork network_or_fail(std::variant<ThermalNetwork, std::string> created,
                               const netlist::ParameterReader& reader, const std::string& key) {
  if (auto* problem = std::get_if<std::string>(&created)) {
    reader.fail(key, fmt::format("the thermal network is not valid ({})", *problem),
                "check the heat capacities and thermal resistances");
  }
  return std::get<ThermalNetwork>(std::move(created));
}

/// A thermal resistance to ambient, or the word `adiabatic` (+infinity: no cooling at all).
double resistance_or_adiabatic(netlist::ParameterReader& reader, const std::string& key, bool required) {
  if (!reader.has(key)) {
    reader.accept(key);
    if (!required) return std::numeric_limits<double>::infinity();
    reader.reject_misspelling(key);
    reader.fail(key, "is missing", fmt::format("add '{}: 8 K/W', or '{}: adiabatic' for no cooling", key, key));
  }
  if (reader.is_word(key, "adiabatic")) {
    reader.accept(key);
    return std::numeric_limits<double>::infinity();
  }
  return reader.required(key, Dimension::thermal_resistance(), Bound::Positive);
}

// `element_heat_capacity: from_pulse_curve`: the element heat capacity for which the two-node network meets the
// part's own pulse curve at its most demanding row and runs at or above it at every other row (Z_th falls as C1
// grows, so the smallest C1 over the rows is conservative everywhere; models/pulse_curve.h).
double capacity_from_curve(netlist::ParameterReader& block, ThermalOptions& options, TwoNodeParameters rest) {
  block.accept("element_heat_capacity");
  if (options.pulse_curves.empty() || !options.max_temperature) {
    block.fail("element_heat_capacity", "is 'from_pulse_curve', which needs both a pulse curve and max_temperature in the part's ratings",
               "add 'pulse_energy_curve' (or 'pulse_power_curve') and 'max_temperature' to the part's ratings, or "
               "give the element heat capacity, e.g. '2 J/K'");
  }
  const PulseCurve& curve = options.pulse_curves.front();
  const double rise = *options.max_temperature - pulse_curve_ambient_kelvin;
  if (!(rise > 0.0)) block.fail("element_heat_capacity", "needs a max_temperature above the curve's 25 degC");
  std::optional<double> smallest;
  std::size_t row = 0;
  std::string unmet;  // rows no element capacity can meet: the body path keeps the element cooler than the curve
  for (std::size_t k = 0; k < curve.lengths.size(); ++k) {
    auto capacity = element_capacity_meeting(rest, curve.lengths[k], curve_thermal_impedance(curve, k, rise));
    if (!capacity) unmet += fmt::format("{}{}", unmet.empty() ? "" : ", ", k + 1);
    if (capacity && (!smallest || *capacity < *smallest)) smallest = capacity, row = k;
  }
  if (!smallest) {
    block.fail("element_heat_capacity", "cannot meet the pulse curve: the body path alone heats the element more "
                                        "than any row allows",
               "check element_to_body_resistance and the body values against the data sheet, or give the element "
               "heat capacity");
  }
  options.element_capacity_origin = fmt::format(
      "the two-node network meets ratings.{} row {} ({} in {}) from 25 degC to max_temperature and runs at or above "
      "the curve at every other row{}",
      curve.key(), row + 1,
      netlist::format_si(curve.values[row], curve.measure == PulseCurve::Measure::Energy ? "J" : "W"),
      netlist::format_si(curve.lengths[row], "s"),
      unmet.empty() ? std::string()
                    : fmt::format(" but row(s) {}, which no element capacity meets with these body values (the model "
                                  "runs cooler there)", unmet));
  return *smallest;
}

std::optional<ThermalNetwork> read_network(netlist::ParameterReader& block, ThermalOptions& options) {
  if (block.has("foster")) {
    const std::string fix = "write '- {thermal_resistance: 0.5 K/W, time_constant: 2 s}' per term";
    auto readers = block.blocks("foster", "Foster term", std::numeric_limits<std::size_t>::max(),
                                "must be a list of terms", fix);
    if (readers.empty()) block.fail("foster", "must be a list of terms", fix);
    std::vector<FosterTerm> terms;
    for (auto& term : readers) {
      FosterTerm t{};
      t.thermal_resistance = term.required("thermal_resistance", Dimension::thermal_resistance(), Bound::Positive);
      t.time_constant = term.required("time_constant", Dimension::time(), Bound::Positive);
      term.finish();
      terms.push_back(t);
    }
    for (const char* other : {"heat_capacity", "element_heat_capacity"}) {
      if (block.has(other)) {
        block.fail(other, "cannot be combined with a Foster list",
                   "describe the network either by heat capacities or by Foster terms, not both");
      }
    }
    return network_or_fail(ThermalNetwork::create(std::move(terms)), block, "foster");
  }
  if (block.has("element_heat_capacity")) {
    if (block.has("heat_capacity")) {
      block.fail("heat_capacity", "cannot be combined with a two-node network (element_heat_capacity)",
                 "give either heat_capacity + thermal_resistance, or the four two-node values");
    }
    TwoNodeParameters p{};
    p.element_to_body_resistance =
        block.required("element_to_body_resistance", Dimension::thermal_resistance(), Bound::Positive);
    p.body_heat_capacity = block.required("body_heat_capacity", Dimension::heat_capacity(), Bound::Positive);
    p.body_to_ambient_resistance = resistance_or_adiabatic(block, "body_to_ambient_resistance", true);
    p.element_heat_capacity =
        block.is_word("element_heat_capacity", "from_pulse_curve")
            ? capacity_from_curve(block, options, p)
            : block.required("element_heat_capacity", Dimension::heat_capacity(), Bound::Positive);
    return network_or_fail(ThermalNetwork::create(p), block, "element_heat_capacity");
  }
  OneNodeParameters p{};
  p.heat_capacity = block.required("heat_capacity", Dimension::heat_capacity(), Bound::Positive);
  p.thermal_resistance = resistance_or_adiabatic(block, "thermal_resistance", true);
  return network_or_fail(ThermalNetwork::create(p), block, "heat_capacity");
}

// One pulse curve under `key`, if given: rows [length, energy or peak power], lengths increasing, values above 0.
std::optional<PulseCurve> read_pulse_curve(netlist::ParameterReader& block, const std::string& key) {
  if (!block.has(key)) return std::nullopt;
  PulseCurve curve;
  curve.repetitive = key.rfind("repetitive_", 0) == 0;
  curve.measure = key.find("power") != std::string::npos ? PulseCurve::Measure::PeakPower : PulseCurve::Measure::Energy;
  const Dimension value = curve.measure == PulseCurve::Measure::Energy ? Dimension::energy() : Dimension::power_();
  for (const auto& row : block.table(key, {Dimension::time(), value})) {
    const std::size_t n = curve.lengths.size() + 1;
    if (!(row[0] > 0.0) || !(row[1] > 0.0)) block.fail(key, fmt::format("row {}: length and value must be above zero", n));
    if (n > 1 && !(row[0] > curve.lengths.back())) {
      block.fail(key, fmt::format("row {}: the pulse length must increase from row to row", n));
    }
    curve.lengths.push_back(row[0]);
    curve.values.push_back(row[1]);
  }
  if (curve.lengths.empty()) block.fail(key, "lists no rows", "give rows [pulse length, permitted value]");
  return curve;
}

std::vector<Rating> read_ratings(netlist::ParameterReader& block, std::vector<PulseCurve>& curves) {
  std::vector<Rating> ratings;
  // Every rating names the data-sheet entry it was read from and where that entry is written.
  auto rate = [&](const std::string& key, std::string metric, std::string unit, double value, std::string note) {
    ratings.push_back({std::move(metric), std::move(unit), value, std::move(note), "ratings." + key, block.mark(key)});
  };
  if (auto t = block.optional("max_temperature", Dimension::temperature(), Bound::Positive)) {
    rate("max_temperature", "peak_temperature", "degC", *t - kelvin_offset, "maximum element temperature");
  }
  if (auto t = block.optional("max_body_temperature", Dimension::temperature(), Bound::Positive)) {
    rate("max_body_temperature", "peak_body_temperature", "degC", *t - kelvin_offset,
         "maximum body (housing) temperature of a two-node network");
  }
  auto energy = block.optional("pulse_energy", Dimension::energy(), Bound::Positive);
  auto length = block.optional("pulse_length", Dimension::time(), Bound::Positive);
  if (length && !energy) {
    block.fail("pulse_length", "is given without pulse_energy", "add 'pulse_energy: 150 J' for that pulse length");
  }
  if (energy) {
    rate("pulse_energy", "energy", "J", *energy,
         length ? fmt::format("pulse length {}", netlist::format_si(*length, "s")) : std::string());
  }
  if (auto p = block.optional("continuous_power", Dimension::power_(), Bound::Positive)) {
    rate("continuous_power", "duty_average_power", "W", *p,
         "continuous rating, judged against the mean heat over the key-cycle duty (sequence.key_cycles)");
  }
  if (auto v = block.optional("max_voltage", Dimension::voltage(), Bound::Positive)) {
    rate("max_voltage", "peak_voltage", "V", *v, "maximum voltage across the part");
  }
  if (auto i = block.optional("max_current", Dimension::current(), Bound::Positive)) {
    rate("max_current", "peak_current", "A", *i, "maximum current through the part (an NTC's inrush when it restarts hot)");
  }
  if (auto e = block.optional("max_switching_energy", Dimension::energy(), Bound::Positive)) {
    rate("max_switching_energy", "peak_pulse_energy", "J", *e, "energy per switching (a PTC's limit for one trip)");
  }
  if (auto v = block.optional("max_switching_voltage", Dimension::voltage(), Bound::Positive)) {
    rate("max_switching_voltage", "peak_voltage", "V", *v, "maximum switching voltage (across a PTC when it trips)");
  }
  if (auto c = block.optional("max_switching_capacitance", Dimension::capacitance(), Bound::Positive)) {
    rate("max_switching_capacitance", "switched_capacitance", "F", *c,
         "capacitance charged per switching (a PTC's limit: the charge of one pulse over the voltage it started at)");
  }
  std::string keys, first_key;
  for (const auto& key : pulse_curve_keys()) {
    if (auto curve = read_pulse_curve(block, key)) {
      curves.push_back(*curve);
      keys += (keys.empty() ? "" : ", ") + key;
      if (first_key.empty()) first_key = key;
    }
  }
  if (!curves.empty()) {
    rate(first_key, "pulse_curve_use", "1", 1.0,
         fmt::format("data-sheet pulse curve ({}): the worst pulse's share of what the curve permits at its "
                     "equivalent rectangular length", keys));
  }
  block.finish();
  return ratings;
}

class ThermalResistor final : public Part {
 public:
  ThermalResistor(const netlist::PartSpec& spec, ResistanceLaw law, ThermalOptions options,
                  std::optional<DefiningValue> defining)
      : Part(spec), law_(std::move(law)), options_(std::move(options)), defining_(std::move(defining)) {
    thermal_count_ = options_.network ? static_cast<int>(options_.network->state_count()) : 0;
    if (options_.network) {
      // The thermal network is linear: its Jacobians are constants, taken once here rather than per stamp.
      const auto n = static_cast<std::size_t>(thermal_count_);
      temperature_gradient_.resize(n);
      rate_by_power_.resize(n);
      rate_by_thermal_state_.resize(n * n);
      options_.network->element_temperature_gradient(temperature_gradient_);
      options_.network->power_jacobian(rate_by_power_);
      options_.network->state_jacobian(rate_by_thermal_state_);
    }
    derived_ = pulse_curve_check();
  }

 private:
  // Element temperature (K).
  double temperature(const Point& point, const Layout& layout) const {
    if (!options_.network) return point.ambient;
    return options_.network->element_temperature(thermal_states(point, layout), point.ambient);
  }
  std::span<const double> thermal_states(const Point& point, const Layout& layout) const {
    return std::span<const double>(point.states + layout.state, static_cast<std::size_t>(thermal_count_));
  }
  int current_squared_index(const Layout& layout) const { return layout.state + thermal_count_; }

  std::vector<StateInfo> do_states(double ambient) const override {
    std::vector<StateInfo> states;
    if (options_.network) {
      const ThermalNetwork& network = *options_.network;
      std::vector<double> initial(network.state_count());
      network.warm_states(ambient, options_.has_initial_temperature ? options_.initial_temperature : ambient,
                          initial);
      auto names = network.state_names();
      for (std::size_t i = 0; i < initial.size(); ++i) {
        states.push_back({names[i], "K", initial[i], temperature_tolerance_scale});
      }
    }
    states.push_back({current_squared_state, "A²s", 0.0, current_squared_tolerance_scale});
    return states;
  }

  // R(T, v) with its logarithmic slopes ∂ln R/∂T (1/K) and ∂ln R/∂v (1/V).
  struct Evaluated {
    double resistance, log_by_temperature, log_by_voltage;
  };
  Evaluated evaluate(double kelvin, double v) const {
    const ResistanceAndSlope law = law_.evaluate(kelvin);
    if (!options_.softening) return {law.resistance, law.derivative / law.resistance, 0.0};
    const VoltageSoftening& soft = *options_.softening;
    const double x = v / soft.voltage, exponent = 1.0 / (1.0 + x * x);
    const double rise = std::log(law.resistance / soft.floor_resistance);
    const double resistance = soft.floor_resistance * std::exp(exponent * rise);
    const double exponent_by_voltage = -2.0 * x / soft.voltage * exponent * exponent;
    return {resistance, exponent * law.derivative / law.resistance, exponent_by_voltage * rise};
  }
  double resistance(const Point& point, const Layout& layout) const {
    return evaluate(temperature(point, layout), point.voltage(layout)).resistance;
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) / resistance(point, layout);
  }
  Link do_link() const override { return Link::Conductive; }
  // A voltage softening makes i(v) nonlinear: the network solve must iterate.
  bool do_linear_network() const override { return !options_.softening.has_value(); }
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  std::vector<Rating> do_ratings() const override { return options_.ratings; }
  std::vector<PulseCurve> do_pulse_curves() const override { return options_.pulse_curves; }
  Role do_role() const override { return Role::Resistive; }
  bool do_has_thermal_model() const override { return options_.network.has_value(); }
  std::optional<DefiningValue> do_defining_value() const override { return defining_; }
  bool has_body() const { return options_.network && options_.network->has_body(); }
  std::vector<SignalInfo> do_extra_signals() const override {
    std::vector<SignalInfo> signals{{"temperature", "degC"}, {"resistance", "Ohm"}};
    if (has_body()) signals.push_back({"body_temperature", "degC"});
    return signals;
  }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    out[0] = temperature(point, layout) - kelvin_offset;
    out[1] = resistance(point, layout);
    if (has_body()) out[2] = options_.network->body_temperature(thermal_states(point, layout), point.ambient) - kelvin_offset;
  }
  std::vector<DerivedValue> do_derived_values() const override { return derived_; }
  // How the thermal model compares with the data-sheet pulse curve (models/pulse_curve.h): the element heat
  // capacity the curve implies, and the model's element rise at each row's permitted pulse over the allowed rise.
  std::vector<DerivedValue> pulse_curve_check() const {
    std::vector<DerivedValue> values;
    if (!options_.network || options_.pulse_curves.empty() || !options_.max_temperature) return values;
    const PulseCurve& curve = options_.pulse_curves.front();
    const double rise = *options_.max_temperature - pulse_curve_ambient_kelvin;
    if (!(rise > 0.0)) return values;
    std::size_t row = 0;
    const double capacity = element_heat_capacity_from_curve(curve, rise, &row);
    if (options_.element_capacity_origin.empty()) {
      values.push_back({"element heat capacity bound from the pulse curve", capacity, "J/K",
                        fmt::format("ratings.{} row {} and max_temperature: P·t/(T_max − 25 degC), the adiabatic "
                                    "upper bound", curve.key(), row + 1)});
    } else {
      values.push_back({"element heat capacity from the pulse curve", options_.network->element_heat_capacity(),
                        "J/K", options_.element_capacity_origin});
    }
    double lowest = std::numeric_limits<double>::infinity();
    std::size_t lowest_row = 0;
    for (std::size_t k = 0; k < curve.lengths.size(); ++k) {
      const double share = options_.network->thermal_impedance(curve.lengths[k]) /
                           curve_thermal_impedance(curve, k, rise);
      if (share < lowest) lowest = share, lowest_row = k;
    }
    values.push_back({"model element rise at the pulse curve", lowest, "1",
                      fmt::format("the model's Z_th(t) over the curve's (T_max − 25 degC)/P_max(t), lowest at row {} "
                                  "of ratings.{}; below 100 % the model keeps the element cooler than the data sheet "
                                  "(optimistic)", lowest_row + 1, curve.key())});
    return values;
  }

  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    const double v = point.voltage(layout);
    const Evaluated law = evaluate(temperature(point, layout), v);
    const double g = 1.0 / law.resistance;
    const double i = v * g;
    const double power = v * i;
    // di/dv = g·(1 − v·∂ln R/∂v): g alone without a voltage softening.
    const double current_by_voltage = g * (1.0 - v * law.log_by_voltage);
    stamp.terminal_current(layout, i, current_by_voltage);

    // I²t quadrature: d/dt = i², with ∂/∂v = 2i·di/dv and ∂/∂T = 2i·∂i/∂T.
    const int q = current_squared_index(layout);
    stamp.rate(q, i * i);
    stamp.rate_by_unknown(q, layout.node[0], 2.0 * i * current_by_voltage);
    stamp.rate_by_unknown(q, layout.node[1], -2.0 * i * current_by_voltage);

    if (!options_.network) return;
    const ThermalNetwork& network = *options_.network;
    const int n = thermal_count_;
    const int s = layout.state;
    // On the stack for the usual few thermal states: this runs in every right-hand side evaluation.
    std::array<double, 8> few{};
    std::vector<double> many(n > static_cast<int>(few.size()) ? static_cast<std::size_t>(n) : 0);
    const std::span<double> rate = many.empty() ? std::span<double>(few.data(), static_cast<std::size_t>(n))
                                                : std::span<double>(many);
    network.derivatives(thermal_states(point, layout), power, point.ambient, rate);
    for (int k = 0; k < n; ++k) stamp.rate(s + k, rate[k]);
    if (!stamp.wants_derivatives()) return;

    // Chain rule through T = T_element(x): ∂i/∂T and ∂P/∂T.
    const double current_by_temperature = -i * law.log_by_temperature;
    const double power_by_temperature = v * current_by_temperature;
    const double power_by_voltage = i + v * current_by_voltage;
    const std::vector<double>& gradient = temperature_gradient_;
    const std::vector<double>& by_power = rate_by_power_;
    const std::vector<double>& by_state = rate_by_thermal_state_;
    for (int j = 0; j < n; ++j) {
      stamp.terminal_current_by_state(layout, s + j, current_by_temperature * gradient[j]);
      stamp.rate_by_state(q, s + j, 2.0 * i * current_by_temperature * gradient[j]);
    }
    for (int k = 0; k < n; ++k) {
      for (int j = 0; j < n; ++j) {
        stamp.rate_by_state(s + k, s + j, by_state[k * n + j] + by_power[k] * power_by_temperature * gradient[j]);
      }
      stamp.rate_by_unknown(s + k, layout.node[0], by_power[k] * power_by_voltage);
      stamp.rate_by_unknown(s + k, layout.node[1], -by_power[k] * power_by_voltage);
    }
  }

  Powers do_powers(const Point& point, const Layout& layout) const override {
    double v = point.voltage(layout);
    return Powers{0.0, v * v / resistance(point, layout), 0.0};
  }

  ResistanceLaw law_;
  ThermalOptions options_;
  std::optional<DefiningValue> defining_;
  std::vector<DerivedValue> derived_;  // pulse_curve_check(), taken once: it depends on the data alone
  int thermal_count_ = 0;
  std::vector<double> temperature_gradient_;   // dT_element/dx
  std::vector<double> rate_by_power_;          // d(dx/dt)/dP
  std::vector<double> rate_by_thermal_state_;  // d(dx/dt)/dx, row-major
};
}  // namespace

ThermalOptions read_thermal_options(netlist::ParameterReader& reader) {
  ThermalOptions options;
  // Ratings first: a thermal block may take its element heat capacity from the pulse curve.
  if (auto ratings = reader.block("ratings")) {
    options.ratings = read_ratings(*ratings, options.pulse_curves);
    for (const auto& rating : options.ratings) {
      if (rating.metric == "peak_temperature") options.max_temperature = rating.value + kelvin_offset;
    }
  }
  if (auto thermal = reader.block("thermal")) {
    netlist::ParameterReader& block = *thermal;
    options.network = read_network(block, options);
    if (auto t = block.optional("initial_temperature", Dimension::temperature(), Bound::Positive)) {
      options.initial_temperature = *t;
      options.has_initial_temperature = true;
    }
    block.finish();
  }
  return options;
}

ResistanceLaw law_or_fail(Created<ResistanceLaw> created, const netlist::ParameterReader& reader,
                          const std::string& key) {
  if (auto* problem = std::get_if<std::string>(&created)) {
    reader.fail(key, fmt::format("the resistance law is not valid ({})", *problem),
                "check the value against the rule named in the message");
  }
  return std::get<ResistanceLaw>(std::move(created));
}

std::optional<ResistanceLaw> read_resistance_table(netlist::ParameterReader& reader, const std::string& key) {
  if (!reader.has(key)) return std::nullopt;
  auto rows = reader.table(key, {Dimension::temperature(), Dimension::resistance()});
  std::vector<TablePoint> points;
  for (const auto& row : rows) points.push_back({row[0], row[1]});
  return law_or_fail(make_resistance_law(points), reader, key);
}

int choose_form(const netlist::ParameterReader& reader, const std::vector<std::vector<std::string>>& forms,
                bool required, const std::string& fix) {
  int chosen = -1;
  std::string chosen_key;
  for (std::size_t f = 0; f < forms.size(); ++f) {
    for (const auto& key : forms[f]) {
      if (!reader.has(key)) continue;
      if (chosen >= 0 && chosen != static_cast<int>(f)) {
        reader.fail(key, fmt::format("cannot be combined with '{}': they belong to different ways of describing "
                                     "the part", chosen_key),
                    fix);
      }
      if (chosen < 0) chosen_key = key;
      chosen = static_cast<int>(f);
    }
  }
  if (chosen < 0 && required) {
    std::string list;
    for (const auto& form : forms) list += (list.empty() ? "'" : ", '") + form.front() + "'";
    throw netlist::InputError(reader.mark(""), fmt::format("{} needs one of: {}", reader.owner(), list), fix);
  }
  return chosen;
}

std::unique_ptr<Part> make_thermal_resistor(const netlist::PartSpec& spec, ResistanceLaw law,
                                            ThermalOptions options, std::optional<DefiningValue> defining) {
  return std::make_unique<ThermalResistor>(spec, std::move(law), std::move(options), std::move(defining));
}

std::unique_ptr<Part> finish_thermal_resistor(const netlist::PartSpec& spec, netlist::ParameterReader& reader,
                                              ResistanceLaw law, std::optional<DefiningValue> defining,
                                              std::optional<VoltageSoftening> softening) {
  ThermalOptions options = read_thermal_options(reader);
  options.softening = softening;
  reader.finish();
  return make_thermal_resistor(spec, std::move(law), std::move(options), std::move(defining));
}

}  // namespace linkrise::models
