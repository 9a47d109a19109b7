#pragma once
// Does a constant-power load stall the pre-charge below the closing level?
//
// A link fed from a source Vs through a path resistance R, with a load drawing constant power P, settles
// where the resistor current feeds the load: v·(Vs − v)/R = P, so v = [Vs + √(Vs² − 4PR)]/2 (the upper root
// is the operating point; Simpson-Porco, Dörfler & Bullo, arXiv:1503.04769). When P > Vs²/(4R) there is no
// equilibrium at all: the load takes more than the path can deliver and the link collapses. Either way, if
// no equilibrium lies at or above the closing level, the charge stalls and only the timeout can end it.
#include <string>
#include <vector>

#include "solver/sequence_report.h"
#include "solver/waveform.h"

namespace linkrise::analysis {

/// The upper equilibrium of a constant-power load behind a resistance, V; NaN when P > Vs²/(4R).
double constant_power_equilibrium(double source_voltage, double resistance, double power);
/// The lower root [Vs − √(Vs² − 4PR)]/2, V (NaN when none): unstable — below it the load takes more current
/// than the path delivers, so a link charging from 0 V against a load that already draws cannot pass it.
double constant_power_lower_root(double source_voltage, double resistance, double power);

/// A constant-power load of the case: its rated power and the voltage below which the model draws as a
/// resistor instead (models/switched_load.h, `resistive_below`).
struct ConstantPowerLoad {
  std::string name;
  double power = 0.0;          // W
  double resistive_below = 0.0;  // V
};

struct StallDiagnostic {
  bool applicable = false;  // false: no constant-power load drew, or no pre-charge current to measure R
  double source_voltage = 0.0;   // V, pack at the start of the final attempt
  double path_resistance = 0.0;  // Ohm, (Vs − link)/i through the pre-charge contactor, end of the charge
  double load_power = 0.0;       // W, constant-power loads that drew during the final attempt
  double maximum_power = 0.0;    // W, Vs²/(4R)
  double equilibrium = 0.0;      // V, NaN when there is none
  double lower_root = 0.0;       // V, the unstable lower root, NaN when there is none
  double resistive_below = 0.0;  // V, the highest constant-power onset among the loads that drew
  double closing_level = 0.0;    // V, the closing rule's level at Vs
  double link_voltage = 0.0;     // V, the link as measured at the end of the attempt
  bool stalls = false;
  bool latched = false;          // the link sits below the lower root: held down from the start
  std::string explanation;
};

/// `loads`: the case's constant-power loads.
StallDiagnostic diagnose_stall(const solver::Waveform& waveform, const solver::SequenceReport& report,
                               const std::vector<ConstantPowerLoad>& loads);

/// The charging path of a run, measured where no constant-power load matters: the source voltage before the
/// first attempt and the path resistance (Vs − link)/i when that attempt ends (its closing decision or fault), so
/// the resistor's self-heating during one normal charge is included.
struct ChargePath {
  bool measured = false;
  double source_voltage = 0.0;   // V, pack at the start of the first attempt
  double path_resistance = 0.0;  // Ohm
  double at_time = 0.0;          // s, where the resistance was measured
  double closing_level = 0.0;    // V, the closing rule's level at Vs
  std::string explanation;       // why it could not be measured
};
ChargePath measure_charge_path(const solver::Waveform& waveform, const solver::SequenceReport& report);

/// What the quadratic predicts for constant-power loads of `load_power` (highest onset `resistive_below`) drawing
/// behind `path`: the roots, the maximum deliverable power and whether the link stalls below the closing level.
/// No waveform is read, so `link_voltage` stays NaN and `latched` false.
StallDiagnostic predict_stall(const ChargePath& path, double load_power, double resistive_below);

}  // namespace linkrise::analysis
