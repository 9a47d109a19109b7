#pragma once
// The record a shard of a tolerance spread leaves in its output folder: `linkrise spread --shard k/n` writes it as
// spread_shard.json, and `linkrise merge` (app/studies/spread_merge.h) rebuilds the whole study from the records
// of all n shards. It holds what the merge checks — which case (the file's bytes and the --set values, and a hash
// of both), mode, seed, population, shard k/n and its sample range, the linkrise version — and what it needs to
// write the study as one run would: the case text itself (so the merge needs no copy of the case file), the
// metric columns, and every sample's status, outcome, verdict, message and metrics. The CSV keeps 9 digits; the
// record keeps every number exactly (JSON numbers with the shortest text that reads back as the same double;
// null for NaN, "inf" and "-inf" for infinities).
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <iosfwd>
#include <string>
#include <vector>

#include "app/studies/spread.h"

namespace linkrise::app {

/// The file name of the record in a shard's output folder.
inline constexpr char kSpreadRecordFile[] = "spread_shard.json";

struct SpreadRecord {
  std::filesystem::path folder;  // where it was read from (empty when made in memory)
  std::string version;           // the linkrise version that computed the shard
  std::string case_file;         // the case file as the shard's command line named it
  std::string case_text;         // its bytes
  std::vector<std::string> settings;  // --set PATH=VALUE, in order
  std::string identity;               // case_identity(case_text, settings)
  SpreadPlan plan;
  std::size_t population = 0;
  IndexRange range;
  std::vector<MetricColumn> columns;
  PointResult nominal;
  std::vector<PointResult> points;  // point p is sample range.begin + p
};

/// FNV-1a, 64 bit (Fowler, Noll and Vo): a fast hash that tells texts apart; no protection against forgery.
std::uint64_t fnv1a_64(const std::string& bytes);
/// "fnv1a64:" and 16 hex digits: fnv1a_64 of the case text and each setting, each preceded by its length and ':'.
std::string case_identity(const std::string& case_text, const std::vector<std::string>& settings);

/// A case file's bytes. Throws InputError when it cannot be read (the message a case load gives).
std::string read_case_text(const std::string& path);

/// spread_shard.json as text, for a spread computed from `case_text` with `settings`.
std::string spread_record_json(const Spread& spread, const std::string& case_text,
                               const std::vector<std::string>& settings);
/// The same text written to `out` sample by sample (not held as text).
void write_spread_record_json(std::ostream& out, const Spread& spread, const std::string& case_text,
                              const std::vector<std::string>& settings);

/// Reads the record in `folder`. Throws InputError naming the folder when there is none, or it is not a record
/// this version can read.
SpreadRecord read_spread_record(const std::filesystem::path& folder);

}  // namespace linkrise::app
