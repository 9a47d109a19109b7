#pragma once
// Process exit codes, shared by every command.
namespace linkrise::app {
constexpr int kExitOk = 0;
constexpr int kExitLimitFailed = 1;   // a limit failed, an unexpected fault fired, or a regression
constexpr int kExitInputError = 2;    // bad case file or command line
constexpr int kExitSolverFailure = 3;  // the solver gave up
}  // namespace linkrise::app
