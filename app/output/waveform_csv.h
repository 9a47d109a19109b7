#pragma once
// CSV of a waveform: "time [s]" first, then node voltages and part signals, one row per time point.
#include <string>

#include "solver/waveform.h"

namespace linkrise::app {
std::string waveform_csv(const solver::Waveform& waveform);
}
