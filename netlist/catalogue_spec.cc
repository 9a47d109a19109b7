#include "netlist/catalogue_spec.h"

#include <algorithm>

#include <fmt/format.h>

#include "netlist/case.h"
#include "netlist/parameter_reader.h"

namespace linkrise::netlist {
namespace {

const char* const kExample = "write e.g. '- {name: wirewound_39r, part: {kind: resistor, resistance: 39 Ohm}}'";

Tree read_part_block(ParameterReader& reader, const Tree& item) {
  const Tree* part = reader.child("part");
  if (part == nullptr || !part->is_map()) {
    throw InputError(part == nullptr ? item.mark : part->mark, "a candidate needs a 'part' block with its kind and values",
                     kExample);
  }
  const Tree* kind = part->find("kind");
  if (kind == nullptr || !kind->is_scalar()) {
    throw InputError(part->mark, "the candidate's part needs a 'kind'", "add e.g. 'kind: resistor'");
  }
  if (part->find("name") != nullptr || part->find("nodes") != nullptr) {
    throw InputError(part->mark, "a candidate's part keeps the sized part's name and nodes",
                     "remove 'name' and 'nodes' from the candidate's part");
  }
  return *part;
}

std::vector<std::pair<std::string, Tree>> read_candidate_tolerances(ParameterReader& reader) {
  std::vector<std::pair<std::string, Tree>> tolerances;
  const Tree* block = reader.child("tolerances");
  if (block == nullptr || block->kind == Tree::Kind::Null) return tolerances;
  if (!block->is_map()) {
    reader.fail("tolerances", "a candidate's 'tolerances' must be a block of '<parameter>: {...}' entries",
                "write e.g. 'tolerances: {resistance: {plus_minus: 5 %}}'");
  }
  for (std::size_t i = 0; i < block->entries.size(); ++i) {
    const auto& [parameter, entry] = block->entries[i];
    if (parameter.find('.') != std::string::npos) {
      throw InputError(block->key_mark(parameter),
                       fmt::format("'{}': a candidate's tolerance names one of its own parameters", parameter),
                       "write the parameter without the part, e.g. 'resistance'");
    }
    tolerances.emplace_back(parameter, entry);
  }
  return tolerances;
}

}  // namespace

std::vector<CandidateSpec> read_catalogue(const std::string& path) {
  const Tree root = load_yaml_file(path);
  ParameterReader top(root, "catalogue");
  const Tree* list = top.child("candidates");
  top.finish();
  if (list == nullptr || !list->is_list() || list->items.empty()) {
    throw InputError(list == nullptr ? root.mark : list->mark, "the catalogue needs a 'candidates:' list of parts",
                     kExample);
  }
  std::vector<CandidateSpec> candidates;
  for (const Tree& item : list->items) {
    if (!item.is_map()) throw InputError(item.mark, "a candidate must be a block with 'name' and 'part'", kExample);
    ParameterReader reader(item, "candidate");
    CandidateSpec candidate;
    candidate.mark = item.mark;
    auto name = reader.text("name");
    if (!name || !valid_part_name(*name)) {
      throw InputError(name ? reader.mark("name") : item.mark,
                       name ? fmt::format("candidate name '{}' must be letters, digits and '_'", *name)
                            : "a candidate needs a 'name'",
                       "write e.g. 'name: wirewound_39r_50w'");
    }
    candidate.name = *name;
    if (std::any_of(candidates.begin(), candidates.end(), [&](const CandidateSpec& c) { return c.name == *name; })) {
      throw InputError(reader.mark("name"), fmt::format("candidate '{}' is listed twice", *name),
                       "give each candidate its own name");
    }
    candidate.note = reader.text("note").value_or("");
    candidate.part_ = read_part_block(reader, item);
    candidate.kind = candidate.part_.find("kind")->text;
    candidate.tolerances_ = read_candidate_tolerances(reader);
    reader.finish();
    candidates.push_back(std::move(candidate));
  }
  return candidates;
}

}  // namespace linkrise::netlist
