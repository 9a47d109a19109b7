#include "app/studies/spread_record.h"

#include <cmath>
#include <cstdint>
#include <fstream>
#include <limits>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "app/output/json_fields.h"
#include "netlist/case_document.h"
#include "netlist/input_error.h"

namespace linkrise::app {
using netlist::InputError;
using nlohmann::json;

namespace {

constexpr int kFormat = 1;
constexpr char kKind[] = "linkrise spread shard";

json exact(double value) {
  if (std::isnan(value)) return nullptr;
  if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
  return value;
}

double exact_value(const json& value) {
  if (value.is_null()) return std::numeric_limits<double>::quiet_NaN();
  if (value.is_string()) {
    const auto text = value.get<std::string>();
    if (text == "inf") return std::numeric_limits<double>::infinity();
    if (text == "-inf") return -std::numeric_limits<double>::infinity();
    throw std::invalid_argument(fmt::format("'{}' is not a number", text));
  }
  return value.get<double>();
}

json point_json(const PointResult& point) {
  json values = json::array();
  for (double value : point.values) values.push_back(exact(value));
  return {{"status", status_word(point.status)},
          {"message", point.message},
          {"outcome", point.outcome},
          {"verdict", analysis::verdict_word(point.verdict)},
          {"values", values}};
}

template <class Enum>
Enum from_word(const std::string& text, std::initializer_list<Enum> choices, const char* (*word_of)(Enum)) {
  for (Enum choice : choices) {
    if (text == word_of(choice)) return choice;
  }
  throw std::invalid_argument(fmt::format("'{}' is not a known word here", text));
}

void check_width(const PointResult& point, std::size_t columns) {
  if (!point.values.empty() && point.values.size() != columns) {
    throw std::invalid_argument(fmt::format("a sample has {} values for {} columns", point.values.size(), columns));
  }
}

PointResult read_point(const json& entry) {
  using Status = CaseEvaluation::Status;
  PointResult point;
  point.status = from_word(entry.at("status").get<std::string>(),
                           {Status::Evaluated, Status::InputError, Status::SolverFailure}, &status_word);
  point.message = entry.at("message").get<std::string>();
  point.outcome = entry.at("outcome").get<std::string>();
  point.verdict = from_word(entry.at("verdict").get<std::string>(), {analysis::Verdict::Pass, analysis::Verdict::Fail},
                            &analysis::verdict_word);
  for (const auto& value : entry.at("values")) point.values.push_back(exact_value(value));
  return point;
}

SpreadRecord record_from(const json& file, std::vector<PointResult> samples, const std::filesystem::path& folder) {
  if (file.at("record").get<std::string>() != kKind || file.at("format").get<int>() != kFormat) {
    throw std::invalid_argument(fmt::format("not a '{}' record of format {}", kKind, kFormat));
  }
  SpreadRecord record;
  record.folder = folder;
  record.version = file.at("tool").at("version").get<std::string>();
  record.case_file = file.at("case").at("file").get<std::string>();
  record.case_text = file.at("case_text").get<std::string>();
  record.settings = file.at("settings").get<std::vector<std::string>>();
  record.identity = file.at("case_identity").get<std::string>();
  const std::string mode = file.at("mode").get<std::string>();
  if (mode != "corners" && mode != "monte_carlo") throw std::invalid_argument("mode '" + mode + "' is unknown");
  record.plan.corners = mode == "corners";
  record.plan.seed = file.at("seed").get<std::uint64_t>();
  record.population = file.at("population").get<std::size_t>();
  record.plan.samples = record.plan.corners ? 0 : record.population;
  const json& shard = file.at("shard");
  record.plan.shard = shard.at("k").get<int>();
  record.plan.shards = shard.at("n").get<int>();
  record.range.begin = shard.at("first").get<std::size_t>();
  record.range.end = record.range.begin + shard.at("count").get<std::size_t>();
  for (const auto& column : file.at("columns")) {
    record.columns.push_back({column.at("name").get<std::string>(), column.at("unit").get<std::string>()});
  }
  if (!file.contains("samples")) throw std::invalid_argument("the record has no samples");
  record.nominal = read_point(file.at("nominal"));
  record.points = std::move(samples);
  check_width(record.nominal, record.columns.size());
  for (const auto& point : record.points) check_width(point, record.columns.size());
  if (record.points.size() != record.range.size()) {
    throw std::invalid_argument(fmt::format("{} samples for a shard of {}", record.points.size(), record.range.size()));
  }
  return record;
}

}  // namespace

std::uint64_t fnv1a_64(const std::string& bytes) {
  std::uint64_t hash = 14695981039346656037ULL;  // the 64-bit offset basis
  for (unsigned char byte : bytes) {
    hash ^= byte;
    hash *= 1099511628211ULL;  // the 64-bit FNV prime
  }
  return hash;
}

std::string case_identity(const std::string& case_text, const std::vector<std::string>& settings) {
  std::string bytes = fmt::format("{}:{}", case_text.size(), case_text);
  for (const auto& setting : settings) bytes += fmt::format("{}:{}", setting.size(), setting);
  return fmt::format("fnv1a64:{:016x}", fnv1a_64(bytes));
}

std::string read_case_text(const std::string& path) {
  (void)netlist::CaseDocument::load(path);  // the case loader's messages for a missing file, a folder, bad YAML
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

void write_spread_record_json(std::ostream& out, const Spread& spread, const std::string& case_text,
                              const std::vector<std::string>& settings) {
  json columns = json::array();
  for (const auto& column : spread.results.columns) columns.push_back({{"name", column.name}, {"unit", column.unit}});
  const json head = with_file_head({{"record", kKind},
                                    {"format", kFormat},
                                    {"case_identity", case_identity(case_text, settings)},
                                    {"case_text", case_text},
                                    {"settings", settings},
                                    {"mode", spread.plan.corners ? "corners" : "monte_carlo"},
                                    {"seed", spread.plan.seed},
                                    {"population", spread.population},
                                    {"shard", {{"k", spread.plan.shard}, {"n", spread.plan.shards},
                                               {"first", spread.range.begin}, {"count", spread.range.size()}}},
                                    {"columns", columns},
                                    {"nominal", point_json(spread.nominal.points.at(0))}},
                                   spread.title, spread.case_file);
  // The samples last, one line each, written one at a time: no JSON tree of the whole population in memory.
  std::string text = json_text(head);
  text.resize(text.rfind('}'));
  while (!text.empty() && text.back() == '\n') text.pop_back();
  text += ",\n  \"samples\": [";
  out << text;
  const auto& points = spread.results.points;
  for (std::size_t p = 0; p < points.size(); ++p) out << (p == 0 ? "\n    " : ",\n    ") << point_json(points[p]).dump();
  out << (points.empty() ? "]\n}\n" : "\n  ]\n}\n");
}

std::string spread_record_json(const Spread& spread, const std::string& case_text,
                               const std::vector<std::string>& settings) {
  std::ostringstream out;
  write_spread_record_json(out, spread, case_text, settings);
  return out.str();
}

SpreadRecord read_spread_record(const std::filesystem::path& folder) {
  const std::filesystem::path file = folder / kSpreadRecordFile;
  const netlist::SourceMark mark{file.string(), 0, 0};
  std::ifstream in(file, std::ios::binary);
  if (!in) {
    throw InputError(mark, fmt::format("{} holds no {}: it is not the output folder of a sharded spread",
                                       folder.string(), kSpreadRecordFile),
                     "name the folders `linkrise spread ... --shard k/n -o FOLDER` wrote");
  }
  try {
    // Each sample is turned into its point as soon as it is read and dropped from the tree, so the whole
    // population is never a JSON tree in memory.
    std::vector<PointResult> samples;
    std::string top_key;
    const auto take_samples = [&](int depth, json::parse_event_t event, json& parsed) {
      if (depth == 1 && event == json::parse_event_t::key) top_key = parsed.get<std::string>();
      if (depth != 2 || event != json::parse_event_t::object_end || top_key != "samples") return true;
      samples.push_back(read_point(parsed));
      return false;
    };
    json file = json::parse(in, take_samples);
    return record_from(file, std::move(samples), folder);
  } catch (const std::exception& error) {
    throw InputError(mark, fmt::format("this is not a readable shard record: {}", error.what()),
                     "run the shard again with this version of linkrise");
  }
}

}  // namespace linkrise::app
