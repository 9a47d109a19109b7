// The sizing study against closed forms on an ideal RC charge (tests/study_fixture.h): the link meets 95 % of
// the source at t = −ln(1 − 0.95)·R·C (RC charging, docs/references.md [R-RC-charge]), and the first power in the
// resistor is V²/R (Joule, [R-Ohm-Joule]). Boundaries are found to the root finder's relative tolerance.
#include "app/studies/sizing.h"

#include <algorithm>
#include <cmath>

#include <gtest/gtest.h>

#include "app/studies/spread.h"
#include "netlist/case.h"

#include "netlist/input_error.h"
#include "study_fixture.h"

namespace linkrise::app {
namespace {
using study_test::to_95_percent;
using study_test::write_case;

SizingRequest rc_request(const std::string& name, const std::string& limits) {
  SizingRequest request;
  request.case_file = write_case(name, study_test::rc_case_text("  link.capacitance: {plus_minus: 10 %}\n") +
                                           "limits:\n" + limits);
  // Boundaries to 0.2 % need no more than rtol 1e-8 (the fixture's 1e-10 is for waveform checks).
  request.settings = {{"sequence.minimum_time", "0 s", {}}, {"run.duration", "1.5 s", {}}, {"run.rtol", "1e-8", {}},
                      {"run.atol", "1e-10", {}}};
  request.part = "r_pre";
  request.range = {10.0, 300.0};
  request.spread = netlist::SizingSpread::Corners;
  request.tolerance = 0.002;
  request.faults = false;
  request.verify = false;
  request.jobs = 2;
  return request;
}

TEST(Sizing, WindowEndsMatchTheClosedForms) {
  // Time to 95 % at most 300 ms over C = 1 mF ± 10 %: R ≤ T / (−ln 0.05 · C_max) = 91.03 Ohm, bound at the upper
  // capacitance corner. First power at most 200 W from 100 V: R ≥ V² / P = 50 Ohm at any corner.
  Sizing sizing = size_part(rc_request("sizing_window.yaml",
                                       "  sequence.time_to_threshold: {max: 300 ms}\n"
                                       "  r_pre.peak_power: {max: 200 W}\n"));
  ASSERT_TRUE(sizing.feasible()) << sizing_text(sizing);
  const double upper = 0.3 / (to_95_percent() * 1.1e-3);
  EXPECT_NEAR(sizing.upper, upper, 0.002 * upper) << sizing_text(sizing);
  EXPECT_NEAR(sizing.lower, 50.0, 0.002 * 50.0) << sizing_text(sizing);
  ASSERT_TRUE(sizing.upper_binding && sizing.lower_binding);
  EXPECT_EQ(sizing.constraints[sizing.boundaries[*sizing.upper_binding].constraint], "sequence.time_to_threshold max");
  EXPECT_EQ(sizing.constraints[sizing.boundaries[*sizing.lower_binding].constraint], "r_pre.peak_power max");
  // Corner 1 puts the only tolerance (the capacitance) at its upper bound.
  EXPECT_EQ(sizing.boundaries[*sizing.upper_binding].where, "corner 1");
  EXPECT_TRUE(sizing.notes.empty());
}

TEST(Sizing, ConflictingBoundsReportNoFeasibleValue) {
  // 100 W needs R ≥ 100 Ohm, the time limit R ≤ 91.03 Ohm: no value serves both.
  Sizing sizing = size_part(rc_request("sizing_conflict.yaml",
                                       "  sequence.time_to_threshold: {max: 300 ms}\n"
                                       "  r_pre.peak_power: {max: 100 W}\n"));
  EXPECT_FALSE(sizing.feasible());
  const std::string text = sizing_text(sizing);
  EXPECT_NE(text.find("no feasible value: r_pre.peak_power max needs at least"), std::string::npos) << text;
  EXPECT_NE(text.find("sequence.time_to_threshold max at most"), std::string::npos) << text;
}

TEST(Sizing, BadRequestsAreInputErrors) {
  SizingRequest request = rc_request("sizing_bad.yaml", "  r_pre.peak_power: {max: 200 W}\n");
  request.part = "r_pree";
  EXPECT_THROW(size_part(request), netlist::InputError);
  request.part = "link";
  request.parameter = "capacitance";
  EXPECT_THROW(size_part(request), netlist::InputError);  // not a resistance
  request.part = "r_pre";
  request.parameter = "resistance";
  request.range = {300.0, 10.0};
  EXPECT_THROW(size_part(request), netlist::InputError);  // empty range
}


// A shorted link with retries: each attempt holds the source across R for the time the rise check takes to
// call it (no contactor delays, so the contacts touch at the attempt's first sample and part at the sample of the
// fault), and the short takes the link's place, so the resistor takes n·V²·t/R over n attempts (Ohm's and
// Joule's laws, docs/references.md [R-Ohm-Joule]). Under a pulse-energy rating E the resistance must be at least
// n·V²·t/E; 3 attempts of 20 ms at 100 V under 20 J give 30 Ohm. The test is about the sizing method, so the
// contacts are ideal switches ('arc: off, parting_time: 0 s'): with the arc model each opening of the shorted path
// on some 3 A strikes an arc whose voltage takes about 0.35 ms to rise to the source's (models/contactor.h), which
// the closed form leaves out (measured: 30.15 Ohm, 0.5 % above it).
TEST(Sizing, ShortedLinkRetriesBoundTheResistanceFromBelow) {
  std::string text = study_test::rc_case_text("");
  for (const std::string contact : {"closed_resistance: 1 nOhm}", "open_resistance: 1e15 Ohm}"}) {
    text.replace(text.find(contact), contact.size(), contact.substr(0, contact.size() - 1) + ", arc: off, parting_time: 0 s}");
  }
  const std::string rated = "resistance: 100 Ohm, ratings: {pulse_energy: 20 J}}";
  text.replace(text.find("resistance: 100 Ohm}"), std::string("resistance: 100 Ohm}").size(), rated);
  text.replace(text.find("  timeout: 2 s\n"), std::string("  timeout: 2 s\n").size(),
               "  timeout: 2 s\n  rise_check: {above: 15 %, by: 20 ms}\n  attempts: 3\n  cool_down: 0.2 s\n");
  text += "sizing:\n  part: r_pre\n  range: [5 Ohm, 300 Ohm]\n  spread: nominal\n  faults: [shorted_link]\n"
          "  tolerance: 0.1 %\n";
  SizingRequest request;
  request.case_file = write_case("sizing_retries.yaml", text);
  request.settings = {{"sequence.minimum_time", "0 s", {}}, {"run.duration", "1.5 s", {}}, {"run.rtol", "1e-8", {}},
                      {"run.atol", "1e-10", {}}};
  request.verify = false;
  request.jobs = 2;
  Sizing sizing = size_part(request);
  ASSERT_TRUE(sizing.feasible()) << sizing_text(sizing);
  const double bound = 3 * 100.0 * 100.0 * 0.020 / 20.0;
  EXPECT_NEAR(sizing.lower, bound, 0.002 * bound) << sizing_text(sizing);
  ASSERT_TRUE(sizing.lower_binding);
  const Boundary& binding = sizing.boundaries[*sizing.lower_binding];
  EXPECT_EQ(sizing.constraints[binding.constraint], "r_pre.energy max (rating)");
  EXPECT_EQ(binding.where, "scenario shorted_link");
  EXPECT_EQ(sizing.scenarios, std::vector<std::string>{"shorted_link"});
  // The block's range ends the window above: nothing else binds.
  EXPECT_EQ(sizing.upper, 300.0);
  // Two attempts halve the bound (the command line replaces the block's attempts).
  request.attempts = 2;
  Sizing fewer = size_part(request);
  EXPECT_NEAR(fewer.lower, 2.0 / 3.0 * bound, 0.002 * bound) << sizing_text(fewer);
}

// The step at main closure of a sampled RC charge is V·e^(−k·Δ/τ), k the first whole sample past τ·ln 20 (RC
// charging, docs/references.md [R-RC-charge]): a saw-tooth in R. With a 50 ms sample period its margin against
// a 3 V limit changes sign several times over the bracket, and the study must say so and fall back to the grid.
TEST(Sizing, NonMonotonicMarginFallsBackToTheBracketGrid) {
  SizingRequest request = rc_request("sizing_sawtooth.yaml", "  sequence.voltage_step_at_close: {max: 3 V}\n");
  request.settings.push_back({"sequence.sample_period", "50 ms", {}});
  request.range = {20.0, 200.0};
  request.spread = netlist::SizingSpread::Nominal;
  Sizing sizing = size_part(request);
  // The expected sign changes on the bracket from the closed form.
  std::vector<double> bracket;
  for (std::size_t k = 0; k < kBracketPoints; ++k) {
    bracket.push_back(20.0 * std::pow(10.0, static_cast<double>(k) / (kBracketPoints - 1)));
  }
  int changes = 0;
  bool previous = false;
  for (std::size_t k = 0; k < bracket.size(); ++k) {
    const double tau = bracket[k] * 1e-3;
    const double step = 100.0 * std::exp(-std::ceil(tau * std::log(20.0) / 0.05) * 0.05 / tau);
    const bool holds = step <= 3.0;
    if (k > 0 && holds != previous) ++changes;
    previous = holds;
  }
  ASSERT_GT(changes, 1) << "the test circuit must give a saw-tooth on the bracket";
  const auto note = std::find_if(sizing.notes.begin(), sizing.notes.end(), [](const std::string& n) {
    return n.find("voltage_step_at_close max: the margin changes sign") != std::string::npos;
  });
  ASSERT_NE(note, sizing.notes.end()) << sizing_text(sizing);
  EXPECT_NE(note->find(std::to_string(changes) + " times"), std::string::npos) << *note;
  for (const auto& boundary : sizing.boundaries) {  // every boundary is a bracket value
    const bool on_grid = std::any_of(bracket.begin(), bracket.end(),
                                     [&](double v) { return std::abs(v - boundary.value) < 1e-9 * v; });
    EXPECT_TRUE(on_grid) << boundary.value;
  }
}

// Candidates judged over the same spread: with C = 1 mF ± 10 % and each candidate's own resistance tolerance, a
// candidate's margins are closed forms — the first power V²/R_low against 200 W and the time to 95 %
// R_high·C_high·ln 20 against 300 ms (docs/references.md [R-RC-charge], [R-Ohm-Joule]).
TEST(Sizing, CatalogueCandidatesAreRankedBySmallestMargin) {
  const std::string catalogue = write_case("sizing_parts.catalogue.yaml", R"(candidates:
  - {name: r40, part: {kind: resistor, resistance: 40 Ohm}}
  - {name: r80_5pct, part: {kind: resistor, resistance: 80 Ohm}, tolerances: {resistance: {plus_minus: 5 %}}}
  - {name: r60_1pct, part: {kind: resistor, resistance: 60 Ohm}, tolerances: {resistance: {plus_minus: 1 %}}}
  - {name: ntc20, part: {kind: ntc_thermistor, resistance_at_25degC: 20 Ohm, b_value: 3000 K,
                         thermal: {heat_capacity: 50 J/K, thermal_resistance: 10 K/W}}}
)");
  SizingRequest request = rc_request("sizing_catalogue.yaml",
                                     "  sequence.time_to_threshold: {max: 300 ms}\n  r_pre.peak_power: {max: 200 W}\n");
  request.catalogue = catalogue;
  request.verify = true;
  Sizing sizing = size_part(request);
  ASSERT_EQ(sizing.candidates.size(), 4u);
  auto margins = [](double r_low, double r_high) {
    const double power = (200.0 - 100.0 * 100.0 / r_low) / 200.0;
    const double time = (0.3 - r_high * 1.1e-3 * std::log(20.0)) / 0.3;
    return std::min(power, time);
  };
  EXPECT_EQ(sizing.candidates[0].name, "r60_1pct");
  EXPECT_NEAR(sizing.candidates[0].smallest_margin, margins(59.4, 60.6), 1e-4);
  EXPECT_EQ(sizing.constraints[*sizing.candidates[0].binding], "r_pre.peak_power max");
  EXPECT_EQ(sizing.candidates[1].name, "r80_5pct");
  EXPECT_NEAR(sizing.candidates[1].smallest_margin, margins(76.0, 84.0), 1e-4);
  EXPECT_EQ(sizing.constraints[*sizing.candidates[1].binding], "sequence.time_to_threshold max");
  EXPECT_EQ(sizing.candidates[2].name, "r40");  // 250 W into 40 Ohm: fails
  EXPECT_FALSE(sizing.candidates[2].pass());
  EXPECT_NEAR(sizing.candidates[2].smallest_margin, (200.0 - 250.0) / 200.0, 1e-4);
  // Another technology in the same table: the NTC is named by its R25 and, cold at the first instant, takes
  // V²/R25 = 500 W against 200 W.
  EXPECT_EQ(sizing.candidates[3].name, "ntc20");
  EXPECT_EQ(sizing.candidates[3].kind, "ntc_thermistor");
  EXPECT_DOUBLE_EQ(sizing.candidates[3].point.value, 20.0);
  EXPECT_NEAR(sizing.candidates[3].smallest_margin, (200.0 - 500.0) / 200.0, 1e-3);
  // The best candidate is the chosen design; its fault matrix and BMS window were run.
  ASSERT_TRUE(sizing.choice);
  EXPECT_EQ(sizing.choice->label, "candidate r60_1pct");
  EXPECT_TRUE(sizing.choice->verified_run);
  ASSERT_TRUE(sizing.choice->window) << sizing.choice->window_skipped;
  const std::string text = sizing_text(sizing);
  EXPECT_NE(text.find("r60_1pct"), std::string::npos) << text;
}

// Monte Carlo at a quantile: the time limit binds where R·C_q·ln 20 = T, C_q the q-quantile (type 7, docs/references.md
// [R-Hyndman-Fan]) of the drawn capacitances, which are the spread's own draws.
TEST(Sizing, MonteCarloJudgesTheStatedQuantile) {
  SizingRequest request = rc_request("sizing_monte_carlo.yaml", "  sequence.time_to_threshold: {max: 300 ms}\n");
  request.spread = netlist::SizingSpread::Samples;
  request.samples = 80;
  request.seed = 5;
  request.quantile = 0.9;
  Sizing sizing = size_part(request);
  const netlist::Case spec = netlist::load_case(request.case_file);
  SpreadPlan plan;
  plan.samples = 80;
  plan.seed = 5;
  std::vector<double> capacitances;
  for (std::size_t i = 0; i < 80; ++i) capacitances.push_back(spread_value(spec.tolerances, plan, i, 0));
  std::sort(capacitances.begin(), capacitances.end());
  // The margin (T − R·C·ln 20)/T falls with C: its 10 % quantile is that of the 90 % quantile of C.
  const double expected = 0.3 / (study_test::to_95_percent() * quantile(capacitances, 0.9));
  ASSERT_TRUE(sizing.upper_binding) << sizing_text(sizing);
  EXPECT_NEAR(sizing.upper, expected, 0.002 * expected) << sizing_text(sizing);
  EXPECT_EQ(sizing.boundaries[*sizing.upper_binding].where, "90 % of 80 samples");
}

// IEC 60063's E24 series (docs/references.md [R-IEC60063]): the preferred value nearest in log scale, inside the
// window.
TEST(Sizing, PreferredValueIsTheNearestE24ValueInsideTheWindow) {
  EXPECT_DOUBLE_EQ(preferred_value(50.0, 40.0, 60.0), 51.0);
  EXPECT_DOUBLE_EQ(preferred_value(70.7, 50.0, 100.0), 68.0);
  EXPECT_TRUE(std::isnan(preferred_value(9.6, 9.2, 9.9)));
  EXPECT_DOUBLE_EQ(preferred_value(1.05e3, 1.0e3, 1.2e3), 1.1e3);  // 1.1 kOhm is nearer in log scale
  EXPECT_DOUBLE_EQ(preferred_value(0.5, 0.3, 0.6), 0.51);
}

// The sizing block of a case is read with its positions; a misspelt key or a bad range is an input error there.
TEST(Sizing, TheSizingBlockIsValidated) {
  const std::string base = study_test::rc_case_text("");
  EXPECT_THROW(netlist::read_case(netlist::parse_yaml(base + "sizing: {part: r_pre, range: [300 Ohm, 10 Ohm]}\n", "x"), "x"),
               netlist::InputError);
  EXPECT_THROW(netlist::read_case(netlist::parse_yaml(base + "sizing: {part: r_pre, rnage: [1 Ohm, 2 Ohm]}\n", "x"), "x"),
               netlist::InputError);
  EXPECT_THROW(netlist::read_case(netlist::parse_yaml(base + "sizing: {part: r_pre, range: [1 V, 2 V]}\n", "x"), "x"),
               netlist::InputError);
  const netlist::Case spec = netlist::read_case(
      netlist::parse_yaml(base + "sizing: {part: r_pre, range: [1 Ohm, 2 kOhm], spread: {samples: 50, quantile: 95 %},"
                                 " faults: none, catalogue: parts.catalogue.yaml}\n",
                          "/cases/x.yaml"),
      "/cases/x.yaml");
  ASSERT_TRUE(spec.sizing);
  EXPECT_EQ(spec.sizing->upper, 2000.0);
  EXPECT_EQ(spec.sizing->spread, netlist::SizingSpread::Samples);
  EXPECT_EQ(spec.sizing->samples, 50u);
  EXPECT_DOUBLE_EQ(spec.sizing->quantile, 0.95);
  EXPECT_FALSE(spec.sizing->all_faults);
  EXPECT_EQ(spec.sizing->catalogue, "/cases/parts.catalogue.yaml");
}


// A catalogue is read like a case: a bad entry is an input error at its own file, line and column.
TEST(Sizing, ABadCatalogueIsAnInputErrorAtItsPlace) {
  const std::string catalogue = write_case("sizing_bad.catalogue.yaml",
                                           "candidates:\n  - name: r56\n    part: {resistance: 56 Ohm}\n");
  SizingRequest request = rc_request("sizing_bad_catalogue.yaml", "  r_pre.peak_power: {max: 200 W}\n");
  request.catalogue = catalogue;
  try {
    size_part(request);
    FAIL() << "a candidate without a kind was accepted";
  } catch (const netlist::InputError& error) {
    EXPECT_NE(std::string(error.what()).find("sizing_bad.catalogue.yaml:3:11"), std::string::npos) << error.what();
    EXPECT_NE(std::string(error.what()).find("needs a 'kind'"), std::string::npos) << error.what();
  }
  request.catalogue = write_case("sizing_twice.catalogue.yaml",
                                 "candidates:\n  - {name: a, part: {kind: resistor, resistance: 1 Ohm}}\n"
                                 "  - {name: a, part: {kind: resistor, resistance: 2 Ohm}}\n");
  EXPECT_THROW(size_part(request), netlist::InputError);
}


// The stored boat case (cases/boat_104s_sizing.yaml) at 50 % state of charge, where its cells' open-circuit voltage
// is a row of the table (3.70 V, so 384.8 V for 104 cells): the shorted link with the BMS's retry bounds the
// resistance from below. Each of the 2 attempts drives I = V/(R + Rs) through R from the second contact's touch
// (k_neg, 12 ms) to the pre-charge contact parting (the rise check's sample at 40 ms plus its 3 ms opening delay),
// t = 31 ms; Rs = 104 × 1.1 mOhm cells + 40 mOhm pre-charge and 0.3 mOhm negative contacts + 3 mOhm cable + 1 mOhm
// short. The heat 2·V²·R·t/(R + Rs)² meets the 400 J pulse-energy rating at the larger root (Ohm's and Joule's
// laws, docs/references.md [R-Ohm-Joule]).
TEST(Sizing, TheStoredBoatCaseLowerEndIsItsShortedLinkRetryBound) {
  SizingRequest request;
  request.case_file = std::string(LINKRISE_SOURCE_DIR) + "/cases/boat_104s_sizing.yaml";
  // Ideal contacts, as the closed form assumes: with the arc model the pre-charge and negative contacts part on
  // some 15 A and arc for about 2 ms more at each attempt (measured: 25.86 Ohm, 14 % above the bound).
  request.settings = {{"pack.initial_soc", "50 %", {}}};
  for (const char* contact : {"k_neg", "k_pre", "k_main"}) {
    request.settings.push_back({std::string(contact) + ".arc", "off", {}});
    request.settings.push_back({std::string(contact) + ".parting_time", "0 s", {}});
  }
  request.spread = netlist::SizingSpread::Nominal;
  request.catalogue = "";
  request.verify = false;
  request.tolerance = 0.001;
  request.jobs = 2;
  Sizing sizing = size_part(request);
  ASSERT_TRUE(sizing.lower_binding) << sizing_text(sizing);
  EXPECT_EQ(sizing.boundaries[*sizing.lower_binding].where, "scenario shorted_link");
  const double v = 104 * 3.70, t = 0.031, series = 104 * 1.1e-3 + 40e-3 + 0.3e-3 + 3e-3 + 1e-3;
  // 2·v²·t·R = 400·(R + Rs)²: 400 R² + (800 Rs − 2 v² t) R + 400 Rs² = 0.
  const double b = 800 * series - 2 * v * v * t, c = 400 * series * series;
  const double bound = (-b + std::sqrt(b * b - 4 * 400 * c)) / (2 * 400);
  EXPECT_NEAR(sizing.lower, bound, 0.003 * bound) << sizing_text(sizing);
}

}  // namespace
}  // namespace linkrise::app
