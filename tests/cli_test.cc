// The built `linkrise` binary end to end: outputs of the demo case, exit codes 0 / 2 / 3, no output on failure.
// Numbers are regression-checked with digit tolerances, never by byte equality of floating text.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace {
namespace fs = std::filesystem;

struct Outcome {
  int exit_code = -1;
  std::string out, err;
};

std::string slurp(const fs::path& path) {
  std::ifstream stream(path);
  std::stringstream text;
  text << stream.rdbuf();
  return text.str();
}

class Cli : public ::testing::Test {
 protected:
  void SetUp() override {
    directory_ = fs::temp_directory_path() /
                 ("linkrise_cli_test_" + std::to_string(getpid()) + "_" +
                  ::testing::UnitTest::GetInstance()->current_test_info()->name());
    fs::remove_all(directory_);
    fs::create_directories(directory_);
  }
  void TearDown() override { fs::remove_all(directory_); }

  Outcome run(const std::string& arguments) const {
    fs::path out = directory_ / "stdout.txt", err = directory_ / "stderr.txt";
    std::string command = std::string("\"") + LINKRISE_BINARY + "\" " + arguments + " >\"" + out.string() + "\" 2>\"" +
                          err.string() + "\"";
    int status = std::system(command.c_str());
    Outcome outcome;
    outcome.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    outcome.out = slurp(out);
    outcome.err = slurp(err);
    fs::remove(out);
    fs::remove(err);
    return outcome;
  }
  fs::path write_case(const std::string& name, const std::string& text) const {
    fs::path path = directory_ / name;
    std::ofstream(path) << text;
    return path;
  }
  // A capacitor charged through a source's resistance; the run block `run_line` is line 5.
  fs::path write_capacitor_case(const std::string& name, const std::string& run_line) const {
    return write_case(name,
                      "ground: gnd\n"
                      "parts:\n"
                      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 V, "
                      "series_resistance: 1 Ohm}\n"
                      "  - {name: c1, kind: capacitor, nodes: [plus, gnd], capacitance: 1 uF}\n" +
                          run_line + "\n");
  }
  static std::vector<std::string> split(const std::string& line) {
    std::vector<std::string> cells;
    std::stringstream stream(line);
    for (std::string cell; std::getline(stream, cell, ',');) cells.push_back(cell);
    return cells;
  }
  static std::vector<std::string> lines(const std::string& text) {
    std::vector<std::string> result;
    std::stringstream stream(text);
    for (std::string line; std::getline(stream, line);) result.push_back(line);
    return result;
  }
  static bool empty_directory(const fs::path& path) { return !fs::exists(path) || fs::is_empty(path); }

  fs::path directory_;
};

// Every number in the summary sits in a {value, unit} pair.
void expect_units(const nlohmann::json& node, const std::string& where) {
  if (node.is_object()) {
    // A {value, unit} pair holds a number (or null, "not reached"); a judged limit's "value" is itself a pair.
    if (node.contains("value") && (node["value"].is_number() || node["value"].is_null())) {
      EXPECT_TRUE(node.contains("unit") && node["unit"].is_string()) << where;
      return;
    }
    for (auto it = node.begin(); it != node.end(); ++it) {
      if (it.key() == "version") continue;
      expect_units(it.value(), where + "." + it.key());
    }
  } else if (node.is_array()) {
    for (std::size_t i = 0; i < node.size(); ++i) expect_units(node[i], where + "[" + std::to_string(i) + "]");
  } else {
    EXPECT_FALSE(node.is_number()) << "bare number at " << where;
  }
}

const char* const kDemo = LINKRISE_SOURCE_DIR "/cases/demo_storage_rack.yaml";
}  // namespace

