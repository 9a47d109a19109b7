#include "netlist/run_spec.h"

#include <cmath>

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

namespace {
FieldProblem problem(const char* field, double value, std::string rule, std::string why, std::string fix,
                     const SourceMark& mark) {
  return FieldProblem{field, value, std::move(rule), std::move(why), std::move(fix), mark};
}

// A non-finite value can only come from the command line: the case file's quantity reader rejects it.
std::optional<FieldProblem> not_finite(const char* field, double value, const SourceMark& mark) {
  if (std::isfinite(value)) return std::nullopt;
  return problem(field, value, "must be a finite number", "the solver works with finite times and tolerances",
                 "write an ordinary number", mark);
}

std::optional<FieldProblem> check_relative_tolerance(const RunSpec& run) {
  const double rtol = run.relative_tolerance;
  if (!(rtol >= kTightestRelativeTolerance)) {
    return problem("rtol", rtol, fmt::format("must be at least {:g}", kTightestRelativeTolerance),
                   rtol > 0.0 ? "tighter is below what double precision can resolve here: the network solve "
                                "inside every step stops at about 1e-14 relative, and the error test would chase "
                                "its rounding"
                              : "it is a positive fraction of each value",
                   fmt::format("use {:g} or looser (the default is 1e-7)", kTightestRelativeTolerance),
                   run.marks.rtol);
  }
  if (!(rtol <= kLoosestRelativeTolerance)) {
    return problem("rtol", rtol, fmt::format("must be at most {:g}", kLoosestRelativeTolerance),
                   "looser than 1 % is too loose to judge limits: the error control would be coarser than the "
                   "limits' margins, the BMS thresholds and the energy audit",
                   "use 1e-6 or tighter (the default is 1e-7)", run.marks.rtol);
  }
  return std::nullopt;
}

std::optional<FieldProblem> check_times(const RunSpec& run) {
  if (!(run.duration > 0.0)) {
    return problem(run.follows_sequence() ? "max_duration" : "duration", run.duration, "must be greater than 0 s",
                   "a run needs a length", "write a positive time such as '2 s'", run.marks.duration);
  }
  if (run.settle && !(*run.settle >= 0.0)) {
    return problem("settle", *run.settle, "must not be negative",
                   "it is how long the run goes on after the sequence's last event",
                   "write e.g. '200 ms', or '0 s' to end at the last event", run.marks.settle);
  }
  if (!(run.max_step >= 0.0)) {
    return problem("max_step", run.max_step, "must not be negative", "it bounds the solver's step (0: no bound)",
                   "write '0 s' for no bound or a positive time such as '1 ms'", run.marks.max_step);
  }
  if (!(run.max_wall_time > 0.0)) {
    return problem("max_wall_time", run.max_wall_time, "must be greater than 0 s",
                   "it is the wall-clock time one run may take before the solver gives up",
                   "write a positive time such as '60 s' (the default is 300 s)", run.marks.max_wall_time);
  }
  if (run.sample && !(*run.sample > 0.0)) {
    return problem("sample", *run.sample, "must be greater than 0 s", "it is the spacing of the output grid",
                   "write a positive time such as '100 us', or leave it out for one row per step",
                   run.marks.sample);
  }
  return std::nullopt;
}
}  // namespace

