// Checks of the resistance laws against their published equations (sources named beside each check;
// see docs/references.md). Values tagged [derived] were computed by hand/independently from the named
// closed form; [mem] means recalled, source not re-read.
#include "models/resistance_law.h"

#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

namespace linkrise::models {
namespace {

template <typename Law, typename Parameters>
Law made(const Parameters& parameters) {
  auto created = Law::create(parameters);
  if (auto* error = std::get_if<std::string>(&created)) ADD_FAILURE() << *error;
  return std::get<Law>(created);
}

template <typename Law, typename Parameters>
std::string refused(const Parameters& parameters) {
  auto created = Law::create(parameters);
  if (std::holds_alternative<Law>(created)) {
    ADD_FAILURE() << "parameters were accepted";
    return {};
  }
  return std::get<std::string>(created);
}

// Central difference; truncation error ~h²·R'''/6 and round-off ~1e-16·R/h, both far below the tolerances
// used at h = 1e-5 K even inside the narrow blend windows, where R''' is large relative to R'.
double central_difference(const std::function<double(double)>& f, double x, double h) {
  return (f(x + h) - f(x - h)) / (2.0 * h);
}

void expect_derivative_matches(const ResistanceLaw& law, double kelvin, double relative_tolerance) {
  const double numeric =
      central_difference([&](double t) { return law.resistance(t); }, kelvin, 1e-5);
  const double analytic = law.derivative(kelvin);
  EXPECT_NEAR(analytic, numeric, relative_tolerance * std::abs(numeric) + 1e-12)
      << "at " << kelvin << " K";
}

// --- Linear TCR ---------------------------------------------------------------------------------------

TEST(LinearTcr, LinearLawAtSeventyFiveCelsius) {
  // R = R_ref·(1 + tcr·ΔT) [R-TCR]; 10 Ω, 0.00393 /K, +50 K → 11.965 Ω [derived].
  const auto law = made<LinearTcr>(LinearTcrParameters{.reference_resistance = 10.0,
                                                       .temperature_coefficient = 0.00393});
  EXPECT_NEAR(law.resistance(348.15), 11.965, 1e-12);
  EXPECT_NEAR(law.derivative(348.15), 10.0 * 0.00393, 1e-15);
  EXPECT_DOUBLE_EQ(law.resistance(kelvin_at_25_celsius), 10.0);
}

TEST(LinearTcr, FloorKeepsResistancePositiveAndSmooth) {
  // tcr = 0.004 /K would reach zero at 48.15 K; the floor (1e-3·R_ref) must hold it positive.
  const auto law = made<LinearTcr>(LinearTcrParameters{.reference_resistance = 10.0,
                                                       .temperature_coefficient = 0.004});
  const double floor = 0.01;
  for (double kelvin = 1.0; kelvin < 60.0; kelvin += 0.25) EXPECT_GE(law.resistance(kelvin), floor);
  EXPECT_DOUBLE_EQ(law.resistance(1.0), floor);
  // Exactly linear once R_lin >= 2·floor, i.e. from 48.65 K up.
  EXPECT_NEAR(law.resistance(100.0), 10.0 * (1.0 + 0.004 * (100.0 - 298.15)), 1e-12);
  for (double kelvin : {48.2, 48.3, 48.5, 60.0, 300.0}) expect_derivative_matches(law, kelvin, 1e-6);
}

TEST(LinearTcr, RejectsBadParameters) {
  const auto error = refused<LinearTcr>(
      LinearTcrParameters{.reference_resistance = -1.0, .temperature_coefficient = 0.0});
  EXPECT_NE(error.find("reference_resistance"), std::string::npos) << error;
  EXPECT_NE(error.find("-1"), std::string::npos) << error;
  EXPECT_NE(refused<LinearTcr>(LinearTcrParameters{.reference_resistance = 1.0,
                                                   .temperature_coefficient = 0.0,
                                                   .floor_fraction = 0.0})
                .find("floor_fraction"),
            std::string::npos);
}

// --- NTC, B-parameter equation (IEC 60539-1 terms; equation per [R-NTC-beta]) -----------------------

TEST(NtcBeta, BParameterEquationAtSeveralTemperatures) {
  // R25 = 10 kΩ, B = 3950 K (a common NTC grade [practice]). Expected values from
  // R = R25·exp[B(1/T − 1/298.15)] evaluated independently [derived].
  const auto law = made<NtcBeta>(NtcBetaParameters{.reference_resistance = 10e3, .beta_kelvin = 3950.0});
  EXPECT_NEAR(law.resistance(273.15), 33620.6037, 1e-3);   // 0 °C
  EXPECT_NEAR(law.resistance(298.15), 10000.0, 1e-9);      // 25 °C, by definition of R25
  EXPECT_NEAR(law.resistance(323.15), 3588.18258, 1e-4);   // 50 °C
  EXPECT_NEAR(law.resistance(358.15), 1086.67077, 1e-4);   // 85 °C
  EXPECT_NEAR(law.resistance(373.15), 697.519773, 1e-5);   // 100 °C
}

TEST(NtcBeta, BValueRecoveredFromTwoPoints) {
  // IEC 60539-1 defines B from two zero-power resistances: B = ln(R1/R2)/(1/T1 − 1/T2) [R-NTC-beta].
  const auto law = made<NtcBeta>(NtcBetaParameters{.reference_resistance = 5e3, .beta_kelvin = 3435.0});
  const double t1 = 298.15, t2 = 358.15;
  const double beta = std::log(law.resistance(t1) / law.resistance(t2)) / (1.0 / t1 - 1.0 / t2);
  EXPECT_NEAR(beta, 3435.0, 3435.0 * 1e-12);
}

TEST(NtcBeta, RejectsNonPositiveBeta) {
  const auto error =
      refused<NtcBeta>(NtcBetaParameters{.reference_resistance = 10e3, .beta_kelvin = 0.0});
  EXPECT_NE(error.find("beta_kelvin = 0"), std::string::npos) << error;
}

// --- Steinhart–Hart (Steinhart & Hart 1968 [mem], [R-Steinhart-Hart]) -------------------------------

TEST(NtcSteinhartHart, BetaIdentityWithZeroC) {
  // Exact identity: C = 0, B_SH = 1/B, A = 1/T0 − ln(R0)/B ([R-Steinhart-Hart]) → same R(T) to 1e-12.
  const auto beta = made<NtcBeta>(NtcBetaParameters{.reference_resistance = 10e3, .beta_kelvin = 3950.0});
  const auto sh = steinhart_hart_from_beta(beta);
  EXPECT_DOUBLE_EQ(sh.parameters().c, 0.0);
  EXPECT_NEAR(sh.parameters().b, 1.0 / 3950.0, 1e-18);
  EXPECT_NEAR(sh.parameters().a, 1.0 / 298.15 - std::log(10e3) / 3950.0, 1e-18);
  for (double kelvin = 233.15; kelvin <= 423.15; kelvin += 5.0) {
    EXPECT_NEAR(sh.resistance(kelvin) / beta.resistance(kelvin), 1.0, 1e-12) << kelvin;
    EXPECT_NEAR(sh.derivative(kelvin) / beta.derivative(kelvin), 1.0, 1e-12) << kelvin;
  }
}

// A commonly quoted coefficient set for a 10 kΩ NTC [mem, R-Steinhart-Hart]; only its shape matters for these checks.
constexpr NtcSteinhartHartParameters quoted_fit{
    .a = 1.009249522e-3, .b = 2.378405444e-4, .c = 2.019202697e-7};

TEST(NtcSteinhartHart, CardanoInversionRoundTrip) {
  // Forward equation 1/T = A + B ln R + C (ln R)³ applied to the inverted R must return T.
  const auto law = made<NtcSteinhartHart>(quoted_fit);
  for (double kelvin = 223.15; kelvin <= 473.15; kelvin += 2.5)
    EXPECT_NEAR(law.temperature(law.resistance(kelvin)), kelvin, kelvin * 1e-12);
}

TEST(NtcSteinhartHart, CardanoAgreesWithBisection) {
  // Independent root of the cubic by bisection on ln R (monotone for B > 0, C >= 0).
  const auto law = made<NtcSteinhartHart>(quoted_fit);
  for (double kelvin : {273.15, 298.15, 373.15}) {
    double low = -10.0, high = 40.0;
    for (int i = 0; i < 200; ++i) {
      const double middle = 0.5 * (low + high);
      const double residual = quoted_fit.a + quoted_fit.b * middle +
                              quoted_fit.c * middle * middle * middle - 1.0 / kelvin;
      (residual > 0.0 ? high : low) = middle;
    }
    EXPECT_NEAR(std::log(law.resistance(kelvin)), low, 1e-12) << kelvin;
  }
  // Bisection values computed independently in double precision [derived]: 27949.62 Ω at 0 °C,
  // 9876.64 Ω at 25 °C (the fit is ~1 % off a nominal 10 kΩ), 864.136 Ω at 100 °C.
  EXPECT_NEAR(law.resistance(273.15), 27949.621, 1e-2);
  EXPECT_NEAR(law.resistance(298.15), 9876.6445, 1e-3);
  EXPECT_NEAR(law.resistance(373.15), 864.13625, 1e-4);
}

TEST(NtcSteinhartHart, RejectsNegativeC) {
  auto parameters = quoted_fit;
  parameters.c = -1e-7;
  const auto error = refused<NtcSteinhartHart>(parameters);
  EXPECT_NE(error.find("c = -1e-07"), std::string::npos) << error;
}

// --- PTC (IEC 60738-1 terms [mem], [R-PTC]) ---------------------------------------------------------

// R_min 100 Ω, switch at 120 °C, 20 %/K, R_max 1 MΩ, 2 K blend (illustrative parameters).
constexpr PtcParametricParameters ptc_parameters{.minimum_resistance = 100.0,
                                                 .reference_kelvin = 393.15,
                                                 .slope = 0.2,
                                                 .maximum_resistance = 1e6};

TEST(PtcParametric, ReferenceTemperatureIsTwiceMinimum) {
  // IEC 60738-1 reference (switch) temperature: R(T_ref) = 2·R_min [mem; glossaries agree].
  const auto law = made<PtcParametric>(ptc_parameters);
  EXPECT_NEAR(law.resistance(393.15), 200.0, 200.0 * 1e-12);
}

TEST(PtcParametric, BelowAndAboveSwitchTemperature) {
  const auto law = made<PtcParametric>(ptc_parameters);
  // Well below the knee (T_knee = T_ref − ln2/α = 389.68 K): R = R_min.
  EXPECT_NEAR(law.resistance(298.15), 100.0, 1e-10);
  EXPECT_NEAR(law.resistance(380.0), 100.0, 1e-10);
  // On the rise R = 2·R_min·exp[α(T − T_ref)]: +10 K → 200·e² = 1477.811 Ω [derived].
  EXPECT_NEAR(law.resistance(403.15), 1477.8112, 1e-3);
  // α = d ln R/dT there (IEC 60738-1 definition of the temperature coefficient).
  EXPECT_NEAR(law.derivative(403.15) / law.resistance(403.15), 0.2, 1e-12);
  // Far above saturation: R_max.
  EXPECT_NEAR(law.resistance(500.0), 1e6, 1e-4);
}

TEST(PtcParametric, MatchesPiecewiseAwayFromCornersAndBoundedInside) {
  const auto law = made<PtcParametric>(ptc_parameters);
  const double width = ptc_parameters.blend_width_kelvin;
  // Documented bound inside a corner window: |ln R − ln R_sharp| <= 3h/16, h = α·w/2.
  const double bound = 3.0 * (0.5 * ptc_parameters.slope * width) / 16.0;
  for (double kelvin = 300.0; kelvin <= 480.0; kelvin += 0.05) {
    const double gap = std::abs(std::log(law.resistance(kelvin) / law.piecewise_resistance(kelvin)));
    const bool near_corner = std::abs(kelvin - law.knee_kelvin()) < 0.5 * width ||
                             std::abs(kelvin - law.saturation_kelvin()) < 0.5 * width;
    if (near_corner)
      EXPECT_LE(gap, bound * (1.0 + 1e-9)) << kelvin;
    else
      EXPECT_LE(gap, 1e-12) << kelvin;
  }
  // The bound is reached at the corner itself (ramp(0) = 3h/16).
  EXPECT_NEAR(std::log(law.resistance(law.knee_kelvin()) / 100.0), bound, 1e-12);
}

TEST(PtcParametric, SlopeIsContinuousAcrossWindowEdges) {
  // C¹ (in fact C²): the derivative just inside and just outside each window edge agree.
  const auto law = made<PtcParametric>(ptc_parameters);
  const double half = 0.5 * ptc_parameters.blend_width_kelvin;
  for (double edge : {law.knee_kelvin() - half, law.knee_kelvin() + half,
                      law.saturation_kelvin() - half, law.saturation_kelvin() + half}) {
    const double left = law.derivative(edge - 1e-7);
    const double right = law.derivative(edge + 1e-7);
    EXPECT_NEAR(left, right, 1e-5 * std::max(1.0, std::abs(right))) << edge;
  }
}

TEST(PtcParametric, RejectsBadParameters) {
  auto parameters = ptc_parameters;
  parameters.maximum_resistance = 150.0;
  auto error = refused<PtcParametric>(parameters);
  EXPECT_NE(error.find("maximum_resistance = 150"), std::string::npos) << error;
  parameters = ptc_parameters;
  parameters.blend_width_kelvin = 10.0;  // α·w/2 = 1 > ln 2: the knee blend would cover T_ref
  error = refused<PtcParametric>(parameters);
  EXPECT_NE(error.find("blend_width_kelvin = 10"), std::string::npos) << error;
}

// R25 and R_min apart (IEC 60738-1 terms [mem], [R-PTC]): 130 Ω at 25 °C falling to R_min = 100 Ω at 70 °C.
TEST(PtcParametric, ColdRegionRunsFromR25DownToTheMinimumResistance) {
  auto parameters = ptc_parameters;
  parameters.cold_resistance = 130.0;
  parameters.minimum_kelvin = 343.15;
  const auto law = made<PtcParametric>(parameters);
  EXPECT_NEAR(law.resistance(298.15), 130.0, 130.0 * 1e-12);
  EXPECT_NEAR(law.resistance(343.15 + 1.0 + 1e-9), 100.0, 1e-9);  // just past the corner at T_Rmin
  EXPECT_NEAR(law.resistance(393.15), 200.0, 200.0 * 1e-12);     // the switch point is unchanged
  // Log-linear in between [derived]: halfway (320.65 K) ln R = ln 100 + ln(1.3)/2.
  EXPECT_NEAR(law.resistance(320.65), 100.0 * std::sqrt(1.3), 1e-9);
  // Falling through the cold region, with the slope the law states.
  EXPECT_LT(law.derivative(320.65), 0.0);
  EXPECT_NEAR(law.derivative(320.65) / law.resistance(320.65), -std::log(1.3) / 45.0, 1e-12);
  parameters.cold_resistance = 250.0;  // above 2·R_min: not a cold resistance
  EXPECT_NE(refused<PtcParametric>(parameters).find("cold_resistance = 250"), std::string::npos);
  parameters.cold_resistance = 130.0;
  parameters.minimum_kelvin = 389.0;  // on the knee's corner
  EXPECT_NE(refused<PtcParametric>(parameters).find("minimum_kelvin = 389"), std::string::npos);
}

// --- Log-linear table -------------------------------------------------------------------------------

TEST(TableLogLinear, ReproducesExponentialBetweenPoints) {
  // Points sampled from R = 5·exp[0.03·(T − 300)]: interpolation linear in ln R is exact for it.
  auto exact = [](double kelvin) { return 5.0 * std::exp(0.03 * (kelvin - 300.0)); };
  const auto law = made<TableLogLinear>(std::vector<TablePoint>{
      {300.0, exact(300.0)}, {320.0, exact(320.0)}, {350.0, exact(350.0)}});
  for (double kelvin = 300.0; kelvin <= 350.0; kelvin += 0.37) {
    EXPECT_NEAR(law.resistance(kelvin) / exact(kelvin), 1.0, 1e-12) << kelvin;
    EXPECT_NEAR(law.derivative(kelvin) / (0.03 * exact(kelvin)), 1.0, 1e-12) << kelvin;
  }
}

TEST(TableLogLinear, HeldConstantOutsideTable) {
  const auto law = made<TableLogLinear>(std::vector<TablePoint>{{300.0, 10.0}, {400.0, 1000.0}});
  EXPECT_DOUBLE_EQ(law.resistance(250.0), 10.0);
  EXPECT_DOUBLE_EQ(law.resistance(450.0), 1000.0);
  EXPECT_DOUBLE_EQ(law.derivative(250.0), 0.0);
  EXPECT_NEAR(law.resistance(350.0), 100.0, 1e-10);  // geometric mean at the midpoint
}

TEST(TableLogLinear, RejectsNonIncreasingTemperatures) {
  const auto error = refused<TableLogLinear>(
      std::vector<TablePoint>{{300.0, 10.0}, {350.0, 20.0}, {350.0, 30.0}});
  EXPECT_NE(error.find("points[2].kelvin = 350"), std::string::npos) << error;
  EXPECT_NE(refused<TableLogLinear>(std::vector<TablePoint>{{300.0, 10.0}, {350.0, 0.0}})
                .find("points[1].ohm"),
            std::string::npos);
}

// --- All laws: analytic derivative vs central finite differences -----------------------------------

TEST(ResistanceLaw, EveryDerivativeMatchesFiniteDifferences) {
  std::vector<ResistanceLaw> laws;
  laws.push_back(made<LinearTcr>(
      LinearTcrParameters{.reference_resistance = 47.0, .temperature_coefficient = 2e-4}));
  laws.push_back(made<NtcBeta>(NtcBetaParameters{.reference_resistance = 10.0, .beta_kelvin = 3000.0}));
  laws.push_back(made<NtcSteinhartHart>(quoted_fit));
  laws.push_back(made<PtcParametric>(ptc_parameters));
  auto cold = ptc_parameters;
  cold.cold_resistance = 130.0;
  cold.minimum_kelvin = 343.15;
  laws.push_back(made<PtcParametric>(cold));
  laws.push_back(made<TableLogLinear>(
      std::vector<TablePoint>{{250.0, 30.0}, {300.0, 20.0}, {400.0, 80.0}}));
  // Temperatures avoid the table's interior point (300 K), where the slope legitimately jumps.
  for (const auto& law : laws)
    for (double kelvin : {260.0, 298.15, 320.0, 342.5, 343.15, 343.9, 350.0, 388.9, 389.68, 390.5, 393.15, 399.0})
      expect_derivative_matches(law, kelvin, 1e-6);
  // Including inside the PTC's saturation blend window.
  const auto ptc = made<PtcParametric>(ptc_parameters);
  for (double offset : {-0.9, -0.3, 0.0, 0.4, 0.95})
    expect_derivative_matches(ptc, ptc.saturation_kelvin() + offset, 1e-6);
}

TEST(ResistanceLaw, FactoryPassesErrorsThrough) {
  auto created = make_resistance_law(NtcBetaParameters{.reference_resistance = 0.0, .beta_kelvin = 1.0});
  ASSERT_TRUE(std::holds_alternative<std::string>(created));
  EXPECT_NE(std::get<std::string>(created).find("NtcBeta: reference_resistance = 0"), std::string::npos);
  created = make_resistance_law(std::vector<TablePoint>{{300.0, 1.0}, {310.0, 2.0}});
  ASSERT_TRUE(std::holds_alternative<ResistanceLaw>(created));
  EXPECT_NEAR(std::get<ResistanceLaw>(created).resistance(310.0), 2.0, 1e-12);
}

}  // namespace
}  // namespace linkrise::models