TEST_F(Cli, DemoCaseWritesWaveformsAndSummary) {
  fs::path output = directory_ / "demo";
  Outcome result = run(std::string("run \"") + kDemo + "\" -o \"" + output.string() + "\"");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  EXPECT_NE(result.out.find("energy"), std::string::npos) << result.out;

  auto csv = lines(slurp(output / "waveforms.csv"));
  ASSERT_GT(csv.size(), 100u);
  auto header = split(csv.front());
  ASSERT_FALSE(header.empty());
  EXPECT_EQ(header.front(), "time [s]");
  auto has = [&](const std::string& column) { return std::find(header.begin(), header.end(), column) != header.end(); };
  EXPECT_TRUE(has("link_plus [V]"));
  EXPECT_TRUE(has("pack_plus [V]"));
  EXPECT_TRUE(has("k_main.current [A]"));
  EXPECT_TRUE(has("r_pre.power [W]"));
  EXPECT_TRUE(has("rack.soc [%]"));
  for (const auto& column : header) {
    EXPECT_NE(column.find(" ["), std::string::npos) << column << " has no unit";
    EXPECT_EQ(column.find("[]"), std::string::npos) << column;
  }
  for (std::size_t r = 1; r < csv.size(); ++r) ASSERT_EQ(split(csv[r]).size(), header.size()) << "row " << r;

  nlohmann::json summary = nlohmann::json::parse(slurp(output / "summary.json"));
  EXPECT_EQ(summary["tool"]["name"], "linkrise");
  EXPECT_EQ(summary["outcome"], "completed");
  expect_units(summary, "summary");
  EXPECT_EQ(summary["energy_audit"]["relative_residual"]["unit"], "1");
  EXPECT_LE(summary["energy_audit"]["relative_residual"]["value"].get<double>(), 1e-6);
  EXPECT_EQ(summary["parts"]["link"]["stored_energy_end"]["unit"], "J");
  // Definitions are for people: plain words, never a source file.
  for (const auto& [name, metric] : summary["metrics"].items()) {
    const std::string definition = metric["definition"];
    for (const char* source : {".h", ".cc", "analysis/", "models/"}) {
      EXPECT_EQ(definition.find(source), std::string::npos) << name << ": " << definition;
    }
  }
  EXPECT_TRUE(summary["metrics"].contains("k_main.current_squared_time"));
  // A margin to a temperature rating is a difference, in K; relative margins are in %.
  for (const auto& limit : summary["limits"]) {
    if (limit["metric"] != "r_pre.peak_temperature") continue;
    EXPECT_EQ(limit["value"]["unit"], "degC");
    EXPECT_EQ(limit["margin"]["unit"], "K");
    EXPECT_EQ(limit["relative_margin"]["unit"], "%");
    EXPECT_NEAR(limit["margin"]["value"].get<double>(),
                limit["limit"]["value"].get<double>() - limit["value"]["value"].get<double>(), 1e-9);
  }

  // Regression with digit tolerances. The link's stored energy is ½·C·V² of its final voltage
  // (docs/references.md [R-RC-energy]; the ESR drop of the converter's and bleed's < 1 A is below 1e-5 of it).
  auto last = split(csv.back());
  int link_column = static_cast<int>(std::find(header.begin(), header.end(), "link_plus [V]") - header.begin());
  double v_link = std::stod(last[link_column]);
  double stored = summary["parts"]["link"]["stored_energy_end"]["value"].get<double>();
  EXPECT_NEAR(stored, 0.5 * 1.5e-3 * v_link * v_link, 1e-5 * stored);
  // The link ends at the rack's open-circuit voltage (176 × 3.70 V = 651.2 V at 50 % SOC, a little less as the
  // charge is drawn) less the drop of the converter's and bleed's current I over the loop: R0 = 176 × 0.5 mOhm,
  // k_neg 0.3 mOhm (default), k_main 0.2 mOhm, cable 2.9 mOhm, plus between none and all of the polarisation
  // pair's 176 × 0.3 mOhm as it charges (Thevenin cell model and Ohm's law, docs/references.md
  // [R-Thevenin-cell], [R-Ohm-Joule]).
  auto column_of = [&](const std::string& name) {
    return static_cast<int>(std::find(header.begin(), header.end(), name) - header.begin());
  };
  const double ocv = std::stod(last[column_of("rack.open_circuit_voltage [V]")]);
  const double current = std::stod(last[column_of("rack.current [A]")]);
  EXPECT_NEAR(ocv, 651.2, 0.05);
  const double series = 176 * 0.5e-3 + 0.3e-3 + 0.2e-3 + 2.9e-3, pair = 176 * 0.3e-3;
  EXPECT_LE(v_link, ocv - current * series + 1e-6);
  EXPECT_GE(v_link, ocv - current * (series + pair) - 1e-6);
  // Peak pre-charge current: the rack's OCV over the loop resistance at the first instant (capacitor at 0 V,
  // polarisation pair uncharged): 47 + 0.020 + 176 × 0.5 m + 2.9 m + 2 m + 0.3 m (k_neg default) Ohm [Ohm's law].
  double loop = 47.0 + 0.020 + 176 * 0.5e-3 + 2.9e-3 + 2e-3 + 0.3e-3;
  EXPECT_NEAR(summary["parts"]["r_pre"]["peak_current"]["value"].get<double>(), 651.2 / loop, 1e-3 * 651.2 / loop);
}

