#include "netlist/case_document.h"

#include <algorithm>

#include <fmt/format.h>

namespace linkrise::netlist {

CaseDocument CaseDocument::load(const std::string& path) { return CaseDocument(load_yaml_file(path), path); }

CaseDocument CaseDocument::parse(const std::string& text, const std::string& file) {
  return CaseDocument(parse_yaml(text, file), file);
}

Case CaseDocument::validate() const { return read_case(root_, file_); }

void CaseDocument::apply(const Override& change) { apply_override(root_, change); }

void CaseDocument::apply(const std::vector<Override>& changes) { apply_overrides(root_, changes); }

CaseDocument CaseDocument::with(const std::vector<Override>& changes) const {
  CaseDocument changed = *this;
  changed.apply(changes);
  return changed;
}

namespace {
// A swap of technology changes the part's kind and its whole parameter set, which a path override cannot
// express (the old kind's parameters would remain); only name and nodes carry over.
void swap_part_block(Tree& root, const std::string& part, Tree fresh, const SourceMark& mark) {
  Tree& block = part_block(root, part, mark);
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
}  // namespace

CaseDocument CaseDocument::with_variant(const VariantSpec& variant) const {
  CaseDocument changed = *this;
  for (std::size_t i = 0; i < variant.replaced_parts.size(); ++i) {
    swap_part_block(changed.root_, variant.replaced_parts[i], variant.replacement_blocks_[i], variant.mark);
  }
  changed.apply(variant.overrides);
  return changed;
}

CaseDocument CaseDocument::with_candidate(const std::string& part, const CandidateSpec& candidate) const {
  CaseDocument changed = *this;
  swap_part_block(changed.root_, part, candidate.part_, candidate.mark);
  if (candidate.tolerances_.empty()) return changed;
  Tree* tolerances = changed.root_.find("tolerances");
  if (tolerances == nullptr || !tolerances->is_map()) {
    changed.root_.set("tolerances", Tree{Tree::Kind::Map, "", candidate.mark, {}, {}, {}});
    tolerances = changed.root_.find("tolerances");
  }
  // The candidate's own tolerances replace the case's for that part: one of the same parameter in place (a
  // study's random slots follow the block's order), the others are dropped; new ones go at the end.
  const std::string prefix = part + ".";
  auto given = candidate.tolerances_;
  std::vector<TreeEntry> kept;
  std::vector<SourceMark> kept_marks;
  for (std::size_t i = 0; i < tolerances->entries.size(); ++i) {
    const std::string& path = tolerances->entries[i].first;
    Tree& entry = tolerances->entries[i].second;
    SourceMark mark = i < tolerances->key_marks.size() ? tolerances->key_marks[i] : tolerances->mark;
    if (path.rfind(prefix, 0) == 0) {
      auto same = std::find_if(given.begin(), given.end(), [&](const auto& g) { return prefix + g.first == path; });
      if (same == given.end()) continue;
      entry = same->second;
      mark = same->second.mark;
      given.erase(same);
    }
    kept.push_back({path, entry});
    kept_marks.push_back(mark);
  }
  for (const auto& [parameter, entry] : given) {
    kept.push_back({prefix + parameter, entry});
    kept_marks.push_back(entry.mark);
  }
  tolerances->entries = std::move(kept);
  tolerances->key_marks = std::move(kept_marks);
  return changed;
}

std::optional<Quantity> CaseDocument::quantity_at(const std::string& path, const SourceMark& mark) const {
  return netlist::quantity_at(root_, path, mark, "name a parameter that holds one value, e.g. 'r_pre.resistance'");
}

void CaseDocument::scale(const std::string& path, double factor, const SourceMark& mark) {
  scale_value(root_, path, factor, mark);
}

void CaseDocument::add_part(const std::string& name, const std::string& kind, const std::string& plus,
                            const std::string& minus, const std::vector<std::pair<std::string, std::string>>& parameters,
                            const SourceMark& mark) {
  netlist::add_part(root_, name, kind, plus, minus, parameters, mark);
}

void CaseDocument::replace_part(const std::string& name, const std::string& kind,
                                const std::vector<std::pair<std::string, std::string>>& parameters,
                                const SourceMark& mark) {
  netlist::replace_part(root_, name, kind, parameters, mark);
}

void CaseDocument::reverse_part(const std::string& name, const SourceMark& mark) {
  netlist::reverse_part(root_, name, mark);
}

std::string CaseDocument::unused_part_name(const std::string& base) const {
  return netlist::unused_part_name(root_, base);
}

}  // namespace linkrise::netlist
