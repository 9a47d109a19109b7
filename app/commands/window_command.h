#pragma once
// `linkrise window CASE.yaml --corners | --samples N [--margin 20%]`: the BMS fault window
// (app/studies/fault_window.h); writes window.json and spread_samples.csv, and with --report an HTML report.
#include <string>

#include "app/commands/spread_command.h"

namespace linkrise::app {

struct WindowArguments {
  SpreadArguments spread;
  std::string margin = "20 %";
};

int window_command(const WindowArguments& arguments);

}  // namespace linkrise::app
