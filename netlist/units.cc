#include "netlist/units.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <vector>

#include <fmt/format.h>

namespace linkrise::netlist {

namespace {
constexpr int kMass = 0, kLength = 1, kTime = 2, kCurrent = 3, kTemperature = 4;

Dimension make(int mass, int length, int time, int current, int temperature) {
  Dimension d;
  d.exponent = {mass, length, time, current, temperature};
  return d;
}

struct UnitEntry {
  std::string_view symbol;
  double scale;
  Dimension dimension;
  bool takes_prefix;
};

const std::vector<UnitEntry>& unit_table() {
  static const std::vector<UnitEntry> table = {
      {"Ohm", 1.0, Dimension::resistance(), true},     {"ohm", 1.0, Dimension::resistance(), true},
      {"Ω", 1.0, Dimension::resistance(), true},       {"F", 1.0, Dimension::capacitance(), true},
      {"H", 1.0, Dimension::inductance(), true},       {"V", 1.0, Dimension::voltage(), true},
      {"A", 1.0, Dimension::current(), true},          {"W", 1.0, Dimension::power_(), true},
      {"s", 1.0, Dimension::time(), true},             {"J", 1.0, Dimension::energy(), true},
      {"K", 1.0, Dimension::temperature(), true},      {"Ah", 3600.0, Dimension::charge(), true},
      {"C", 1.0, Dimension::charge(), true},           {"g", 1e-3, Dimension::mass(), true},
      {"m", 1.0, Dimension::length(), true},           {"Hz", 1.0, Dimension::frequency(), true},
      {"%", 0.01, Dimension::none(), false},           {"ppm", 1e-6, Dimension::none(), false},
      {"min", 60.0, Dimension::time(), false},         {"h", 3600.0, Dimension::time(), false},
      // I²t as written on fuse and contactor data sheets.
      {"A²s", 1.0, Dimension::current().power(2) * Dimension::time(), false},
      {"A^2s", 1.0, Dimension::current().power(2) * Dimension::time(), false},
  };
  return table;
}

struct Prefix {
  std::string_view symbol;
  double scale;
};
const std::vector<Prefix>& prefix_table() {
  static const std::vector<Prefix> table = {{"p", 1e-12}, {"n", 1e-9}, {"u", 1e-6}, {"µ", 1e-6}, {"μ", 1e-6},
                                            {"m", 1e-3},  {"k", 1e3},  {"M", 1e6},  {"G", 1e9}};
  return table;
}

std::string_view trim(std::string_view text) {
  while (!text.empty() && (text.front() == ' ' || text.front() == '\t')) text.remove_prefix(1);
  while (!text.empty() && (text.back() == ' ' || text.back() == '\t')) text.remove_suffix(1);
  return text;
}

// A unit symbol, optionally with a prefix, raised to `power`. A whole symbol wins over prefix+symbol, so "m" is
// the metre and "mm" the millimetre.
bool lookup_symbol(std::string_view text, int power, double& scale, Dimension& dimension) {
  for (const auto& unit : unit_table()) {
    if (text == unit.symbol) {
      scale = std::pow(unit.scale, power);
      dimension = unit.dimension.power(power);
      return true;
    }
  }
  for (const auto& prefix : prefix_table()) {
    if (!text.starts_with(prefix.symbol)) continue;
    std::string_view rest = text.substr(prefix.symbol.size());
    for (const auto& unit : unit_table()) {
      if (unit.takes_prefix && rest == unit.symbol) {
        scale = std::pow(prefix.scale * unit.scale, power);
        dimension = unit.dimension.power(power);
        return true;
      }
    }
  }
  return false;
}

// No engineering unit raises a base unit beyond this power (a farad is s^4); the bound keeps the integer exponents
// from overflowing and every accepted unit writable again by Dimension::symbol().
constexpr int max_unit_power = 20;

// One factor such as "mm²", "kOhm", "s^2". Returns false when it is not a known unit.
bool parse_factor(std::string_view text, double& scale, Dimension& dimension, std::string& problem) {
  // As written first: symbols that carry their own power (A²s, A^2s) are in the table whole.
  if (lookup_symbol(text, 1, scale, dimension)) return true;
  int power = 1;
  if (auto caret = text.find('^'); caret != std::string_view::npos) {
    std::string_view digits = text.substr(caret + 1);
    auto result = std::from_chars(digits.data(), digits.data() + digits.size(), power);
    if (result.ec != std::errc() || result.ptr != digits.data() + digits.size()) {
      problem = fmt::format("bad power '{}' in unit", digits);
      return false;
    }
    if (std::abs(power) > max_unit_power) {  // larger powers would overflow the exponents
      problem = fmt::format("power '{}' in unit lies outside -{} … {}", digits, max_unit_power, max_unit_power);
      return false;
    }
    text = text.substr(0, caret);
  } else if (text.ends_with("²")) {
    power = 2;
    text.remove_suffix(std::string_view("²").size());
  } else if (text.ends_with("³")) {
    power = 3;
    text.remove_suffix(std::string_view("³").size());
  }
  if (text == "1") {
    scale = 1.0;
    dimension = Dimension::none();
    return true;
  }
  if (lookup_symbol(text, power, scale, dimension)) return true;
  problem = fmt::format("unknown unit '{}'", text);
  return false;
}

}  // namespace

Dimension Dimension::operator*(const Dimension& other) const {
  Dimension d;
  for (int i = 0; i < 5; ++i) d.exponent[i] = exponent[i] + other.exponent[i];
  return d;
}
Dimension Dimension::operator/(const Dimension& other) const {
  Dimension d;
  for (int i = 0; i < 5; ++i) d.exponent[i] = exponent[i] - other.exponent[i];
  return d;
}
Dimension Dimension::power(int n) const {
  Dimension d;
  for (int i = 0; i < 5; ++i) d.exponent[i] = exponent[i] * n;
  return d;
}

Dimension Dimension::none() { return make(0, 0, 0, 0, 0); }
Dimension Dimension::mass() { return make(1, 0, 0, 0, 0); }
Dimension Dimension::length() { return make(0, 1, 0, 0, 0); }
Dimension Dimension::time() { return make(0, 0, 1, 0, 0); }
Dimension Dimension::current() { return make(0, 0, 0, 1, 0); }
Dimension Dimension::temperature() { return make(0, 0, 0, 0, 1); }
Dimension Dimension::power_() { return make(1, 2, -3, 0, 0); }
Dimension Dimension::energy() { return make(1, 2, -2, 0, 0); }
Dimension Dimension::voltage() { return make(1, 2, -3, -1, 0); }
Dimension Dimension::resistance() { return make(1, 2, -3, -2, 0); }
Dimension Dimension::capacitance() { return make(-1, -2, 4, 2, 0); }
Dimension Dimension::inductance() { return make(1, 2, -2, -2, 0); }
Dimension Dimension::charge() { return make(0, 0, 1, 1, 0); }
Dimension Dimension::area() { return make(0, 2, 0, 0, 0); }
Dimension Dimension::heat_capacity() { return energy() / temperature(); }
Dimension Dimension::thermal_resistance() { return temperature() / power_(); }
Dimension Dimension::per_kelvin() { return none() / temperature(); }
Dimension Dimension::frequency() { return make(0, 0, -1, 0, 0); }

namespace {
struct NamedDimension {
  Dimension dimension;
  std::string_view name;
  std::string_view symbol;
};
const std::vector<NamedDimension>& named_dimensions() {
  static const std::vector<NamedDimension> table = {
      {Dimension::none(), "a plain number", ""},
      {Dimension::resistance(), "resistance", "Ohm"},
      {Dimension::capacitance(), "capacitance", "F"},
      {Dimension::inductance(), "inductance", "H"},
      {Dimension::voltage(), "voltage", "V"},
      {Dimension::current(), "current", "A"},
      {Dimension::power_(), "power", "W"},
      {Dimension::energy(), "energy", "J"},
      {Dimension::time(), "time", "s"},
      {Dimension::temperature(), "temperature", "K"},
      {Dimension::charge(), "charge", "Ah"},
      {Dimension::mass(), "mass", "g"},
      {Dimension::length(), "length", "m"},
      {Dimension::area(), "area", "mm²"},
      {Dimension::heat_capacity(), "heat capacity", "J/K"},
      {Dimension::thermal_resistance(), "thermal resistance", "K/W"},
      {Dimension::per_kelvin(), "temperature coefficient", "1/K"},
      {Dimension::frequency(), "frequency", "Hz"},
      {Dimension::current().power(2) * Dimension::time(), "I²t", "A²s"},
      {Dimension::resistance() / Dimension::length(), "resistance per length", "Ohm/m"},
      {Dimension::inductance() / Dimension::length(), "inductance per length", "H/m"},
      {Dimension::voltage() / Dimension::time(), "rate of voltage change", "V/s"},
  };
  return table;
}
}  // namespace

std::string Dimension::describe() const {
  for (const auto& entry : named_dimensions()) {
    if (entry.dimension == *this) {
      if (entry.symbol.empty()) return std::string(entry.name);
      return fmt::format("{} ({})", entry.name, entry.symbol);
    }
  }
  return fmt::format("kg^{} m^{} s^{} A^{} K^{}", exponent[kMass], exponent[kLength], exponent[kTime],
                     exponent[kCurrent], exponent[kTemperature]);
}

std::string Dimension::symbol() const {
  if (*this == charge()) return "C";  // SI base form in output columns; "Ah" only as input
  if (*this == mass()) return "kg";   // values are held in kg; "g" is the input unit that takes prefixes
  if (*this == area()) return "m^2";
  for (const auto& entry : named_dimensions()) {
    if (entry.dimension == *this) return std::string(entry.symbol);
  }
  // A dimension without a name: a product of base units that parse_quantity reads back ("kg*m^2*s^-3*A^-1").
  static constexpr std::array<std::string_view, 5> base{"kg", "m", "s", "A", "K"};
  std::string text;
  for (int i = 0; i < 5; ++i) {
    if (exponent[i] == 0) continue;
    if (!text.empty()) text += "*";
    text += base[i];
    if (exponent[i] != 1) text += fmt::format("^{}", exponent[i]);
  }
  return text;
}

namespace {

// The number a value starts with; `unit` gets the rest of the text, trimmed.
std::optional<double> leading_number(std::string_view text, std::string_view& unit, std::string& problem) {
  const char* begin = text.data();
  const char* end = text.data() + text.size();
  if (*begin == '+') ++begin;  // from_chars does not accept a leading '+'
  double number = 0.0;
  auto result = std::from_chars(begin, end, number);
  if (result.ec == std::errc::result_out_of_range) {
    problem = fmt::format("number in '{}' is out of range", text);
    return std::nullopt;
  }
  if (result.ec != std::errc()) {
    problem = fmt::format("'{}' does not start with a number", text);
    return std::nullopt;
  }
  if (!std::isfinite(number)) {
    problem = fmt::format("'{}' is not a finite number", text);
    return std::nullopt;
  }
  unit = trim(std::string_view(result.ptr, static_cast<std::size_t>(end - result.ptr)));
  return number;
}

// A compound unit: numerator / denominator, each a product of factors joined by '*' or '·'.
bool parse_compound_unit(std::string_view unit, double& scale, Dimension& dimension, std::string& problem) {
  scale = 1.0;
  dimension = Dimension::none();
  bool denominator = false;
  std::size_t position = 0;
  std::string unit_text(unit);
  for (std::size_t i = 0; i <= unit_text.size(); ++i) {
    bool at_end = (i == unit_text.size());
    bool is_times = !at_end && unit_text[i] == '*';
    bool is_dot = !at_end && unit_text.compare(i, std::string_view("·").size(), "·") == 0;
    bool is_divide = !at_end && unit_text[i] == '/';
    if (!(at_end || is_times || is_dot || is_divide)) continue;
    std::string_view factor_text(unit_text.data() + position, i - position);
    if (factor_text.empty()) {
      problem = fmt::format("malformed unit '{}'", unit);
      return false;
    }
    double factor_scale = 1.0;
    Dimension factor_dimension;
    if (!parse_factor(factor_text, factor_scale, factor_dimension, problem)) return false;
    if (denominator) {
      scale /= factor_scale;
      dimension = dimension / factor_dimension;
    } else {
      scale *= factor_scale;
      dimension = dimension * factor_dimension;
    }
    if (is_divide) {
      if (denominator) {
        problem = fmt::format("unit '{}' has more than one '/'", unit);
        return false;
      }
      denominator = true;
    }
    position = i + (is_dot ? std::string_view("·").size() : 1);
    if (is_dot) i += std::string_view("·").size() - 1;
  }
  for (int exponent : dimension.exponent) {
    if (std::abs(exponent) > max_unit_power) {
      problem = fmt::format("unit '{}' raises a base unit beyond the power {}", unit, max_unit_power);
      return false;
    }
  }
  return true;
}

}  // namespace

std::optional<Quantity> parse_quantity(std::string_view raw, std::string& problem) {
  std::string_view text = trim(raw);
  if (text.empty()) {
    problem = "empty value";
    return std::nullopt;
  }
  std::string_view unit;
  std::optional<double> number = leading_number(text, unit, problem);
  if (!number) return std::nullopt;
  Quantity quantity;
  if (unit.empty()) {
    quantity.value = *number;
    quantity.bare = true;
    return quantity;
  }
  if (unit == "degC" || unit == "°C") {
    quantity.value = *number + kelvin_offset;
    if (!std::isfinite(quantity.value)) {
      problem = fmt::format("'{}' is out of range", text);
      return std::nullopt;
    }
    quantity.dimension = Dimension::temperature();
    quantity.absolute_temperature = true;
    return quantity;
  }
  if (unit.find("degC") != std::string_view::npos || unit.find("°C") != std::string_view::npos) {
    problem = fmt::format("'{}' mixes degC into a compound unit; write temperature differences in K (e.g. K/W)", unit);
    return std::nullopt;
  }
  if (unit.find(' ') != std::string_view::npos) {
    problem = fmt::format("unit '{}' contains a space; write compound units like 'J/K' or 'A*s'", unit);
    return std::nullopt;
  }
  double scale = 1.0;
  Dimension dimension = Dimension::none();
  if (!parse_compound_unit(unit, scale, dimension, problem)) return std::nullopt;
  quantity.value = *number * scale;
  quantity.dimension = dimension;
  if (!std::isfinite(quantity.value) || (*number != 0.0 && quantity.value == 0.0)) {
    // 1e308 kF overflows to infinity and 1e-320 pF underflows to zero once the prefix is applied.
    problem = fmt::format("'{}' is out of range once its prefix is applied", text);
    return std::nullopt;
  }
  return quantity;
}

const char* si_prefix(int exponent) {
  switch (exponent) {
    case -12: return "p";
    case -9: return "n";
    case -6: return "\u00B5";
    case -3: return "m";
    case 3: return "k";
    case 6: return "M";
    case 9: return "G";
    case 12: return "T";
    default: return "";
  }
}

std::string format_si(double value, std::string_view unit, int significant) {
  if (!std::isfinite(value)) return fmt::format("{} {}", value, unit);
  if (value == 0.0) return fmt::format("0 {}", unit);
  if (unit == "%" || unit == "degC" || unit.empty()) return fmt::format("{:.{}g} {}", value, significant, unit);
  int exponent3 = static_cast<int>(std::floor(std::log10(std::fabs(value)) / 3.0)) * 3;
  exponent3 = std::clamp(exponent3, -12, 12);
  double scaled = value / std::pow(10.0, exponent3);
  return fmt::format("{:.{}g} {}{}", scaled, significant, si_prefix(exponent3), unit);
}

ShownUnit shown_unit(const Dimension& dimension, bool absolute_temperature, bool percent) {
  if (absolute_temperature) return ShownUnit{"degC", 1.0, kelvin_offset};
  if (dimension == Dimension::none()) return percent ? ShownUnit{"%", 100.0, 0.0} : ShownUnit{"1", 1.0, 0.0};
  return ShownUnit{dimension.symbol(), 1.0, 0.0};
}

ShownUnit ShownUnit::difference() const { return ShownUnit{symbol == "degC" ? "K" : symbol, scale, 0.0}; }

std::string ShownUnit::display(double si) const {
  if (symbol == "1") return fmt::format("{:.4g}", shown(si));
  // Kelvin without a prefix, like the degC values a difference is read beside.
  if (symbol == "K") return fmt::format("{:.4g} K", shown(si));
  return format_si(shown(si), symbol);
}

std::string display_quantity(const Quantity& quantity) {
  return shown_unit(quantity.dimension, quantity.absolute_temperature).display(quantity.value);
}

namespace {
// fmt's "{}" writes the shortest digits that read back as the same double (from_chars, as the parser reads).
std::string shortest(double value) { return fmt::format("{}", value); }

// degC text: the parser adds kelvin_offset to the number, so the number is a double whose sum with the offset is
// `kelvin` exactly — the one nearest to kelvin − offset (the plain difference can miss by a unit in the last
// place). Far from 0 degC (below about −120 degC, above about 1700 degC) some kelvin values are no such sum
// (the sum rounds to even on a tie); those are written in K, which reads back exactly.
std::string celsius_text(double kelvin) {
  double celsius = kelvin - kelvin_offset;
  for (int step = 0; step < 4 && celsius + kelvin_offset != kelvin; ++step) {
    celsius = std::nextafter(celsius, celsius + kelvin_offset < kelvin ? HUGE_VAL : -HUGE_VAL);
  }
  if (celsius + kelvin_offset != kelvin) return shortest(kelvin) + " K";
  return shortest(celsius) + " degC";
}
}  // namespace

std::string quantity_text(double value, const Dimension& dimension, bool absolute_temperature) {
  if (absolute_temperature) return celsius_text(value);
  std::string unit = dimension.symbol();
  if (dimension == Dimension::none() || unit.empty()) return shortest(value);
  return shortest(value) + " " + unit;
}

}  // namespace linkrise::netlist
