#include "app/studies/spread_merge.h"

#include <algorithm>

#include <fmt/format.h>

#include "app/studies/study_parameters.h"
#include "netlist/case_document.h"
#include "netlist/input_error.h"

namespace linkrise::app {
using netlist::InputError;

namespace {

const netlist::SourceMark kCommandLine{"command line", 0, 0};

std::string shard_name(const SpreadRecord& record) {
  return fmt::format("shard {}/{}", record.plan.shard, record.plan.shards);
}

// The record's own consistency: its hash matches its case text and settings, its range is its shard's.
void check_intact(const SpreadRecord& record) {
  std::string problem;
  if (case_identity(record.case_text, record.settings) != record.identity) {
    problem = "its case identity does not match the case text it holds";
  } else if (record.plan.shard < 1 || record.plan.shard > record.plan.shards) {
    problem = fmt::format("'{}' is no shard k/n with 1 <= k <= n", shard_name(record));
  } else {
    const IndexRange expected = shard_range(record.population, record.plan.shard, record.plan.shards);
    if (record.range.begin != expected.begin || record.range.end != expected.end) {
      problem = fmt::format("samples {}..{} are not those of {} of {} samples", record.range.begin, record.range.end,
                            shard_name(record), record.population);
    }
  }
  if (!problem.empty()) {
    throw InputError(kCommandLine, fmt::format("{}: the shard record is damaged: {}", record.folder.string(), problem),
                     "run that shard again");
  }
}

// Why `other` belongs to another study than `first`, or "" when it belongs to the same one.
std::string difference(const SpreadRecord& first, const SpreadRecord& other) {
  if (other.identity != first.identity) {
    return fmt::format("its case ({}, {}) differs from {}'s ({}, {}): another case file or other --set values",
                       other.case_file, other.identity, first.folder.string(), first.case_file, first.identity);
  }
  if (other.plan.corners != first.plan.corners) return "one is a corner study, the other Monte Carlo";
  if (other.plan.seed != first.plan.seed) {
    return fmt::format("its seed {} differs from {}'s seed {}", other.plan.seed, first.folder.string(), first.plan.seed);
  }
  if (other.population != first.population) {
    return fmt::format("its {} samples differ from {}'s {}", other.population, first.folder.string(), first.population);
  }
  if (other.plan.shards != first.plan.shards) {
    return fmt::format("it is one of {} shards, {} one of {}", other.plan.shards, first.folder.string(),
                       first.plan.shards);
  }
  if (other.version != first.version) {
    return fmt::format("linkrise {} computed it, linkrise {} computed {}", other.version, first.version,
                       first.folder.string());
  }
  const auto same_column = [](const MetricColumn& a, const MetricColumn& b) { return a.name == b.name && a.unit == b.unit; };
  if (!std::equal(other.columns.begin(), other.columns.end(), first.columns.begin(), first.columns.end(), same_column)) {
    return fmt::format("its metric columns differ from {}'s", first.folder.string());
  }
  return "";
}

void check_one_study(const std::vector<SpreadRecord>& records) {
  for (const auto& record : records) check_intact(record);
  for (std::size_t i = 1; i < records.size(); ++i) {
    const std::string why = difference(records.front(), records[i]);
    if (why.empty()) continue;
    throw InputError(kCommandLine,
                     fmt::format("{} is a shard of another study than {}: {}", records[i].folder.string(),
                                 records.front().folder.string(), why),
                     "merge only the shards of one `linkrise spread` study");
  }
}

// Sorted by shard; every shard once.
void check_every_shard_once(const std::vector<SpreadRecord>& sorted) {
  for (std::size_t i = 1; i < sorted.size(); ++i) {
    if (sorted[i].plan.shard != sorted[i - 1].plan.shard) continue;
    throw InputError(kCommandLine,
                     fmt::format("{} repeats {}, already given by {}", sorted[i].folder.string(), shard_name(sorted[i]),
                                 sorted[i - 1].folder.string()),
                     "give each shard's folder once");
  }
  const int shards = sorted.front().plan.shards;
  for (int k = 1; k <= shards; ++k) {
    if (static_cast<std::size_t>(k) <= sorted.size() && sorted[static_cast<std::size_t>(k) - 1].plan.shard == k) {
      continue;
    }
    std::string given;
    for (const auto& record : sorted) {
      given += fmt::format("{}{} ({})", given.empty() ? "" : ", ", record.folder.string(), shard_name(record));
    }
    throw InputError(kCommandLine, fmt::format("shard {}/{} is missing; given: {}", k, shards, given),
                     fmt::format("add the folder of shard {}/{} (run `linkrise spread ... --shard {}/{}` if it never ran)",
                                 k, shards, k, shards));
  }
}

}  // namespace

Spread merge_spread(std::vector<SpreadRecord> records) {
  if (records.empty()) {
    throw InputError(kCommandLine, "no shard folders to merge", "give the output folders of every shard");
  }
  check_one_study(records);
  std::stable_sort(records.begin(), records.end(),
                   [](const SpreadRecord& a, const SpreadRecord& b) { return a.plan.shard < b.plan.shard; });
  check_every_shard_once(records);

  const SpreadRecord& first = records.front();
  const netlist::CaseDocument base =
      netlist::CaseDocument::parse(first.case_text, first.case_file).with(parse_settings(first.settings));
  const netlist::Case nominal = base.validate();
  Spread spread;
  spread.case_file = base.file();
  spread.title = nominal.title;
  spread.tolerances = nominal.tolerances;
  for (const auto& tolerance : spread.tolerances) {
    if (tolerance.unresolved) throw *tolerance.unresolved;
  }
  spread.plan = first.plan;
  spread.plan.shard = spread.plan.shards = 1;
  spread.population = first.population;
  spread.range = IndexRange{0, first.population};
  spread.nominal.columns = first.columns;
  spread.nominal.points.resize(0, first.columns.size());
  spread.nominal.points.push_back(first.nominal);
  spread.results.columns = first.columns;
  spread.results.points.resize(0, first.columns.size());
  for (auto& record : records) {
    for (const auto& point : record.points) spread.results.points.push_back(point);
    record.points = {};  // the shard's samples live on in the table only
  }
  // The shards ran their samples at the study accuracy; the check is the single run's, from the same document.
  spread.results.accuracy = check_study_accuracy(base);
  summarise_spread(spread, nominal);
  return spread;
}

}  // namespace linkrise::app
