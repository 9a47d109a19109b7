#include "netlist/run_spec.h"

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

RunSpec read_run(const Tree& root) {
  RunSpec run;
  const Tree* block = root.find("run");
  if (block == nullptr) {
    throw InputError(root.mark, "the case has no 'run' block", "add 'run: {duration: 2 s}'");
  }
  ParameterReader reader(*block, "the run block");
  run.duration = reader.required("duration", Dimension::time(), Bound::Positive);
  run.relative_tolerance = reader.quantity("rtol", Dimension::none(), Bound::Positive, run.relative_tolerance);
  run.absolute_tolerance = reader.quantity("atol", Dimension::none(), Bound::Positive, run.absolute_tolerance);
  run.max_step = reader.quantity("max_step", Dimension::time(), Bound::NonNegative, 0.0);
  run.sample = reader.optional("sample", Dimension::time(), Bound::Positive);
  run.max_steps = reader.count("max_steps", 2'000'000, 10);
  if (run.relative_tolerance < 1e-14) {
    reader.fail("rtol", fmt::format("{} is below what double precision can resolve", run.relative_tolerance),
                "use 1e-12 or looser");
  }
  if (run.relative_tolerance > 1e-2) {
    reader.fail("rtol", fmt::format("{} is too loose to judge limits", run.relative_tolerance), "use 1e-6 or tighter");
  }
  reader.finish();
  return run;
}

}  // namespace linkrise::netlist
