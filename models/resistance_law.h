// Temperature → resistance laws for pre-charge resistor technologies.
//
// Every law gives the resistance R(T) and its analytic derivative dR/dT, because the solver builds an
// analytic Jacobian. Units are SI throughout: ohm, kelvin, 1/K. Temperatures are absolute (kelvin > 0);
// the laws do not check that precondition at run time (it is the caller's state, not a parameter).
//
// Laws are created only through their `create` factories, which validate the parameters and return either
// the law or an error message naming the field, its value and the rule it breaks. A law object that exists
// is therefore valid, and evaluation never fails.
#pragma once

#include <string>
#include <type_traits>
#include <utility>
#include <variant>
#include <vector>

namespace linkrise::models {

// 25 °C, the reference temperature of resistor and thermistor data sheets (IEC 60539-1, IEC 60738-1).
inline constexpr double kelvin_at_25_celsius = 298.15;

// Either a valid value or an error message; the expected-like return type of every factory here.
template <typename Value>
using Created = std::variant<Value, std::string>;

struct ResistanceAndSlope {
  double resistance;  // ohm
  double derivative;  // dR/dT, ohm/K
};

// C²-smooth version of max(0, x) that is exactly max(0, x) for |x| ≥ half_width.
// Inside the window (h = half_width) it is x/2 + 3h/16 + 3x²/(8h) − x⁴/(16h³): x/2 plus the even quartic that
// matches value, slope and curvature of the sharp ramp at both window edges, so the join is C² (not C³).
// It is convex and non-decreasing; its largest departure from max(0, x) is 3h/16, at x = 0.
// Exposed because the laws below are defined in terms of it.
double smooth_ramp(double x, double half_width);
double smooth_ramp_slope(double x, double half_width);

// ---------------------------------------------------------------------------------------------------------
// Linear temperature coefficient (metal film, wirewound, thick film, cable):
//   R = R_floor + ramp(R_lin − R_floor),  R_lin = R_ref·(1 + tcr·(T − T_ref)),  R_floor = floor_fraction·R_ref,
// with ramp = smooth_ramp of half-width R_floor. So R = R_lin exactly while R_lin ≥ 2·R_floor, and R never
// falls below R_floor: a linear law extrapolated far enough (T − T_ref ≤ −1/tcr) would otherwise reach zero
// or go negative, which would divide by zero in the circuit. The floor is smooth (C²) so the solver sees no kink.
struct LinearTcrParameters {
  double reference_resistance;           // R_ref, ohm, > 0
  double temperature_coefficient;        // tcr, 1/K, any sign, |tcr| < 1
  double reference_kelvin = kelvin_at_25_celsius;  // T_ref, K, > 0
  double floor_fraction = 1e-3;          // R_floor / R_ref, in (0, 0.25]
};

class LinearTcr {
 public:
  static Created<LinearTcr> create(const LinearTcrParameters& parameters);
  double resistance(double kelvin) const;
  double derivative(double kelvin) const;
  const LinearTcrParameters& parameters() const { return parameters_; }

 private:
  explicit LinearTcr(const LinearTcrParameters& parameters) : parameters_(parameters) {}
  LinearTcrParameters parameters_;
};

// ---------------------------------------------------------------------------------------------------------
// NTC thermistor, B-parameter equation (IEC 60539-1 terms: zero-power resistance R25, B value):
//   R = R0·exp[B·(1/T − 1/T0)],   dR/dT = −B/T²·R.
struct NtcBetaParameters {
  double reference_resistance;                     // R0 (R25 when T0 = 298.15 K), ohm, > 0
  double beta_kelvin;                              // B, K, > 0
  double reference_kelvin = kelvin_at_25_celsius;  // T0, K, > 0
};

class NtcBeta {
 public:
  static Created<NtcBeta> create(const NtcBetaParameters& parameters);
  double resistance(double kelvin) const;
  double derivative(double kelvin) const;
  const NtcBetaParameters& parameters() const { return parameters_; }