std::optional<FieldProblem> check_run(const RunSpec& run) {
  const std::pair<const char*, double> finite_fields[] = {
      {"duration", run.duration}, {"rtol", run.relative_tolerance}, {"atol", run.absolute_tolerance},
      {"max_step", run.max_step}, {"sample", run.sample.value_or(1.0)}, {"max_wall_time", run.max_wall_time},
      {"settle", run.settle.value_or(0.0)}};
  const SourceMark* marks[] = {&run.marks.duration, &run.marks.rtol,   &run.marks.atol,         &run.marks.max_step,
                               &run.marks.sample,   &run.marks.max_wall_time, &run.marks.settle};
  for (std::size_t i = 0; i < std::size(finite_fields); ++i) {
    if (auto found = not_finite(finite_fields[i].first, finite_fields[i].second, *marks[i])) return found;
  }
  if (auto found = check_times(run)) return found;
  if (auto found = check_relative_tolerance(run)) return found;
  if (!(run.absolute_tolerance > 0.0)) {
    return problem("atol", run.absolute_tolerance, "must be greater than 0",
                   "with 0 a state passing through zero has no error control left",
                   "use e.g. 1e-8 (the default), in each state's SI unit", run.marks.atol);
  }
  if (run.max_steps < kFewestSteps) {
    return problem("max_steps", static_cast<double>(run.max_steps), fmt::format("must be at least {}", kFewestSteps),
                   "even a single RC charge takes dozens of steps",
                   "write a whole number such as 2000000 (the default)", run.marks.max_steps);
  }
  return std::nullopt;
}

InputError run_input_error(const FieldProblem& found) {
  return InputError(found.mark,
                    fmt::format("run setting '{}' = {:g} {} ({})", found.field, found.value, found.rule, found.why),
                    found.fix);
}

void require_valid_run(const RunSpec& run) {
  if (auto found = check_run(run)) throw run_input_error(*found);
}

namespace {
// `duration: 2 s`, or `duration: sequence` with `settle` and an optional `max_duration` (the cap duration holds).
void read_length(ParameterReader& reader, RunSpec& run) {
  if (!reader.is_word("duration", "sequence")) {
    run.duration = reader.required("duration", Dimension::time(), Bound::Any);
    for (const char* key : {"settle", "max_duration"}) {
      if (!reader.has(key)) continue;
      reader.accept(key);
      reader.fail(key, fmt::format("'{}' belongs to 'duration: sequence'; this run lasts its fixed duration", key),
                  "write 'duration: sequence' to end the run after the sequence, or remove this line");
    }
    return;
  }
  reader.accept("duration");
  if (!reader.has("settle")) {
    reader.reject_misspelling("settle");
    reader.fail("duration", "'duration: sequence' needs 'settle', how long the run goes on after the sequence's "
                            "last event",
                "add e.g. 'settle: 200 ms'");
  }
  run.settle = reader.required("settle", Dimension::time(), Bound::Any);
  run.duration = reader.quantity("max_duration", Dimension::time(), Bound::Any, kDefaultMaxDuration);
}
}  // namespace

RunSpec read_run(const Tree& block) {
  RunSpec run;
  ParameterReader reader(block, "the run block");
  // Units and form are the reader's; the ranges are check_run's alone.
  read_length(reader, run);
  run.relative_tolerance = reader.quantity("rtol", Dimension::none(), Bound::Any, run.relative_tolerance);
  run.absolute_tolerance_given = reader.has("atol");
  run.absolute_tolerance = reader.quantity("atol", Dimension::none(), Bound::Any, run.absolute_tolerance);
  run.max_step = reader.quantity("max_step", Dimension::time(), Bound::Any, run.max_step);
  run.sample = reader.optional("sample", Dimension::time(), Bound::Any);
  run.max_steps = reader.count("max_steps", static_cast<int>(run.max_steps), 0);
  run.settle_fast_states = reader.word("fast_states", {"settle", "resolve"}, "settle") == "settle";
  run.carry_transients = reader.word("transients", {"carry", "resolve"}, "resolve") == "carry";
  run.max_wall_time = reader.quantity("max_wall_time", Dimension::time(), Bound::Any, run.max_wall_time);
  reader.finish();
  run.marks = {run.follows_sequence() && reader.has("max_duration") ? reader.mark("max_duration")
                                                                    : reader.mark("duration"),
               reader.mark("rtol"),      reader.mark("atol"),
               reader.mark("max_step"), reader.mark("sample"),    reader.mark("max_steps"),
               reader.mark("max_wall_time"), reader.mark("settle")};
  require_valid_run(run);
  return run;
}

}  // namespace linkrise::netlist
