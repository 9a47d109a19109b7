#include "netlist/sizing_spec.h"

#include <filesystem>

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {
namespace {

void read_range(ParameterReader& reader, SizingSpec& spec) {
  const Tree* range = reader.child("range");
  if (range == nullptr) return;
  if (!range->is_list() || range->items.size() != 2) {
    reader.fail("range", "'range' must be a list of two values, the low and the high end",
                "write e.g. 'range: [10 Ohm, 200 Ohm]'");
  }
  spec.lower = ParameterReader::read_value(range->items[0], Dimension::resistance(), Bound::Positive,
                                           "the low end of the sizing range");
  spec.upper = ParameterReader::read_value(range->items[1], Dimension::resistance(), Bound::Positive,
                                           "the high end of the sizing range");
  if (!(spec.upper > spec.lower)) {
    throw InputError(range->items[1].mark, "the high end of the sizing range must lie above the low end",
                     "write e.g. 'range: [10 Ohm, 200 Ohm]'");
  }
}

void read_spread(ParameterReader& reader, SizingSpec& spec) {
  const Tree* spread = reader.child("spread");
  if (spread == nullptr || spread->kind == Tree::Kind::Null) return;
  if (spread->is_scalar()) {
    if (spread->text != "corners" && spread->text != "nominal") {
      reader.fail("spread", fmt::format("'{}' is not a spread", spread->text),
                  "write 'corners', 'nominal' or '{samples: 200, seed: 1, quantile: 99 %}'");
    }
    spec.spread = spread->text == "corners" ? SizingSpread::Corners : SizingSpread::Nominal;
    return;
  }
  ParameterReader samples(*spread, "sizing block 'spread'");
  spec.spread = SizingSpread::Samples;
  spec.samples = static_cast<std::size_t>(samples.count("samples", 0, 1));
  if (spec.samples == 0) {
    samples.reject_misspelling("samples");
    reader.fail("spread", "a Monte Carlo spread needs 'samples', the number of draws",
                "write e.g. '{samples: 200, seed: 1, quantile: 99 %}'");
  }
  spec.seed = static_cast<std::uint64_t>(samples.count("seed", 1));
  spec.quantile = samples.quantity("quantile", Dimension::none(), Bound::Fraction, 0.99);
  if (!(spec.quantile > 0.0 && spec.quantile <= 1.0)) {
    samples.fail("quantile", "the quantile must lie in (0, 100 %]", "write e.g. 'quantile: 99 %'");
  }
  samples.finish();
}

void read_faults(ParameterReader& reader, SizingSpec& spec) {
  const Tree* faults = reader.child("faults");
  if (faults == nullptr || faults->kind == Tree::Kind::Null) return;
  if (faults->is_scalar() && (faults->text == "all" || faults->text == "none")) {
    spec.all_faults = faults->text == "all";
    return;
  }
  if (!faults->is_list()) {
    reader.fail("faults", "'faults' must be 'all', 'none' or a list of scenario names",
                "write e.g. 'faults: [shorted_link, open_precharge_resistor]'");
  }
  spec.all_faults = false;
  for (const Tree& item : faults->items) {
    if (!item.is_scalar() || item.text.empty()) {
      throw InputError(item.mark, "a fault scenario is named by a word", "write e.g. 'shorted_link'");
    }
    spec.faults.push_back(item.text);
  }
}

}  // namespace

std::string beside_case(const std::string& path, const std::string& case_file) {
  const std::filesystem::path written(path);
  if (written.is_absolute()) return path;
  return (std::filesystem::path(case_file).parent_path() / written).lexically_normal().string();
}

std::optional<SizingSpec> read_sizing(const Tree& root, const std::string& file) {
  const Tree* block = root.find("sizing");
  if (block == nullptr || block->kind == Tree::Kind::Null) return std::nullopt;
  if (!block->is_map()) {
    throw InputError(block->mark, "'sizing' must be a block", "write e.g. 'sizing: {part: r_pre, range: [10 Ohm, 200 Ohm]}'");
  }
  ParameterReader reader(*block, "sizing block");
  SizingSpec spec;
  spec.mark = block->mark;
  spec.part = reader.text("part").value_or("");
  spec.parameter = reader.text("parameter").value_or("");
  read_range(reader, spec);
  read_spread(reader, spec);
  read_faults(reader, spec);
  spec.faults_over_spread = reader.word("faults_at", {"nominal", "spread"}, "nominal") == "spread";
  if (reader.has("attempts")) spec.attempts = reader.count("attempts", 1, 1);
  spec.tolerance = reader.quantity("tolerance", Dimension::none(), Bound::Positive, 0.005);
  if (!(spec.tolerance < 0.1)) {
    reader.fail("tolerance", "the boundary tolerance must lie in (0, 10 %)", "write e.g. 'tolerance: 0.5 %'");
  }
  if (auto catalogue = reader.text("catalogue")) {
    spec.catalogue = beside_case(*catalogue, file);
    spec.catalogue_mark = reader.mark("catalogue");
  }
  reader.finish();
  return spec;
}

}  // namespace linkrise::netlist