TEST_F(Cli, SampleOptionGivesAUniformGrid) {
  fs::path output = directory_ / "sampled";
  Outcome result = run(std::string("run \"") + kDemo + "\" --sample \"10 ms\" -q -o \"" + output.string() + "\"");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  EXPECT_TRUE(result.out.empty()) << "--quiet prints nothing: " << result.out;
  auto csv = lines(slurp(output / "waveforms.csv"));
  ASSERT_EQ(csv.size(), 1u + 51u);  // header, then 0, 10 ms ... 500 ms
  for (std::size_t r = 1; r < csv.size(); ++r) {
    EXPECT_NEAR(std::stod(split(csv[r]).front()), 0.01 * static_cast<double>(r - 1), 1e-12) << "row " << r;
  }
}

TEST_F(Cli, BadCaseExitsWithTwoAndWritesNothing) {
  fs::path output = directory_ / "bad_out";
  fs::create_directories(output);
  fs::path file = write_case("bad.yaml",
                             "ground: gnd\n"
                             "parts:\n"
                             "  - name: source\n"
                             "    kind: dc_source\n"
                             "    nodes: [plus, gnd]\n"
                             "    voltage: 400 V\n"
                             "  - name: r1\n"
                             "    kind: resistor\n"
                             "    nodes: [plus, gnd]\n"
                             "    resistance: 47 mF\n"
                             "run: {duration: 1 s}\n");
  Outcome result = run("run \"" + file.string() + "\" -o \"" + output.string() + "\"");
  EXPECT_EQ(result.exit_code, 2) << result.err;
  EXPECT_NE(result.err.find(file.string() + ":10:17:"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("fix:"), std::string::npos) << result.err;
  EXPECT_TRUE(empty_directory(output)) << "no output after an input error";

  Outcome missing = run("run \"" + (directory_ / "no_such_case.yaml").string() + "\" -o \"" + output.string() + "\"");
  EXPECT_EQ(missing.exit_code, 2) << missing.err;
  EXPECT_NE(missing.err.find("cannot open"), std::string::npos) << missing.err;
  EXPECT_TRUE(empty_directory(output));
}

TEST_F(Cli, SolverFailureExitsWithThreeAndItsOwnMessage) {
  // A 1 ps step limit over a 1 s run needs 1e12 steps: the run's step limit stops it [by construction].
  fs::path output = directory_ / "failed_out";
  fs::path file = write_capacitor_case("step_limit.yaml", "run: {duration: 1 s, max_step: 1 ps, max_steps: 20000}");
  Outcome result = run("run \"" + file.string() + "\" -q -o \"" + output.string() + "\"");
  EXPECT_EQ(result.exit_code, 3) << result.err;
  EXPECT_NE(result.err.find("solver failure"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("steps (run.max_steps) before t ="), std::string::npos) << result.err;
  // The reason in the circuit's terms: R·C = 1 Ohm × 1 uF = 1 us ([R-RC-charge]), and the 1 ps step bound
  // holds the step a million times below it.
  EXPECT_NE(result.err.find("step size reached: 1 ps"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("fastest time constant of the circuit: 1 µs, mostly part 'c1' charge_voltage"),
            std::string::npos) << result.err;
  EXPECT_NE(result.err.find("The step is held at run.max_step = 1 ps"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("suggestion:"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("raise run.max_steps"), std::string::npos) << result.err;
  EXPECT_EQ(result.err.find("error:"), std::string::npos) << "not reported as an input error: " << result.err;
  EXPECT_TRUE(empty_directory(output));
}

TEST_F(Cli, WallClockBudgetEndsTheRunWithItsReason) {
  // A budget of 1 µs is used up by the first 64 steps, whose clock check ends the run with exit 3.
  fs::path output = directory_ / "wall_out";
  fs::path file = write_capacitor_case("wall_limit.yaml", "run: {duration: 1 s, max_step: 1 ns, max_wall_time: 1 us}");
  Outcome result = run("run \"" + file.string() + "\" -q -o \"" + output.string() + "\"");
  EXPECT_EQ(result.exit_code, 3) << result.err;
  EXPECT_NE(result.err.find("of wall-clock time (run.max_wall_time) before t ="), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("after 64 steps"), std::string::npos) << result.err;
  EXPECT_NE(result.err.find("raise run.max_wall_time"), std::string::npos) << result.err;
  EXPECT_TRUE(empty_directory(output));
}

TEST_F(Cli, BadRunOptionIsAnInputErrorNamingTheOptionAndSundialsStaysSilent) {
  // The accepted ranges are the run block's (netlist/run_spec.h): 1e-12 <= rtol <= 1e-2, atol > 0.
  struct Bad {
    const char* arguments;
    const char* option;
  };
  const Bad cases[] = {{"--rtol 0.5", "option --rtol"}, {"--rtol -1", "option --rtol"}, {"--atol 0", "option --atol"}};
  fs::path output = directory_ / "bad_option_out";
  for (const auto& bad : cases) {
    Outcome result = run(std::string("run \"") + kDemo + "\" -q -o \"" + output.string() + "\" " + bad.arguments);
    EXPECT_EQ(result.exit_code, 2) << bad.arguments << ": " << result.err;
    EXPECT_NE(result.err.find(std::string(bad.option) + ": error:"), std::string::npos) << result.err;
    EXPECT_NE(result.err.find("fix:"), std::string::npos) << result.err;
    EXPECT_EQ(result.err.find("solver failure"), std::string::npos) << result.err;
    // Nothing of SUNDIALS' own text: its reports are replaced by linkrise's messages.
    for (const char* foreign : {"[CVODE", "[CVSLS", "SUNDIALS", "illegal"}) {
      EXPECT_EQ(result.err.find(foreign), std::string::npos) << bad.arguments << ": " << result.err;
    }
    EXPECT_TRUE(empty_directory(output)) << "no output after an input error";
  }
}

TEST_F(Cli, BadRunBlockValueExitsWithTwoAtItsPlace) {
  fs::path output = directory_ / "bad_run_out";
  fs::path file = write_capacitor_case("bad_rtol.yaml", "run: {duration: 1 s, rtol: -1}");
  Outcome result = run("run \"" + file.string() + "\" -q -o \"" + output.string() + "\"");
  EXPECT_EQ(result.exit_code, 2) << result.err;
  // Line 5, column 28: the '-1' after "run: {duration: 1 s, rtol: " [counted by hand].
  EXPECT_NE(result.err.find(file.string() + ":5:28: error: run setting 'rtol' = -1"), std::string::npos)
      << result.err;
  EXPECT_EQ(result.err.find("[CVODE"), std::string::npos) << result.err;
  EXPECT_TRUE(empty_directory(output));
}

// The command line rejects these before any case is read (the case file does not even exist), with exit code 2
// and the option named in the message [by construction of the parser's checks].
TEST_F(Cli, StudyOptionsAreCheckedByTheParser) {
  const fs::path output = directory_ / "study_out";
  const std::string tail = " -o \"" + output.string() + "\"";
  Outcome both = run("spread missing.yaml --corners --samples 10" + tail);
  EXPECT_EQ(both.exit_code, 2) << both.err;
  EXPECT_NE(both.err.find("--corners excludes --samples"), std::string::npos) << both.err;
  Outcome reversed = run("window missing.yaml --samples 10 --corners" + tail);
  EXPECT_EQ(reversed.exit_code, 2) << reversed.err;
  EXPECT_NE(reversed.err.find("excludes"), std::string::npos) << reversed.err;
  for (const std::string shard : {"3/2", "0/4", "2", "a/b", "1/2x"}) {
    Outcome bad = run("spread missing.yaml --samples 10 --shard " + shard + tail);
    EXPECT_EQ(bad.exit_code, 2) << shard << ": " << bad.err;
    EXPECT_NE(bad.err.find("--shard: '" + shard + "' is not a shard k/n with 1 <= k <= n"), std::string::npos)
        << bad.err;
  }
  EXPECT_FALSE(fs::exists(output)) << "nothing is written for a rejected command line";
}

TEST_F(Cli, ImplausibleValuesWarnAndStrictRefuses) {
  // A 1.5 MF link: legal, but M written for m (docs/plausibility.md; common practice).
  fs::path file = write_case("mega_farad.yaml",
                             "ground: gnd\n"
                             "parts:\n"
                             "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 V, "
                             "series_resistance: 1 Ohm}\n"
                             "  - {name: c1, kind: capacitor, nodes: [plus, gnd], capacitance: 1.5 MF}\n"
                             "run: {duration: 1 ms}\n");
  fs::path output = directory_ / "strict_out";
  Outcome strict = run("run \"" + file.string() + "\" -q --strict -o \"" + output.string() + "\"");
  EXPECT_EQ(strict.exit_code, 2) << strict.err;
  EXPECT_NE(strict.err.find(file.string() + ":4:66: error: part 'c1' capacitance = 1.5 MF"), std::string::npos)
      << strict.err;
  EXPECT_TRUE(empty_directory(output)) << "--strict writes nothing";
  Outcome plain = run("run \"" + file.string() + "\" -q -o \"" + output.string() + "\"");
  EXPECT_EQ(plain.exit_code, 0) << plain.err;
  EXPECT_NE(plain.err.find(":4:66: warning: part 'c1' capacitance = 1.5 MF lies outside the usual range 0 … 1 F"),
            std::string::npos)
      << plain.err;
  std::ifstream in(output / "summary.json");
  const auto summary = nlohmann::json::parse(in);
  ASSERT_EQ(summary["warnings"].size(), 1u);
  EXPECT_NE(summary["warnings"][0]["why"].get<std::string>().find("M written for m"), std::string::npos);
}

TEST_F(Cli, SetOverridesTheCaseOnRunAndFaultsAndIsRefusedWithCheckUpdate) {
  // Closing a 10 V source with 2 Ohm onto an empty capacitor: the first current is V/R = 5 A (Ohm's law,
  // docs/references.md [R-Ohm-Joule]), against 10 A with the case's own 1 Ohm.
  fs::path file = write_capacitor_case("set.yaml", "run: {duration: 20 us}");
  fs::path output = directory_ / "set_out";
  Outcome result = run("run \"" + file.string() + "\" -q --set source.series_resistance=2Ohm -o \"" + output.string() + "\"");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  std::ifstream in(output / "summary.json");
  const auto summary = nlohmann::json::parse(in);
  EXPECT_NEAR(summary["parts"]["source"]["peak_current"]["value"].get<double>(), 5.0, 5.0 * 1e-6);
  Outcome unknown = run("run \"" + file.string() + "\" -q --set source.resistanse=2Ohm -o \"" + output.string() + "\"");
  EXPECT_EQ(unknown.exit_code, 2);
  EXPECT_NE(unknown.err.find("resistanse"), std::string::npos) << unknown.err;

  // faults: the override reaches every scenario; the constant-power row's note states the resistance it used.
  const std::string sequence_case = LINKRISE_SOURCE_DIR "/cases/sequence_clean_close.yaml";
  Outcome faults = run("faults \"" + sequence_case + "\" -j 2 --set r_pre.resistance=39Ohm -o \"" +
                       (directory_ / "faults_out").string() + "\"");
  EXPECT_EQ(faults.exit_code, 0) << faults.err;
  EXPECT_NE(faults.out.find("through 39"), std::string::npos) << faults.out;

  Outcome update = run("check \"" + sequence_case + "\" --update --set r_pre.resistance=39Ohm");
  EXPECT_EQ(update.exit_code, 2);
  EXPECT_NE(update.err.find("--update cannot be combined with --set"), std::string::npos) << update.err;
}

TEST_F(Cli, CompareWithFaultsRunsTheScenariosPerVariant) {
  const std::string study_case = LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml";
  fs::path output = directory_ / "compare_out";
  Outcome result = run("compare \"" + study_case + "\" --faults -j 2 -o \"" + output.string() + "\"");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  auto csv = lines(slurp(output / "compare_faults.csv"));
  // Nominal and three variants, sixteen scenarios each, after the header: nine, then each of the three moved
  // contactors welded and failed, and the live bus.
  ASSERT_EQ(csv.size(), 1u + 4u * 16u);
  // The case's resistor-tolerance scenario overrides a parameter the thermistor variants do not have.
  bool ptc_not_applicable = false;
  for (const auto& line : csv) {
    auto cells = split(line);
    if (cells[0] == "ptc_thermistor" && cells[1] == "resistor_low_tolerance") ptc_not_applicable = cells[3] == "not_applicable";
  }
  EXPECT_TRUE(ptc_not_applicable);
  std::ifstream in(output / "compare.json");
  const auto json = nlohmann::json::parse(in);
  EXPECT_EQ(json["variants"][1]["faults"]["rows"].size(), 16u);
}

TEST_F(Cli, SweepExitsOneWhenNoPointPassesAndWindowHintsItsOwnName) {
  // The first power of a 10 V step into R and an empty capacitor is V²/R (Joule, docs/references.md
  // [R-Ohm-Joule]): 10 W at 10 Ohm, 5 W at 20 Ohm, 0.5 W at 200 Ohm, against a 1 W limit.
  fs::path file = write_case("sweep.yaml",
                             "ground: gnd\n"
                             "parts:\n"
                             "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 V}\n"
                             "  - {name: r1, kind: resistor, nodes: [plus, mid], resistance: 10 Ohm}\n"
                             "  - {name: c1, kind: capacitor, nodes: [mid, gnd], capacitance: 1 uF}\n"
                             "limits:\n"
                             "  r1.peak_power: {max: 1 W}\n"
                             "run: {duration: 20 us}\n");
  const std::string output = " -q -o \"" + (directory_ / "sweep_out").string() + "\"";
  EXPECT_EQ(run("sweep \"" + file.string() + "\" --vary r1.resistance=10Ohm,20Ohm" + output).exit_code, 1);
  EXPECT_EQ(run("sweep \"" + file.string() + "\" --vary r1.resistance=10Ohm,200Ohm" + output).exit_code, 0);
  Outcome window = run("window \"" + file.string() + "\"" + output);
  EXPECT_EQ(window.exit_code, 2);
  EXPECT_NE(window.err.find("'linkrise window case.yaml --corners'"), std::string::npos) << window.err;
}

// README's usage line of every command names exactly the options its --help lists (in the short or the long form),
// so the documentation cannot drift from the program (README "Commands").
TEST_F(Cli, ReadmeUsageLinesNameEveryOptionOfHelp) {
  // A table cell writes a literal '|' as '\|' (size's --faults-at nominal\|spread).
  const std::string readme =
      std::regex_replace(slurp(fs::path(LINKRISE_SOURCE_DIR) / "README.md"), std::regex(R"(\\\|)"), "/");
  // The command table's rows (other tables name commands on stored cases, not CASE.yaml).
  const std::regex row(R"(\| `linkrise ([a-z]+) ((CASE\.yaml|\[PATH)[^|]*)\|)");
  const std::regex option(R"((^|[\s\[`(/])(--?[a-z][a-z-]*))");
  int commands = 0;
  for (auto found = std::sregex_iterator(readme.begin(), readme.end(), row); found != std::sregex_iterator(); ++found) {
    const std::string command = (*found)[1], usage = (*found)[2];
    ++commands;
    std::set<std::string> named;
    for (auto o = std::sregex_iterator(usage.begin(), usage.end(), option); o != std::sregex_iterator(); ++o) {
      named.insert((*o)[2]);
    }
    const Outcome help = run(command + " --help");
    ASSERT_EQ(help.exit_code, 0) << command;
    // Each option line of the help: "  -o,--output TEXT ..." or "  --corners ..."; both names stand for one option.
    std::set<std::string> listed;
    for (const auto& line : lines(help.out)) {
      std::smatch names;
      if (!std::regex_search(line, names, std::regex(R"(^\s+((-[a-z],)?--[a-z][a-z-]*))"))) continue;
      const std::string both = names[1];
      const std::string long_name = both.substr(both.find("--"));
      if (long_name == "--help") continue;
      const std::string short_name = both.find(',') != std::string::npos ? both.substr(0, 2) : "";
      EXPECT_TRUE(named.count(long_name) || (!short_name.empty() && named.count(short_name)))
          << "README's usage of '" << command << "' lacks " << long_name;
      listed.insert(long_name);
      if (!short_name.empty()) listed.insert(short_name);
    }
    for (const auto& name : named) EXPECT_TRUE(listed.count(name)) << "README's '" << command << "' names " << name << ", which --help does not list";
  }
  EXPECT_EQ(commands, 9);
}
