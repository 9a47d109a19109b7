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

BreakJudgement BreakingCapacity::judge(double voltage, double current, double time_constant) const {
  const CurrentDirection way = current >= 0.0 ? CurrentDirection::Forward : CurrentDirection::Reverse;
  const double magnitude = std::fabs(voltage);
  const double unbounded = std::numeric_limits<double>::infinity();
  BreakJudgement judged;
  const BreakingRow* chosen = nullptr;
  for (std::size_t k = 0; k < rows.size(); ++k) {
    const BreakingRow& row = rows[k];
    if (row.direction != CurrentDirection::Both && row.direction != way) continue;
    if (row.voltage < magnitude || row.time_constant.value_or(unbounded) < time_constant) continue;
    if (chosen != nullptr) {
      const bool lower = row.voltage < chosen->voltage;
      const bool tighter = row.voltage == chosen->voltage &&
                           row.time_constant.value_or(unbounded) < chosen->time_constant.value_or(unbounded);
      if (!lower && !tighter) continue;
    }
    chosen = &row;
    judged.row = static_cast<int>(k) + 1;
    judged.use = std::fabs(current) / row.current;
  }
  return judged;
}

}  // namespace linkrise::models