 private:
  explicit NtcBeta(const NtcBetaParameters& parameters) : parameters_(parameters) {}
  NtcBetaParameters parameters_;
};

// ---------------------------------------------------------------------------------------------------------
// NTC thermistor, Steinhart–Hart equation: 1/T = A + B·x + C·x³ with x = ln(R / 1 Ω).
// Solved for x in closed form (Cardano): with p = B/C, q = (A − 1/T)/C the depressed cubic x³ + p·x + q = 0
// has, for B > 0 and C ≥ 0, exactly one real root, x = u − p/(3u) with u = cbrt(−q/2 − sign(q)·√(q²/4 + p³/27))
// (this branch avoids cancellation). C = 0 reduces to x = (1/T − A)/B.
//   dR/dT = −R / (T²·(B + 3·C·x²)).
// C < 0 is rejected: then 1/T(x) is not monotone and R(T) is not unique.
struct NtcSteinhartHartParameters {
  double a;  // A, 1/K
  double b;  // B, 1/K, > 0
  double c;  // C, 1/K, ≥ 0
};

class NtcSteinhartHart {
 public:
  static Created<NtcSteinhartHart> create(const NtcSteinhartHartParameters& parameters);
  double resistance(double kelvin) const;
  double derivative(double kelvin) const;
  // The forward form of the equation, T from R; used to check the inversion.
  double temperature(double ohm) const;
  const NtcSteinhartHartParameters& parameters() const { return parameters_; }

 private:
  explicit NtcSteinhartHart(const NtcSteinhartHartParameters& parameters) : parameters_(parameters) {}
  NtcSteinhartHartParameters parameters_;
};

// The B-parameter equation is exactly Steinhart–Hart with C = 0, B_SH = 1/B, A = 1/T0 − ln(R0)/B.
NtcSteinhartHart steinhart_hart_from_beta(const NtcBeta& beta_law);

// ---------------------------------------------------------------------------------------------------------
// PTC thermistor (IEC 60738-1 terms: minimum resistance R_min, reference (switch) temperature T_ref at which
// R = 2·R_min, temperature coefficient α = d ln R / dT above T_ref, and a maximum resistance R_max).
//
// Sharp piecewise form (continuous, corners at T_knee and T_saturation):
//   ln R_sharp = min( ln R_min + max(0, α·(T − T_knee)),  ln R_max ),  T_knee = T_ref − ln2/α,
// i.e. R = R_min below the knee, R = 2·R_min·exp[α·(T − T_ref)] on the rise, R = R_max above saturation.
// (Putting the knee at T_ref itself would make R jump from R_min to 2·R_min there.)
//
// Smooth form used for simulation (C², so the right-hand side and its Jacobian are continuous):
//   u = α·(T − T_knee),  h = α·w/2  (w = blend_width_kelvin, the temperature width of each corner),
//   L1 = ln R_min + smooth_ramp(u, h),
//   ln R = ln R_max − smooth_ramp(ln R_max − L1, h).
// It equals the sharp form exactly outside the two corner windows (each w wide in temperature, centred on
// T_knee and T_saturation); inside a window ln R differs by at most 3h/16, i.e. R by at most a factor
// exp(3·α·w/32) (≈ 3.8 % for α = 0.2 /K, w = 2 K). The factory requires the windows to leave T_ref on the
// pure exponential, so R(T_ref) = 2·R_min holds exactly.
//
// Below the knee a real PTC first falls as it warms (an NTC region from R25 down to R_min at T_Rmin, IEC 60738-1
// terms). With a cold resistance R25 > R_min and T_Rmin given, the law has that region too:
//   ln R gains smooth_ramp(s·(T_Rmin − T), h_c),  s = ln(R25/R_min)/(T_Rmin − 25 °C),  h_c = s·w/2,
// so R(25 °C) = R25 and R(T_Rmin) = R_min exactly when 25 °C and T_Rmin lie outside the corner (w wide at T_Rmin).
// The cold corner must end before the knee's corner begins. Without it (cold_resistance 0) the law is flat below
// the knee; if a data sheet gives only R25, using it as R_min is the usual approximation, which understates the
// current once the part has warmed to T_Rmin.
struct PtcParametricParameters {
  double minimum_resistance;        // R_min, ohm, > 0
  double reference_kelvin;          // T_ref, K, > 0: R(T_ref) = 2·R_min
  double slope;                     // α, 1/K, > 0
  double maximum_resistance;        // R_max, ohm, > 2·R_min
  double blend_width_kelvin = 2.0;  // w, K, > 0; small enough that both corners stay clear of T_ref
  double cold_resistance = 0.0;     // R25, ohm; 0: no cold region, else in (R_min, 2·R_min)
  double minimum_kelvin = 0.0;      // T_Rmin, K, above 25 °C + w/2 and below the knee's corner (with R25)
};

class PtcParametric {
 public:
  static Created<PtcParametric> create(const PtcParametricParameters& parameters);
  double resistance(double kelvin) const;
  double derivative(double kelvin) const;
  // The sharp piecewise form above, for comparison only (its derivative jumps at the corners).
  double piecewise_resistance(double kelvin) const;
  double knee_kelvin() const { return knee_kelvin_; }
  double saturation_kelvin() const;
  const PtcParametricParameters& parameters() const { return parameters_; }

