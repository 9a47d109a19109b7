// Cable checks against outside references (docs/references.md); sources named beside each check by tag.
#include "models/conductor.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

namespace linkrise::models {
namespace {

constexpr double square_millimetre = 1e-6;
constexpr double millimetre = 1e-3;
constexpr double microhenry = 1e-6;

TEST(Conductor, CopperResistancePerMetreIsRhoLengthOverArea) {
  // R = ρ·L/A with ρ20 = 1.68e-8 Ω·m (CRC Handbook [mem], [R-conductor-resistivity]); 35 mm², 1 m → 0.480 mΩ
  // one way [derived].
  const double area = 35.0 * square_millimetre;
  EXPECT_NEAR(one_way_resistance(1.0, area, ConductorMaterial::copper, kelvin_at_20_celsius), 0.480e-3,
              1e-15);
  // The loop is go and return: 2 × 1 m of conductor.
  EXPECT_NEAR(loop_resistance(1.0, area, ConductorMaterial::copper, kelvin_at_20_celsius), 0.960e-3, 1e-15);
  // At 60 °C: × (1 + 0.00393·40) = 1.1572 → 0.555456 mΩ/m [derived].
  EXPECT_NEAR(one_way_resistance(1.0, area, ConductorMaterial::copper, 333.15), 0.555456e-3, 1e-15);
  EXPECT_NEAR(loop_resistance_derivative(1.0, area, ConductorMaterial::copper),
              2.0 * 1.68e-8 * 0.00393 / area, 1e-18);
}

TEST(Conductor, CopperBelowStandardMaximumForStrandedCable) {
  // IEC 60228 class 5 (flexible) copper, 35 mm²: maximum 0.565 Ω/km at 20 °C [mem, R-IEC60228]. Bulk ρ·L/A
  // must come out below that maximum but not far below (stranding and the annealed-copper standard add ~10–20 %).
  const double per_kilometre =
      one_way_resistance(1000.0, 35.0 * square_millimetre, ConductorMaterial::copper, kelvin_at_20_celsius);
  EXPECT_LT(per_kilometre, 0.565);
  EXPECT_GT(per_kilometre, 0.8 * 0.565);
}

TEST(Conductor, AluminiumResistance) {
  // ρ20 = 2.65e-8 Ω·m (handbook tables [mem], [R-conductor-resistivity]); 50 mm², 2 m one way → 1.06 mΩ [derived].
  EXPECT_NEAR(one_way_resistance(2.0, 50.0 * square_millimetre, ConductorMaterial::aluminium,
                                 kelvin_at_20_celsius),
              1.06e-3, 1e-15);
}

TEST(Conductor, PairInductanceCheckValues) {
  // r = 4.0 mm, d = 20 mm ([R-wire-pair-inductance] [derived]): 0.7438 µH/m DC form, 0.6267 µH/m HF form.
  // Tolerance: half a unit in the last quoted digit.
  EXPECT_NEAR(pair_inductance_direct_current(4.0 * millimetre, 20.0 * millimetre) / microhenry, 0.7438,
              5e-5);
  EXPECT_NEAR(pair_inductance_high_frequency(4.0 * millimetre, 20.0 * millimetre) / microhenry, 0.6267,
              5e-5);
}

TEST(Conductor, DirectCurrentFormMatchesHandbookGeometricMeanRadius) {
  // Power-engineering handbook form L = 4e-7·ln(D/r′), r′ = 0.7788·r [pub, R-wire-pair-inductance]: r′ = e^(−1/4)·r, so
  // the two agree up to the 4-digit rounding of 0.7788 (±5e-5 in r′/r → ±6.4e-5 in the log → ±3.5e-5 of L here).
  const double r = 4.0 * millimetre, d = 20.0 * millimetre;
  EXPECT_NEAR(pair_inductance_direct_current(r, d), 4e-7 * std::log(d / (0.7788 * r)),
              4e-5 * pair_inductance_direct_current(r, d));
}

TEST(Conductor, FormsDifferByInternalInductanceWhenFarApart) {
  // arcosh(x) → ln(2x) for large x, so the forms differ by (µ0/π)/4 = 0.1 µH/m [derived].
  const double r = 1.0 * millimetre, d = 1.0;
  EXPECT_NEAR((pair_inductance_direct_current(r, d) - pair_inductance_high_frequency(r, d)) / microhenry, 0.1,
              1e-6);
}

TEST(Conductor, CrossSectionRadiusRoundTrip) {
  // A = π r²: r = 4 mm ↔ 50.265 mm² [derived].
  EXPECT_NEAR(cross_section_from_radius(4.0 * millimetre) / square_millimetre, 50.26548, 1e-5);
  EXPECT_NEAR(radius_from_cross_section(cross_section_from_radius(4.0 * millimetre)), 4.0 * millimetre,
              1e-15);
}

TEST(Conductor, CableUsesLoopResistanceAndDirectCurrentInductanceByDefault) {
  const auto created = Cable::create({.length = 2.5,
                                      .cross_section = cross_section_from_radius(4.0 * millimetre),
                                      .centre_spacing = 20.0 * millimetre});
  ASSERT_TRUE(std::holds_alternative<Cable>(created)) << std::get<std::string>(created);
  const auto& cable = std::get<Cable>(created);
  EXPECT_NEAR(cable.loop_inductance(), 2.5 * pair_inductance_direct_current(4e-3, 20e-3), 1e-18);
  EXPECT_NEAR(cable.loop_resistance(kelvin_at_20_celsius),
              1.68e-8 * 5.0 / cross_section_from_radius(4e-3), 1e-15);
}

TEST(Conductor, RejectsImpossibleGeometry) {
  EXPECT_TRUE(validate_wire_pair(4e-3, 20e-3).empty());
  const std::string overlap = validate_wire_pair(4e-3, 8e-3);
  EXPECT_NE(overlap.find("centre_spacing = 0.008"), std::string::npos) << overlap;
  EXPECT_NE(validate_wire_pair(0.0, 1.0).find("radius = 0"), std::string::npos);
  const auto created =
      Cable::create({.length = -1.0, .cross_section = 35e-6, .centre_spacing = 0.02});
  ASSERT_TRUE(std::holds_alternative<std::string>(created));
  EXPECT_NE(std::get<std::string>(created).find("length = -1"), std::string::npos);
}

}  // namespace
}  // namespace linkrise::models
