#include "app/commands/merge_command.h"

#include <memory>

#include "app/commands/command_steps.h"
#include "app/commands/spread_output.h"
#include "app/studies/spread_merge.h"
#include "app/studies/spread_record.h"

namespace linkrise::app {

int merge_command(const MergeArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    std::vector<SpreadRecord> records;
    for (const auto& folder : arguments.folders) records.push_back(read_spread_record(folder));
    return spread_output(std::make_shared<const Spread>(merge_spread(std::move(records))), arguments.metrics,
                         arguments.output_directory, arguments.report);
  });
}

}  // namespace linkrise::app
