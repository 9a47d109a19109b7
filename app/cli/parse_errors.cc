#include "app/cli/parse_errors.h"

#include <fmt/format.h>

#include "netlist/input_error.h"

namespace linkrise::app {
namespace {

std::string joined(const std::vector<std::string>& words) {
  std::string text;
  for (const auto& word : words) text += (text.empty() ? "" : ", ") + word;
  return text;
}

std::vector<std::string> option_names(const CLI::App& command) {
  std::vector<std::string> names;
  for (const CLI::Option* option : command.get_options()) {
    for (const auto& name : option->get_lnames()) names.push_back("--" + name);
    for (const auto& name : option->get_snames()) names.push_back("-" + name);
  }
  return names;
}

std::string compose(const std::string& problem, const std::string& fix) {
  return fmt::format("linkrise: error: {}\n  fix: {}\n", problem, fix);
}

// The first word that starts with '-' and names no option of `command` (the text before '=' of --opt=value).
std::string unknown_option(const CLI::App& command, int first, int argc, const char* const* argv) {
  for (int i = first; i < argc; ++i) {
    std::string word = argv[i];
    if (word.size() < 2 || word[0] != '-' || (word[1] >= '0' && word[1] <= '9') || word[1] == '.') continue;
    std::string name = word.substr(0, word.find('='));
    if (command.get_option_no_throw(name) == nullptr) return name;
  }
  return "";
}

// CLI11's "Could not convert: --rtol = abc" in plain words.
std::string conversion_problem(const std::string& text) {
  const std::string head = "Could not convert: ";
  std::size_t equals = text.find(" = ");
  if (text.rfind(head, 0) != 0 || equals == std::string::npos) return text;
  return fmt::format("option {}: '{}' is not a number", text.substr(head.size(), equals - head.size()),
                     text.substr(equals + 3));
}

}  // namespace

CLI::Validator whole_number(long minimum) {
  return CLI::Validator(
      [minimum](std::string& text) -> std::string {
        std::size_t used = 0;
        long value = 0;
        try {
          value = std::stol(text, &used);
        } catch (const std::exception&) {
          used = 0;
        }
        if (used == text.size() && !text.empty() && value >= minimum) return "";
        return fmt::format("'{}' must be a whole number of at least {}", text, minimum);
      },
      fmt::format("INT>={}", minimum), "whole number");
}

std::string parse_error_text(const CLI::App& cli, const CLI::ParseError& error, int argc, const char* const* argv) {
  const CLI::App* command = nullptr;
  int first = 1;
  for (; first < argc && command == nullptr; ++first) {
    for (const CLI::App* sub : cli.get_subcommands([](const CLI::App*) { return true; })) {
      if (sub->check_name(argv[first])) command = sub;
    }
  }
  std::vector<std::string> commands;
  for (const CLI::App* sub : cli.get_subcommands([](const CLI::App*) { return true; })) {
    commands.push_back(sub->get_name());
  }
  if (command == nullptr) {
    if (argc > 1 && argv[1][0] != '-') {
      return compose(fmt::format("'{}' is not a linkrise command", argv[1]),
                     netlist::did_you_mean(argv[1], commands, "the commands are " + joined(commands)));
    }
    return compose(error.what(), fmt::format("name a command ({}), e.g. 'linkrise run case.yaml'", joined(commands)));
  }
  const std::string help = fmt::format("'linkrise {} --help' lists its options", command->get_name());
  std::string unknown = unknown_option(*command, first, argc, argv);
  if (!unknown.empty()) {
    return compose(fmt::format("'{}' is not an option of 'linkrise {}'", unknown, command->get_name()),
                   netlist::did_you_mean(unknown, option_names(*command), help));
  }
  return compose(fmt::format("linkrise {}: {}", command->get_name(), conversion_problem(error.what())), help);
}

}  // namespace linkrise::app
