#include "app/output/text_format.h"
#include "app/studies/compare.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/output/json_fields.h"
#include "app/studies/study_parameters.h"
#include "netlist/case.h"
#include "netlist/parameter_reader.h"

namespace linkrise::app {
using netlist::InputError;
using netlist::Tree;

namespace {
bool valid_name(const std::string& name) {
  return !name.empty() && std::all_of(name.begin(), name.end(), [](char c) {
    return std::isalnum(static_cast<unsigned char>(c)) || c == '_';
  });
}
}  // namespace

std::vector<Variant> read_variants(const Tree& root) {
  std::vector<Variant> variants;
  const Tree* block = root.find("variants");
  if (block == nullptr || block->kind == Tree::Kind::Null) return variants;
  if (!block->is_list()) {
    throw InputError(block->mark, "'variants' must be a list, each entry starting with '- name:'",
                     "write e.g. '- {name: r_56, set: {r_pre.resistance: 56 Ohm}}'");
  }
  for (const Tree& item : block->items) {
    if (!item.is_map()) throw InputError(item.mark, "a variant must be a block with 'name' and 'set' or 'replace'");
    netlist::ParameterReader reader(item, "variant");
    Variant variant;
    variant.mark = item.mark;
    auto name = reader.text("name");
    if (!name || !valid_name(*name) || *name == "nominal") {
      throw InputError(name ? reader.mark("name") : item.mark,
                       name ? fmt::format("variant name '{}' must be letters, digits and '_' (and not 'nominal')", *name)
                            : "a variant needs a 'name'",
                       "write e.g. 'name: ptc_thermistor'");
    }
    variant.name = *name;
    for (const auto& other : variants) {
      if (other.name == variant.name) {
        throw InputError(reader.mark("name"), fmt::format("variant '{}' is defined twice", variant.name));
      }
    }
    variant.note = reader.text("note").value_or("");
    if (const Tree* replace = reader.child("replace")) {
      if (!replace->is_map()) {
        throw InputError(replace->mark, "'replace' must be a block of '<part>: {kind: ..., <parameters>}' entries");
      }
      for (std::size_t i = 0; i < replace->entries.size(); ++i) {
        const auto& [part, replacement] = replace->entries[i];
        if (!replacement.is_map() || replacement.find("kind") == nullptr) {
          throw InputError(replacement.mark, fmt::format("the replacement of '{}' must be a block with 'kind'", part),
                           "write e.g. 'r_pre: {kind: ntc_thermistor, resistance_at_25degC: 60 Ohm, b_value: 2800 K}'");
        }
        if (replacement.find("name") != nullptr || replacement.find("nodes") != nullptr) {
          throw InputError(replacement.mark, fmt::format("the replacement of '{}' keeps its name and nodes", part),
                           "remove 'name' and 'nodes' from the replacement");
        }
        variant.replacements.emplace_back(part, replacement);
      }
    }
    if (const Tree* set = reader.child("set")) {
      variant.overrides = netlist::read_set_block(*set, "a variant's", "write e.g. 'set: {r_pre.resistance: 56 Ohm}'");
    }
    reader.finish();
    if (variant.replacements.empty() && variant.overrides.empty()) {
      throw InputError(item.mark, fmt::format("variant '{}' changes nothing", variant.name),
                       "add 'set:' overrides or a 'replace:' block");
    }
    variants.push_back(std::move(variant));
  }
  return variants;
}

Tree apply_variant(const Tree& root, const Variant& variant) {
  Tree tree = root;
  // A swap of technology changes the part's kind and its whole parameter set, which a path override cannot
  // express (the old kind's parameters would remain); only name and nodes carry over.
  for (const auto& [part, replacement] : variant.replacements) {
    Tree& block = netlist::part_block(tree, part, variant.mark);
    Tree fresh = replacement;
    Tree name = *block.find("name");
    const Tree* nodes = block.find("nodes");
    fresh.entries.insert(fresh.entries.begin(), {"name", name});
    fresh.key_marks.insert(fresh.key_marks.begin(), name.mark);
    if (nodes != nullptr) {
      fresh.entries.insert(fresh.entries.begin() + 1, {"nodes", *nodes});
      fresh.key_marks.insert(fresh.key_marks.begin() + 1, nodes->mark);
    }
    block = std::move(fresh);
  }
  netlist::apply_overrides(tree, variant.overrides);
  return tree;
}

std::vector<std::size_t> VariantComparison::best(std::size_t column) const {
  const std::string& name = results.columns.at(column).name;
  bool larger = larger_is_better(name);
  std::vector<std::size_t> reached;
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    const auto& values = results.points[i].values;
    if (column < values.size() && !std::isnan(values[column])) reached.push_back(i);
  }
  if (reached.size() < 2) return {};
  auto value = [&](std::size_t i) { return results.points[i].values[column]; };
  double best_value = value(reached.front());
  for (std::size_t i : reached) best_value = larger ? std::max(best_value, value(i)) : std::min(best_value, value(i));
  // Ties within 1e-9 of the row's largest magnitude (far below any engineering difference) share the mark.
  double scale = 0.0;
  for (std::size_t i : reached) scale = std::max(scale, std::fabs(value(i)));
  double band = 1e-9 * scale;
  std::vector<std::size_t> best;
  for (std::size_t i : reached) {
    if (std::fabs(value(i) - best_value) <= band) best.push_back(i);
  }
  if (best.size() == reached.size()) return {};
  return best;
}

