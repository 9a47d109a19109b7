// The comparison table (app/studies/compare.h): the best value of a row is marked only where the printed values
// differ, and the terminal shows the headline metrics unless asked for all. The comparisons are built by hand, so
// the marks are checked against values chosen for the purpose.
#include "app/studies/compare.h"

#include <gtest/gtest.h>

#include <string>

namespace linkrise::app {
namespace {

VariantComparison three_variants(const std::vector<double>& energies, const std::vector<double>& minimum_voltages) {
  VariantComparison comparison;
  comparison.title = "hand-made";
  comparison.names = {"nominal", "a", "b"};
  comparison.notes = {"", "", ""};
  comparison.results.columns = {{"r_pre.energy", "J"}, {"sequence.minimum_pack_voltage", "V"}};
  for (std::size_t i = 0; i < 3; ++i) {
    PointResult point;
    point.outcome = "closed";
    point.verdict = analysis::Verdict::Pass;
    point.values = {energies[i], minimum_voltages[i]};
    comparison.results.points.push_back(point);
  }
  comparison.headline = {"r_pre.energy"};
  return comparison;
}

TEST(Compare, BestIsMarkedOnlyWhereThePrintedValuesDiffer) {
  // 89.75 J, 89.7500001 J and 89.75 J print alike (four significant digits): no variant is better.
  VariantComparison tie = three_variants({89.75, 89.7500001, 89.75}, {380.0, 381.0, 379.0});
  EXPECT_TRUE(tie.best(0).empty());
  // The minimum pack voltage: larger is better, 381 V is best.
  EXPECT_EQ(tie.best(1), std::vector<std::size_t>{1});
  // 89.75 J against 89.80 J: the smaller marked, and both entries that print as 89.75 J share it.
  VariantComparison apart = three_variants({89.75, 89.8, 89.7500001}, {380.0, 380.0, 380.0});
  EXPECT_EQ(apart.best(0), (std::vector<std::size_t>{0, 2}));
  EXPECT_TRUE(apart.best(1).empty());
}

TEST(Compare, TheTerminalShowsTheHeadlineUnlessAskedForAll) {
  VariantComparison comparison = three_variants({89.75, 89.8, 90.0}, {380.0, 381.0, 379.0});
  const std::string headline = comparison_text(comparison);
  EXPECT_NE(headline.find("r_pre.energy"), std::string::npos) << headline;
  EXPECT_EQ(headline.find("sequence.minimum_pack_voltage"), std::string::npos) << headline;
  EXPECT_NE(headline.find("1 more metrics in compare.csv"), std::string::npos) << headline;
  const std::string all = comparison_text(comparison, true);
  EXPECT_NE(all.find("sequence.minimum_pack_voltage"), std::string::npos) << all;
  EXPECT_EQ(all.find("more metrics"), std::string::npos) << all;
}

}  // namespace
}  // namespace linkrise::app
