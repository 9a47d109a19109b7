#include "models/resistance_law.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <type_traits>

#include "models/number_text.h"

namespace linkrise::models {
namespace {

std::string number(double value) { return number_text(value); }

// "<law>: <field> = <value> <rule>", the one format of every parameter error.
std::string violation(const char* law, const char* field, double value, const std::string& rule) {
  return std::string(law) + ": " + field + " = " + number(value) + " " + rule;
}

bool positive(double value) { return finite_positive(value); }

}  // namespace

double smooth_ramp(double x, double half_width) {
  if (x <= -half_width) return 0.0;
  if (x >= half_width) return x;
  const double h = half_width;
  const double x2 = x * x;
  return 0.5 * x + 3.0 * h / 16.0 + 3.0 * x2 / (8.0 * h) - x2 * x2 / (16.0 * h * h * h);
}

double smooth_ramp_slope(double x, double half_width) {
  if (x <= -half_width) return 0.0;
  if (x >= half_width) return 1.0;
  const double h = half_width;
  return 0.5 + 3.0 * x / (4.0 * h) - x * x * x / (4.0 * h * h * h);
}

// ---------------------------------------------------------------------------------------------------------
Created<LinearTcr> LinearTcr::create(const LinearTcrParameters& p) {
  const char* law = "LinearTcr";
  if (!positive(p.reference_resistance))
    return violation(law, "reference_resistance", p.reference_resistance, "must be finite and > 0 ohm");
  if (!std::isfinite(p.temperature_coefficient) || std::abs(p.temperature_coefficient) >= 1.0)
    return violation(law, "temperature_coefficient", p.temperature_coefficient,
                     "must be finite with |tcr| < 1 /K");
  if (!positive(p.reference_kelvin))
    return violation(law, "reference_kelvin", p.reference_kelvin, "must be finite and > 0 K");
  if (!(p.floor_fraction > 0.0 && p.floor_fraction <= 0.25))
    return violation(law, "floor_fraction", p.floor_fraction, "must be in (0, 0.25]");
  return LinearTcr(p);
}

double LinearTcr::resistance(double kelvin) const {
  const auto& p = parameters_;
  const double floor = p.floor_fraction * p.reference_resistance;
  const double linear =
      p.reference_resistance * (1.0 + p.temperature_coefficient * (kelvin - p.reference_kelvin));
  return floor + smooth_ramp(linear - floor, floor);
}

double LinearTcr::derivative(double kelvin) const {
  const auto& p = parameters_;
  const double floor = p.floor_fraction * p.reference_resistance;
  const double linear =
      p.reference_resistance * (1.0 + p.temperature_coefficient * (kelvin - p.reference_kelvin));
  return smooth_ramp_slope(linear - floor, floor) * p.reference_resistance * p.temperature_coefficient;
}

// ---------------------------------------------------------------------------------------------------------
Created<NtcBeta> NtcBeta::create(const NtcBetaParameters& p) {
  const char* law = "NtcBeta";
  if (!positive(p.reference_resistance))
    return violation(law, "reference_resistance", p.reference_resistance, "must be finite and > 0 ohm");
  if (!positive(p.beta_kelvin))
    return violation(law, "beta_kelvin", p.beta_kelvin, "must be finite and > 0 K");
  if (!positive(p.reference_kelvin))
    return violation(law, "reference_kelvin", p.reference_kelvin, "must be finite and > 0 K");
  return NtcBeta(p);
}

double NtcBeta::resistance(double kelvin) const {
  const auto& p = parameters_;
  return p.reference_resistance * std::exp(p.beta_kelvin * (1.0 / kelvin - 1.0 / p.reference_kelvin));
}

double NtcBeta::derivative(double kelvin) const {
  return -parameters_.beta_kelvin / (kelvin * kelvin) * resistance(kelvin);
}

// ---------------------------------------------------------------------------------------------------------
Created<NtcSteinhartHart> NtcSteinhartHart::create(const NtcSteinhartHartParameters& p) {
  const char* law = "NtcSteinhartHart";
  if (!std::isfinite(p.a)) return violation(law, "a", p.a, "must be finite");
  if (!positive(p.b)) return violation(law, "b", p.b, "must be finite and > 0 /K");
  if (!(std::isfinite(p.c) && p.c >= 0.0))
    return violation(law, "c", p.c, "must be finite and >= 0 /K (C < 0 makes R(T) non-unique)");
  return NtcSteinhartHart(p);
}

namespace {
// ln R solving C·x³ + B·x + (A − 1/T) = 0.
double steinhart_hart_log_resistance(const NtcSteinhartHartParameters& p, double kelvin) {
  const double constant = p.a - 1.0 / kelvin;
  if (p.c == 0.0) return -constant / p.b;
  const double cubic_p = p.b / p.c;
  const double cubic_q = constant / p.c;
  const double root = std::sqrt(0.25 * cubic_q * cubic_q + cubic_p * cubic_p * cubic_p / 27.0);
  // Take the Cardano term whose two parts add rather than cancel; the other follows from u·v = −p/3.
  const double u = std::cbrt(-0.5 * cubic_q - std::copysign(root, cubic_q));
  return u - cubic_p / (3.0 * u);
}
}  // namespace

double NtcSteinhartHart::resistance(double kelvin) const {
  return std::exp(steinhart_hart_log_resistance(parameters_, kelvin));
}

double NtcSteinhartHart::derivative(double kelvin) const {
  const auto& p = parameters_;
  const double x = steinhart_hart_log_resistance(p, kelvin);
  return -std::exp(x) / (kelvin * kelvin * (p.b + 3.0 * p.c * x * x));
}

double NtcSteinhartHart::temperature(double ohm) const {
  const auto& p = parameters_;
  const double x = std::log(ohm);
  return 1.0 / (p.a + p.b * x + p.c * x * x * x);
}

NtcSteinhartHart steinhart_hart_from_beta(const NtcBeta& beta_law) {
  const auto& p = beta_law.parameters();
  // Valid by construction: B > 0 gives b = 1/B > 0, and c = 0.
  return std::get<NtcSteinhartHart>(NtcSteinhartHart::create({
      .a = 1.0 / p.reference_kelvin - std::log(p.reference_resistance) / p.beta_kelvin,
      .b = 1.0 / p.beta_kelvin,
      .c = 0.0,
  }));
}

// ---------------------------------------------------------------------------------------------------------
Created<PtcParametric> PtcParametric::create(const PtcParametricParameters& p) {
  const char* law = "PtcParametric";
  if (!positive(p.minimum_resistance))
    return violation(law, "minimum_resistance", p.minimum_resistance, "must be finite and > 0 ohm");
  if (!positive(p.reference_kelvin))
    return violation(law, "reference_kelvin", p.reference_kelvin, "must be finite and > 0 K");
  if (!positive(p.slope)) return violation(law, "slope", p.slope, "must be finite and > 0 /K");
  if (!(std::isfinite(p.maximum_resistance) && p.maximum_resistance > 2.0 * p.minimum_resistance))
    return violation(law, "maximum_resistance", p.maximum_resistance,
                     "must be finite and > 2*minimum_resistance = " + number(2.0 * p.minimum_resistance) +
                         " ohm");
  if (!positive(p.blend_width_kelvin))
    return violation(law, "blend_width_kelvin", p.blend_width_kelvin, "must be finite and > 0 K");
  // Both corner windows must end before T_ref so that R(T_ref) = 2·R_min stays exact.
  const double half_width_log = 0.5 * p.slope * p.blend_width_kelvin;
  const double room = std::min(std::numbers::ln2,
                               std::log(p.maximum_resistance / (2.0 * p.minimum_resistance)));
  if (half_width_log > room)
    return violation(law, "blend_width_kelvin", p.blend_width_kelvin,
                     "must be <= " + number(2.0 * room / p.slope) +
                         " K so that the corner blends stay clear of reference_kelvin");
  if (p.cold_resistance != 0.0) {
    // Between R_min and R(T_ref) = 2·R_min: the cold part of the curve lies below the switch point.
    if (!(std::isfinite(p.cold_resistance) && p.cold_resistance > p.minimum_resistance &&
          p.cold_resistance < 2.0 * p.minimum_resistance))
      return violation(law, "cold_resistance", p.cold_resistance,
                       "must lie between minimum_resistance = " + number(p.minimum_resistance) + " ohm and twice it");
    const double half = 0.5 * p.blend_width_kelvin;
    const double knee = p.reference_kelvin - std::numbers::ln2 / p.slope;
    if (!(p.minimum_kelvin - half >= kelvin_at_25_celsius && p.minimum_kelvin + half <= knee - half))
      return violation(law, "minimum_kelvin", p.minimum_kelvin,
                       "must lie between " + number(kelvin_at_25_celsius + half) + " K and " + number(knee - 2.0 * half) +
                           " K (25 degC and the knee, each with its corner clear)");
  }
  return PtcParametric(p);
}

PtcParametric::PtcParametric(const PtcParametricParameters& p)
    : parameters_(p),
      log_minimum_(std::log(p.minimum_resistance)),
      log_maximum_(std::log(p.maximum_resistance)),
      knee_kelvin_(p.reference_kelvin - std::numbers::ln2 / p.slope),
      half_width_log_(0.5 * p.slope * p.blend_width_kelvin),
      cold_slope_(p.cold_resistance > 0.0 ? std::log(p.cold_resistance / p.minimum_resistance) /
                                                (p.minimum_kelvin - kelvin_at_25_celsius)
                                          : 0.0) {}

double PtcParametric::saturation_kelvin() const {
  return knee_kelvin_ + (log_maximum_ - log_minimum_) / parameters_.slope;
}

double PtcParametric::log_resistance(double kelvin, double* log_slope) const {
  const double u = parameters_.slope * (kelvin - knee_kelvin_);
  // The cold (NTC-like) region: zero above T_Rmin's corner, so it never meets the rise's corners.
  double cold = 0.0, cold_slope = 0.0;
  if (cold_slope_ > 0.0) {
    const double c = cold_slope_ * (parameters_.minimum_kelvin - kelvin), h = 0.5 * cold_slope_ * parameters_.blend_width_kelvin;
    cold = smooth_ramp(c, h);
    cold_slope = -cold_slope_ * smooth_ramp_slope(c, h);
  }
  const double rise = log_minimum_ + cold + smooth_ramp(u, half_width_log_);
  const double headroom = log_maximum_ - rise;
  *log_slope = smooth_ramp_slope(headroom, half_width_log_) *
               (smooth_ramp_slope(u, half_width_log_) * parameters_.slope + cold_slope);
  return log_maximum_ - smooth_ramp(headroom, half_width_log_);
}

double PtcParametric::resistance(double kelvin) const {
  double log_slope;
  return std::exp(log_resistance(kelvin, &log_slope));
}

double PtcParametric::derivative(double kelvin) const {
  double log_slope;
  return std::exp(log_resistance(kelvin, &log_slope)) * log_slope;
}

double PtcParametric::piecewise_resistance(double kelvin) const {
  const double rise = log_minimum_ + std::max(0.0, parameters_.slope * (kelvin - knee_kelvin_));
  return std::exp(std::min(rise, log_maximum_));
}

// ---------------------------------------------------------------------------------------------------------
Created<TableLogLinear> TableLogLinear::create(std::vector<TablePoint> points) {
  const char* law = "TableLogLinear";
  if (points.size() < 2)
    return violation(law, "points.size()", static_cast<double>(points.size()), "must be >= 2");
  for (std::size_t i = 0; i < points.size(); ++i) {
    const std::string index = "[" + std::to_string(i) + "]";
    if (!positive(points[i].kelvin))
      return violation(law, ("points" + index + ".kelvin").c_str(), points[i].kelvin,
                       "must be finite and > 0 K");
    if (!positive(points[i].ohm))
      return violation(law, ("points" + index + ".ohm").c_str(), points[i].ohm,
                       "must be finite and > 0 ohm");
    if (i > 0 && !(points[i].kelvin > points[i - 1].kelvin))
      return violation(law, ("points" + index + ".kelvin").c_str(), points[i].kelvin,
                       "must be > points[" + std::to_string(i - 1) + "].kelvin = " +
                           number(points[i - 1].kelvin) + " K (strictly increasing)");
  }
  return TableLogLinear(std::move(points));
}

TableLogLinear::TableLogLinear(std::vector<TablePoint> points) : points_(std::move(points)) {
  log_ohm_.reserve(points_.size());
  for (const auto& point : points_) log_ohm_.push_back(std::log(point.ohm));
}

ResistanceAndSlope TableLogLinear::evaluate(double kelvin) const {
  // Held constant outside the table (see the header for why).
  if (kelvin < points_.front().kelvin) return {points_.front().ohm, 0.0};
  if (kelvin > points_.back().kelvin) return {points_.back().ohm, 0.0};
  // Segment [i, i + 1] with T_i <= kelvin < T_{i+1}; the last point belongs to the last segment.
  auto upper = std::upper_bound(points_.begin(), points_.end(), kelvin,
                                [](double t, const TablePoint& point) { return t < point.kelvin; });
  if (upper == points_.end()) --upper;
  const std::size_t i = static_cast<std::size_t>(upper - points_.begin()) - 1;
  const double span = points_[i + 1].kelvin - points_[i].kelvin;
  const double log_slope = (log_ohm_[i + 1] - log_ohm_[i]) / span;
  const double resistance = std::exp(log_ohm_[i] + log_slope * (kelvin - points_[i].kelvin));
  return {resistance, resistance * log_slope};
}

double TableLogLinear::resistance(double kelvin) const { return evaluate(kelvin).resistance; }
double TableLogLinear::derivative(double kelvin) const { return evaluate(kelvin).derivative; }

// ---------------------------------------------------------------------------------------------------------
double ResistanceLaw::resistance(double kelvin) const {
  return std::visit([kelvin](const auto& law) { return law.resistance(kelvin); }, law_);
}

double ResistanceLaw::derivative(double kelvin) const {
  return std::visit([kelvin](const auto& law) { return law.derivative(kelvin); }, law_);
}

ResistanceAndSlope ResistanceLaw::evaluate(double kelvin) const {
  return {resistance(kelvin), derivative(kelvin)};
}

Created<ResistanceLaw> make_resistance_law(const ResistanceLawParameters& parameters) {
  return std::visit(
      [](const auto& specific) -> Created<ResistanceLaw> {
        using Type = std::decay_t<decltype(specific)>;
        auto created = [&] {
          if constexpr (std::is_same_v<Type, LinearTcrParameters>) return LinearTcr::create(specific);
          else if constexpr (std::is_same_v<Type, NtcBetaParameters>) return NtcBeta::create(specific);
          else if constexpr (std::is_same_v<Type, NtcSteinhartHartParameters>)
            return NtcSteinhartHart::create(specific);
          else if constexpr (std::is_same_v<Type, PtcParametricParameters>)
            return PtcParametric::create(specific);
          else return TableLogLinear::create(specific);
        }();
        if (auto* error = std::get_if<std::string>(&created)) return *error;
        return std::visit(
            [](auto& value) -> Created<ResistanceLaw> {
              if constexpr (std::is_same_v<std::decay_t<decltype(value)>, std::string>) return value;
              else return ResistanceLaw(std::move(value));
            },
            created);
      },
      parameters);
}

}  // namespace linkrise::models
