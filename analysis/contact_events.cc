#include "analysis/contact_events.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace linkrise::analysis {
namespace {
bool same_time(const solver::Waveform& rows, std::size_t a, std::size_t b) { return rows.time(a) == rows.time(b); }

// |v| across the gap once it has recovered: the first row at or after `from` + parting_time, stopping at a touch.
double recovered_voltage(const solver::Waveform& rows, const ContactColumns& c, std::size_t from, double parting) {
  const double due = rows.time(from) + parting;
  std::size_t r = from;
  while (r + 1 < rows.row_count() && rows.time(r) < due && rows.value(r + 1, c.closed) < 0.5) ++r;
  if (parting <= 0.0 && r + 1 < rows.row_count() && rows.value(r + 1, c.closed) < 0.5) ++r;
  return std::fabs(rows.value(r, c.voltage));
}

ArcEvent arc_event(const solver::Waveform& rows, const ContactColumns& c, std::size_t first, std::size_t last,
                   double parting, const std::vector<solver::BreakCircuit>& breaks) {
  ArcEvent event;
  event.start = rows.time(first);
  event.end = rows.time(last);
  event.energy = rows.value(last, c.arc_energy) - rows.value(first, c.arc_energy);
  const std::size_t parted = first > 0 && same_time(rows, first - 1, first) ? first - 1 : first;
  event.current = rows.value(parted, c.current);
  for (std::size_t r = first; r <= last; ++r) event.opening = event.opening || rows.value(r, c.arcing) > 1.5;
  if (event.opening && last + 1 < rows.row_count()) event.voltage = recovered_voltage(rows, c, last + 1, parting);
  if (event.opening) {
    auto found = std::find_if(breaks.begin(), breaks.end(), [&](const solver::BreakCircuit& b) {
      return b.time >= event.start && b.time <= event.end;
    });
    if (found != breaks.end()) event.time_constant = found->time_constant;
  }
  return event;
}

// |i| at the first peak after the touch at row `touch` (the row after the switching), within the closure and
// before the next switching of any part — a later pair of rows at one time, of which the first, the state just
// before it, is the last this touch owns. Without that end a contact touching before another closes its loop
// took the current the other made for its own.
double first_peak(const solver::Waveform& rows, const ContactColumns& c, std::size_t touch) {
  double peak = std::fabs(rows.value(touch, c.current));
  for (std::size_t r = touch + 1; r < rows.row_count() && rows.value(r, c.closed) > 0.5; ++r) {
    const double now = std::fabs(rows.value(r, c.current));
    if (now < peak) break;
    peak = now;
    if (rows.time(r) > rows.time(touch) && r + 1 < rows.row_count() && same_time(rows, r, r + 1)) break;
  }
  return peak;
}

// An L/R the solver could not read is judged as unbounded: only rows without a time constant cover it.
double judged_time_constant(const ArcEvent& arc) {
  return std::isnan(arc.time_constant) ? std::numeric_limits<double>::infinity() : arc.time_constant;
}
}  // namespace

ContactEvents contact_events(const solver::Waveform& rows, const ContactColumns& c, double parting_time,
                             const std::vector<solver::BreakCircuit>& breaks) {
  ContactEvents events;
  const std::size_t n = rows.row_count();
  for (std::size_t r = 0; r < n; ++r) {
    if (rows.value(r, c.arcing) > 0.5 && (r == 0 || rows.value(r - 1, c.arcing) < 0.5)) {
      std::size_t last = r;
      while (last + 1 < n && rows.value(last + 1, c.arcing) > 0.5) ++last;
      events.arcs.push_back(arc_event(rows, c, r, last, parting_time, breaks));
    }
    if (r > 0 && rows.value(r, c.closed) > 0.5 && rows.value(r - 1, c.closed) < 0.5) {
      events.making_currents.push_back(first_peak(rows, c, r));
      events.voltage_steps.push_back(std::fabs(rows.value(r - 1, c.voltage)));
    }
  }
  return events;
}

ContactMetrics contact_metrics(const ContactEvents& events, const std::optional<models::BreakingCapacity>& capacity) {
  ContactMetrics m;
  for (const auto& arc : events.arcs) {
    m.total_arc_energy += arc.energy;
    if (arc.energy > m.arc_energy) {
      m.arc_energy = arc.energy;
      m.arc_time = arc.end - arc.start;
    }
  }
  // The worst opening: the largest share of its breaking-capacity row, or without a table the largest current.
  double worst = -1.0;
  for (const auto& arc : events.arcs) {
    if (!arc.opening) continue;
    models::BreakJudgement judged;
    const double score =
        capacity ? (judged = capacity->judge(arc.voltage, arc.current, judged_time_constant(arc))).use
                 : std::fabs(arc.current);
    if (score <= worst) continue;
    worst = score;
    m.break_current = std::fabs(arc.current);
    m.break_voltage = arc.voltage;
    m.break_time_constant = arc.time_constant;
    m.break_time = arc.start;
    if (capacity) {
      m.break_use = judged.use;
      m.break_row = judged.row;
    }
  }
  for (std::size_t k = 0; k < events.making_currents.size(); ++k) {
    m.making_current = std::max(m.making_current.value_or(0.0), events.making_currents[k]);
    m.making_voltage_step = std::max(m.making_voltage_step.value_or(0.0), events.voltage_steps[k]);
  }
  return m;
}

}  // namespace linkrise::analysis
