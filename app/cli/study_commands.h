#pragma once
// The study subcommands (compare, sweep, spread, merge, window, size, fit) registered on the CLI in one place, so
// main.cc needs one line to add them and one to dispatch.
#include <optional>

#include <CLI/CLI.hpp>

#include "app/commands/compare_command.h"
#include "app/commands/fit_command.h"
#include "app/commands/merge_command.h"
#include "app/commands/size_command.h"
#include "app/commands/spread_command.h"
#include "app/commands/sweep_command.h"
#include "app/commands/window_command.h"

namespace linkrise::app {

/// The help of every --set option.
inline constexpr const char* kSetHelp = "override a parameter first, e.g. r_pre.resistance=56Ohm (repeatable)";

class StudyCommands {
 public:
  explicit StudyCommands(CLI::App& cli);
  /// The exit code of the study subcommand that was parsed, or nothing when another one was.
  std::optional<int> dispatch() const;

 private:
  CompareArguments compare_;
  SweepArguments sweep_;
  SpreadArguments spread_;
  MergeArguments merge_;
  WindowArguments window_;
  SizeArguments size_;
  FitArguments fit_;
  CLI::App* compare_cli_ = nullptr;
  CLI::App* sweep_cli_ = nullptr;
  CLI::App* spread_cli_ = nullptr;
  CLI::App* merge_cli_ = nullptr;
  CLI::App* window_cli_ = nullptr;
  CLI::App* size_cli_ = nullptr;
  CLI::App* fit_cli_ = nullptr;
};

}  // namespace linkrise::app
