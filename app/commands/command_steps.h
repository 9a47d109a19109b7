#pragma once
// The steps every command shares, written once: compute, stage the output set, commit it, write the report and
// the other stand-alone files, print, and turn bad input into exit code 2 with nothing written.
//
// A command computes a CommandOutput (every file's text, the report included, is built before anything is
// written, so a failure leaves no half-written set) and hands it to carry_out(). Files of the output set appear
// together or not at all (app/output/output_files.h); the report and the stand-alone files follow them one by
// one, each written atomically.
#include <filesystem>
#include <functional>
#include <iosfwd>
#include <stdexcept>
#include <string>
#include <vector>

#include "app/commands/exit_codes.h"

namespace linkrise::app {

struct StagedFile {
  std::string name;  // inside CommandOutput::directory
  std::string content;
  // When set, writes the file's text instead of `content`: a large file (a study's samples) streamed into its
  // temporary file rather than held as text. It formats what is already computed, so it throws no input error.
  std::function<void(std::ostream&)> write = nullptr;
};

struct StandaloneFile {
  std::filesystem::path path;
  std::string content;
};

/// How the "wrote" and "report" lines are laid out: in the run summary's label column (run, faults) or
/// after a single space (the studies).
enum class ListingLayout { Columns, Compact };

struct CommandOutput {
  std::string directory;            // where the output set goes (unused without files)
  std::vector<StagedFile> files;    // the output set, listed on the "wrote" line in this order
  std::string files_note;           // after the file names on the "wrote" line, e.g. " (every metric per point)"
  std::string report_file;          // the HTML report; empty: none
  std::string report;               // its text
  std::vector<StandaloneFile> standalone;  // written after the report, e.g. JUnit XML and golden files
  std::string text;                 // printed before the "wrote" and "report" lines, unless quiet
  ListingLayout layout = ListingLayout::Compact;
  int exit_code = kExitOk;
};

/// A command's own failure (e.g. the solver gave up on the case): the message goes to stderr, nothing is
/// written and the process exits with `exit_code`.
class CommandFailure : public std::runtime_error {
 public:
  CommandFailure(int exit_code, const std::string& message) : std::runtime_error(message), exit_code_(exit_code) {}
  int exit_code() const { return exit_code_; }

 private:
  int exit_code_;
};

/// Runs `compute`, then writes, commits and prints what it returned (in an MPI job, the first rank alone writes);
/// returns the process exit code. Bad input
/// (netlist::InputError) prints the error and returns kExitInputError; a CommandFailure returns its code.
int carry_out(bool quiet, const std::function<CommandOutput()>& compute);

}  // namespace linkrise::app
