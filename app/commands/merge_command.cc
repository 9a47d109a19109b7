#include "app/commands/merge_command.h"

#include "app/commands/command_steps.h"
#include "app/commands/spread_output.h"
#include "app/studies/spread_merge.h"
#include "app/studies/spread_record.h"

namespace linkrise::app {

int merge_command(const MergeArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    std::vector<SpreadRecord> records;
    for (const auto& folder : arguments.folders) records.push_back(read_spread_record(folder));
    const Spread spread = merge_spread(std::move(records));
    return spread_output(spread, arguments.metrics, arguments.output_directory, arguments.report);
  });
}

}  // namespace linkrise::app
