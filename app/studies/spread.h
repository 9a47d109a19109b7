#pragma once
// `linkrise spread CASE.yaml --corners | --samples N [--seed S] [--shard k/n]`: the tolerance spread of a case
// over its `tolerances:` block (app/studies/study_tolerances.h).
//
// Corner mode: every combination of the parameters' bounds, 2^k cases (corner c puts parameter j at its upper
// bound when bit j of c is set); a warning names the count above 256 corners, and more than 65536 are refused.
// Monte Carlo mode: sample i draws parameter j from uniform_draw(seed, i, j) (app/studies/random_stream.h), a pure
// function of (seed, i, j): results are identical at any thread count, and `--shard k/n` runs the k-th of n
// contiguous blocks of the sample indices with the same values the whole population would give them.
//
// Statistics per metric over the samples that reached it: min, p0.1, p1, p50, p99, p99.9, max, with the
// quantile of Hyndman & Fan type 7 (linear interpolation between order statistics: h = (n − 1)·p,
// q = x⌊h⌋ + (h − ⌊h⌋)·(x⌊h⌋+1 − x⌊h⌋), x sorted ascending, 0-based) — the default of R and NumPy. The worst
// sample of a metric is the one with the largest value (the smallest for metrics where larger is better,
// see larger_is_better), the lowest index on a tie. Writes spread_samples.csv (every sample's parameters and
// metrics, no waveforms) and spread.json. Exit 0 when every sample was evaluated and passed, 1 when some
// sample's verdict failed, 2 for bad input, 3 when the solver failed on a sample.
#include <cstdint>
#include <iosfwd>
#include <limits>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "app/studies/study_pool.h"
#include "app/studies/study_run.h"
#include "app/studies/study_tolerances.h"

namespace linkrise::app {

struct SpreadPlan {
  bool corners = false;
  std::size_t samples = 0;  // Monte Carlo population size
  std::uint64_t seed = 1;
  int shard = 1, shards = 1;
};

/// "k/n" -> shard k of n (1 <= k <= n); nothing for any other text.
std::optional<std::pair<int, int>> read_shard(const std::string& text);
/// "k/n" -> shard k of n in `plan`. Throws InputError.
void parse_shard(const std::string& text, SpreadPlan& plan);

/// The value of tolerance `slot` in sample (or corner) `index`.
double spread_value(const std::vector<Tolerance>& tolerances, const SpreadPlan& plan, std::size_t index,
                    std::size_t slot);
/// The overrides of sample `index`.
std::vector<netlist::Override> spread_overrides(const std::vector<Tolerance>& tolerances, const SpreadPlan& plan,
                                                std::size_t index);

/// Corners or samples of the whole study (all shards); warns above 256 corners. Throws InputError for more
/// corners than a study runs.
std::size_t population_size(const std::vector<Tolerance>& tolerances, const SpreadPlan& plan);

/// Quantile of ascending `sorted` values at probability p (Hyndman & Fan type 7); NaN when empty.
double quantile(const std::vector<double>& sorted, double p);

struct MetricSpread {
  std::string name, unit;
  std::size_t reached = 0;
  double minimum = std::numeric_limits<double>::quiet_NaN(), p0_1 = minimum, p1 = minimum, p50 = minimum,
         p99 = minimum, p99_9 = minimum, maximum = minimum;
  long worst = -1;  // point index (into Spread::results) of the worst sample, -1 when none reached it
};

struct Spread {
  std::string case_file, title;
  std::vector<Tolerance> tolerances;
  SpreadPlan plan;
  std::size_t population = 0;  // corners or samples of the whole study (all shards)
  IndexRange range;            // the sample indices this run covers
  StudyResults nominal;        // one point: the case without tolerances
  StudyResults results;        // point p is sample range.begin + p
  std::vector<MetricSpread> statistics;  // one per metric column
  std::vector<std::string> headline;
  std::size_t index(std::size_t point) const { return range.begin + point; }
  std::size_t failed() const;  // samples whose verdict failed
};

/// Runs the spread on the case with `settings` applied. Throws InputError (no tolerances, bad block, too many
/// corners, a sample out of a parameter's range).
Spread run_spread(const std::string& case_file, const std::vector<netlist::Override>& settings,
                  const SpreadPlan& plan, int jobs, const std::string& progress_label = "");
/// The same on a case document (a design alternative, overrides applied).
Spread run_spread(const netlist::CaseDocument& base, const SpreadPlan& plan, int jobs,
                  const std::string& progress_label = "");

/// The statistics per metric and the headline of a spread whose points are in place (after run_spread's pool,
/// or gathered from shards by merge_spread). `nominal` is the case without tolerances.
void summarise_spread(Spread& spread, const netlist::Case& nominal);

std::string spread_text(const Spread& spread, const std::vector<std::string>& metrics);
std::string spread_csv(const Spread& spread);
/// The same text, written to `out` sample by sample (spread_samples.csv is about 0.9 kB per sample of 72 metrics,
/// so a large study streams it into its temporary file instead of holding it).
void write_spread_csv(std::ostream& out, const Spread& spread);
/// spread.json as text.
std::string spread_json(const Spread& spread);
/// "r_pre.resistance = 31.35 Ohm, ambient = -20 degC" for the sample at `point`.
std::string sample_parameters(const Spread& spread, std::size_t point);

/// The plan from the command line (exactly one of --corners and --samples). Throws InputError.
/// `command` names the subcommand in the hint ("spread", "window").
SpreadPlan spread_plan(bool corners, std::size_t samples, std::uint64_t seed, const std::string& shard,
                       const std::string& command = "spread");

}  // namespace linkrise::app