VariantComparison compare_variants(const std::string& case_file, const std::vector<netlist::Override>& settings, int jobs) {
  Tree root = with_overrides(netlist::load_yaml_file(case_file), settings);
  std::vector<Variant> variants = read_variants(root);
  if (variants.empty()) {
    throw InputError(netlist::SourceMark{case_file, 1, 1}, "the case has no 'variants:' to compare",
                     "add e.g. 'variants: [{name: r_56, set: {r_pre.resistance: 56 Ohm}}]'");
  }
  std::vector<Tree> trees{root};
  for (const auto& variant : variants) trees.push_back(apply_variant(root, variant));
  VariantComparison comparison;
  comparison.case_file = case_file;
  comparison.title = netlist::read_case(root, case_file).title;
  comparison.names.push_back("nominal");
  comparison.notes.push_back("the case as written");
  for (const auto& variant : variants) {
    comparison.names.push_back(variant.name);
    comparison.notes.push_back(variant.note);
  }
  comparison.results = run_study(case_file, trees.size(), [&](std::size_t i) { return trees[i]; }, jobs);
  reject_input_errors(comparison.results, case_file,
                      [&](std::size_t i) { return i == 0 ? std::string("the nominal case") : fmt::format("variant '{}'", comparison.names[i]); });
  return comparison;
}

namespace {
std::string verdict_cell(const PointResult& point) {
  if (!point.evaluated()) return status_word(point.status);
  return point.verdict;
}
}  // namespace

std::string comparison_text(const VariantComparison& comparison) {
  std::string out = fmt::format("linkrise compare — {}\n", comparison.title);
  std::vector<std::string> header{"metric"};
  for (const auto& name : comparison.names) header.push_back(name);
  std::vector<std::vector<std::string>> rows;
  const StudyResults& results = comparison.results;
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    std::vector<std::string> row{results.columns[c].name};
    auto best = comparison.best(c);
    for (std::size_t i = 0; i < results.points.size(); ++i) {
      std::string cell = analysis::format_metric(results.points[i].values[c], results.columns[c].unit);
      bool marked = std::find(best.begin(), best.end(), i) != best.end();
      row.push_back(cell + (marked ? " *" : "  "));
    }
    rows.push_back(std::move(row));
  }
  std::vector<std::string> outcome{"outcome"}, verdict{"verdict"};
  for (const auto& point : results.points) {
    outcome.push_back((point.evaluated() ? point.outcome : "-") + "  ");
    verdict.push_back(verdict_cell(point) + "  ");
  }
  rows.push_back(outcome);
  rows.push_back(verdict);
  out += text_table(header, rows);
  out += "  * best in the row: smaller is better, except minimum_* metrics and sequence.stall_equilibrium (larger is\n"
         "    better); rows where every reached value ties are not marked; '-' is not reached\n";
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    if (!results.points[i].evaluated()) {
      out += fmt::format("  {}: {}\n", comparison.names[i], results.points[i].message);
    }
  }
  return out;
}

std::string comparison_csv(const VariantComparison& comparison) {
  std::string out = "metric,unit,better";
  for (const auto& name : comparison.names) out.append(",").append(csv_text(name));
  out += ",best\n";
  const StudyResults& results = comparison.results;
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    const auto& column = results.columns[c];
    out += fmt::format("{},{},{}", csv_text(column.name), csv_text(column.unit),
                       larger_is_better(column.name) ? "larger" : "smaller");
    for (const auto& point : results.points) out.append(",").append(csv_number(point.values[c]));
    std::string best;
    for (std::size_t i : comparison.best(c)) best.append(best.empty() ? "" : ";").append(comparison.names[i]);
    out.append(",").append(csv_text(best) + "\n");
  }
  out += "outcome,,";
  for (const auto& point : results.points) out.append(",").append(csv_text(point.evaluated() ? point.outcome : ""));
  out += ",\nverdict,,";
  for (const auto& point : results.points) out.append(",").append(csv_text(verdict_cell(point)));
  out += ",\n";
  return out;
}

namespace {
nlohmann::json comparison_json_value(const VariantComparison& comparison) {
  nlohmann::json variants = nlohmann::json::array();
  const StudyResults& results = comparison.results;
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    const auto& point = results.points[i];
    nlohmann::json metrics = nlohmann::json::object();
    for (std::size_t c = 0; c < results.columns.size(); ++c) {
      metrics[results.columns[c].name] = quantity(point.values[c], results.columns[c].unit);
    }
    variants.push_back({{"name", comparison.names[i]},
                        {"status", status_word(point.status)},
                        {"message", point.message},
                        {"outcome", point.outcome},
                        {"verdict", point.verdict},
                        {"metrics", metrics}});
  }
  nlohmann::json best = nlohmann::json::object();
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    nlohmann::json names = nlohmann::json::array();
    for (std::size_t i : comparison.best(c)) names.push_back(comparison.names[i]);
    best[results.columns[c].name] = {{"better", larger_is_better(results.columns[c].name) ? "larger" : "smaller"},
                                     {"best", names}};
  }
  return {{"tool", {{"name", "linkrise"}, {"version", LINKRISE_VERSION}}},
          {"case", {{"title", comparison.title}, {"file", comparison.case_file}}},
          {"variants", variants},
          {"best", best}};
}
}  // namespace

std::string comparison_json(const VariantComparison& comparison) {
  return json_text(comparison_json_value(comparison));
}

}  // namespace linkrise::app