 private:
  explicit PtcParametric(const PtcParametricParameters& parameters);
  double log_resistance(double kelvin, double* log_slope) const;

  PtcParametricParameters parameters_;
  double log_minimum_;
  double log_maximum_;
  double knee_kelvin_;
  double half_width_log_;  // h = α·w/2
  double cold_slope_ = 0.0;  // s = ln(R25/R_min)/(T_Rmin − 25 °C), 1/K; 0 without a cold region
};

// ---------------------------------------------------------------------------------------------------------
// Tabulated law, interpolated linearly in ln R between points (T_i, R_i):
//   ln R = ln R_i + (ln R_{i+1} − ln R_i)·(T − T_i)/(T_{i+1} − T_i),  dR/dT = R·(ln R_{i+1} − ln R_i)/(T_{i+1} − T_i).
// An exact exponential between two points is therefore reproduced exactly. Outside the table R is held at the
// end value (derivative 0): extending the end slope would let a PTC or NTC table run away to absurd values.
// The derivative jumps at interior points (the law is only C⁰); use a dense table where that matters.
// At an interior point the derivative of the segment to the right is returned.
struct TablePoint {
  double kelvin;  // T_i, K, > 0, strictly increasing
  double ohm;     // R_i, ohm, > 0
};

class TableLogLinear {
 public:
  static Created<TableLogLinear> create(std::vector<TablePoint> points);  // at least 2 points
  double resistance(double kelvin) const;
  double derivative(double kelvin) const;
  const std::vector<TablePoint>& points() const { return points_; }

 private:
  explicit TableLogLinear(std::vector<TablePoint> points);
  ResistanceAndSlope evaluate(double kelvin) const;

  std::vector<TablePoint> points_;
  std::vector<double> log_ohm_;
};

// ---------------------------------------------------------------------------------------------------------
// Any of the laws above, behind one value type.
class ResistanceLaw {
 public:
  using Law = std::variant<LinearTcr, NtcBeta, NtcSteinhartHart, PtcParametric, TableLogLinear>;

  // Implicit on purpose: every valid law is a ResistanceLaw.
  template <typename Specific>
    requires std::is_constructible_v<Law, Specific> && (!std::is_same_v<std::decay_t<Specific>, ResistanceLaw>)
  ResistanceLaw(Specific law) : law_(std::move(law)) {}  // NOLINT(google-explicit-constructor)

  double resistance(double kelvin) const;
  double derivative(double kelvin) const;
  ResistanceAndSlope evaluate(double kelvin) const;
  const Law& law() const { return law_; }

 private:
  Law law_;
};

// Validating factory over all laws, for configuration readers.
using ResistanceLawParameters = std::variant<LinearTcrParameters, NtcBetaParameters,
                                             NtcSteinhartHartParameters, PtcParametricParameters,
                                             std::vector<TablePoint>>;
Created<ResistanceLaw> make_resistance_law(const ResistanceLawParameters& parameters);

}  // namespace linkrise::models
