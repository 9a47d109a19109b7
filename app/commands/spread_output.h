#pragma once
// What `linkrise spread` and `linkrise merge` write for a spread, written once: spread_samples.csv, spread.json,
// the optional HTML report, the terminal text and the exit code.
#include <memory>
#include <string>

#include "app/commands/command_steps.h"
#include "app/studies/spread.h"

namespace linkrise::app {

/// `metrics` is the --metrics option ("" for the headline). The output keeps the spread: spread_samples.csv is
/// streamed from it when the output set is written.
CommandOutput spread_output(std::shared_ptr<const Spread> spread, const std::string& metrics,
                            const std::string& output_directory, const std::string& report);

}  // namespace linkrise::app
