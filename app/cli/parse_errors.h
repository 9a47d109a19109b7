#pragma once
// What linkrise prints for a command line CLI11 refused: the problem in the style of every input error, the
// nearest command or option for a misspelt one, and where the options are listed.
#include <string>

#include <CLI/CLI.hpp>

namespace linkrise::app {

/// "linkrise: error: …\n  fix: …" for `error`, raised while `cli` parsed argv.
std::string parse_error_text(const CLI::App& cli, const CLI::ParseError& error, int argc, const char* const* argv);

/// A validator for a count option: a whole number of at least `minimum`, said in those words.
CLI::Validator whole_number(long minimum);

}  // namespace linkrise::app
