#include "models/breaking_capacity.h"

#include <cmath>

namespace linkrise::models {

const char* direction_word(CurrentDirection direction) {
  switch (direction) {
    case CurrentDirection::Both: return "both";
    case CurrentDirection::Forward: return "forward";
    case CurrentDirection::Reverse: return "reverse";
  }
  return "both";
}

BreakJudgement BreakingCapacity::judge(double voltage, double current) const {
  const CurrentDirection way = current >= 0.0 ? CurrentDirection::Forward : CurrentDirection::Reverse;
  const double magnitude = std::fabs(voltage);
  BreakJudgement judged;
  double chosen_voltage = std::numeric_limits<double>::infinity();
  for (std::size_t k = 0; k < rows.size(); ++k) {
    const BreakingRow& row = rows[k];
    if (row.direction != CurrentDirection::Both && row.direction != way) continue;
    if (row.voltage < magnitude || row.voltage >= chosen_voltage) continue;
    chosen_voltage = row.voltage;
    judged.row = static_cast<int>(k) + 1;
    judged.use = std::fabs(current) / row.current;
  }
  return judged;
}

}  // namespace linkrise::models
