#include "solver/sequence_controller.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "netlist/units.h"

namespace linkrise::solver {
namespace {
using netlist::format_si;

int contactor_index(const Circuit& circuit, const std::string& name, const netlist::SourceMark& mark) {
  int index = circuit.find_part(name);
  if (index < 0 || !circuit.part(index).actuation()) {
    // Circuit::check_sequence_parts() rejects this with a fix first; kept for controllers built by hand.
    throw netlist::InputError(mark, fmt::format("the sequence names '{}', which cannot switch", name),
                              "name one of the case's switching parts");
  }
  return index;
}

models::Actuation timing_of(const Circuit& circuit, int part) {
  return *circuit.part(part).actuation();
}

/// The position of a sensor's `reading` among its signals, or -1 without a sensor.
int reading_index(const Circuit& circuit, int sensor) {
  if (sensor < 0) return -1;
  const auto signals = circuit.part(sensor).signals();
  for (std::size_t i = 0; i < signals.size(); ++i) {
    if (signals[i].quantity == "reading") return static_cast<int>(i);
  }
  return -1;  // Circuit::check_sequence_parts() admits only voltage sensors, which all have a reading
}
}  // namespace

SequenceController::SequenceController(const Circuit& circuit, netlist::SequenceSpec spec)
    : circuit_(circuit), spec_(std::move(spec)) {
  main_ = contactor_index(circuit, spec_.main, spec_.mark);
  for (const auto& name : spec_.mains()) mains_.push_back(contactor_index(circuit, name, spec_.mark));
  for (const auto& name : spec_.precharges()) precharges_.push_back(contactor_index(circuit, name, spec_.mark));
  for (const auto& name : spec_.start_closed) start_closed_.push_back(contactor_index(circuit, name, spec_.mark));
  for (const auto& step : spec_.weld_check) {
    weld_steps_.emplace_back();
    for (const auto& name : step.close) weld_steps_.back().push_back(contactor_index(circuit, name, step.mark));
  }
  pack_plus_ = circuit.node_index(spec_.pack.plus);
  pack_minus_ = circuit.node_index(spec_.pack.minus);
  link_plus_ = circuit.node_index(spec_.link.plus);
  link_minus_ = circuit.node_index(spec_.link.minus);
  if (!spec_.pack_sensor.empty()) pack_sensor_ = circuit.find_part(spec_.pack_sensor);
  if (!spec_.link_sensor.empty()) link_sensor_ = circuit.find_part(spec_.link_sensor);
  pack_reading_ = reading_index(circuit, pack_sensor_);
  link_reading_ = reading_index(circuit, link_sensor_);
  next_attempt_ = spec_.start;
  loads_ = SequenceLoads(circuit, spec_.loads);
}

double SequenceController::next_sample(double time) const {
  return std::min(next_tick(time), loads_.next_time());
}

bool SequenceController::on_task_sample(double time) const {
  return time >= spec_.start && tick(std::lround((time - spec_.start) / spec_.sample_period)) == time;
}

double SequenceController::end_time() const {
  const auto& settle = circuit_.spec().run.settle;
  if (!settle || !(phase_ == Phase::Closed || phase_ == Phase::Faulted)) return std::numeric_limits<double>::infinity();
  return std::max(last_event_, loads_.last_time()) + *settle;
}

double SequenceController::next_tick(double time) const {
  if (done_ || phase_ == Phase::Closed) return std::numeric_limits<double>::infinity();
  if (time < spec_.start) return spec_.start;
  // Samples are start + k·period computed from k (never accumulated), so they are the same in every run.
  long index = static_cast<long>(std::floor((time - spec_.start) / spec_.sample_period));
  while (tick(index) <= time) ++index;
  return tick(index);
}

std::vector<Watch> SequenceController::watches() const {
  Watch watch;
  watch.name = "closing level";
  watch.plus_a = link_plus_;
  watch.minus_a = link_minus_;
  watch.plus_b = pack_plus_;
  watch.minus_b = pack_minus_;
  if (spec_.rule == netlist::ClosingRule::Ratio) {
    watch.ratio = spec_.rule_value;  // link - ratio·pack
  } else {
    watch.ratio = 1.0;  // link - pack + difference
    watch.offset = -spec_.rule_value;
  }
  return {watch};
}

void SequenceController::schedule_close(int part, double coil_time, const std::string& why,
                                        std::vector<Command>& commands, double& touch) const {
  auto timing = timing_of(circuit_, part);
  touch = coil_time + timing.closing_delay;
  std::string delay = timing.closing_delay > 0.0
                          ? fmt::format("{} after the coil was energised", format_si(timing.closing_delay, "s"))
                          : "coil energised";
  commands.push_back(Command{touch, part, netlist::Action::Close, fmt::format("{} ({})", why, delay)});
  for (int bounce = 1; bounce <= timing.bounce_count; ++bounce) {
    double gap = touch + (2.0 * bounce - 1.0) * timing.bounce_interval;
    commands.push_back(Command{gap, part, netlist::Action::Bounce, fmt::format("contact bounce {} of {}", bounce, timing.bounce_count)});
    commands.push_back(Command{gap + timing.bounce_interval, part, netlist::Action::Close,
                               fmt::format("contact bounce {} of {} ends", bounce, timing.bounce_count)});
  }
}

void SequenceController::begin_attempt(double time, double pack, double link, std::vector<Command>& commands,
                                       std::vector<TimelineEntry>& timeline) {
  AttemptRecord record;
  record.number = static_cast<int>(history_.size()) + 1;
  record.cycle = cycle_;
  record.start = time;
  history_.push_back(record);
  have_previous_ = false;
  rise_checked_ = false;
  // Nothing is closed yet: a link that already meets the rule (or stands above the pack) is fed from elsewhere.
  if (pack > 0.0 && (link >= spec_.closing_level(pack) || link > spec_.upper_level(pack))) {
    timeline.push_back(TimelineEntry{time, fmt::format("attempt {} starts", record.number),
                                     "link and pack read before any coil is energised"});
    raise_fault(time, netlist::SequenceOutcome::LiveBus,
                fmt::format("link {} already meets '{}' (pack {}) before the attempt closed anything: a source on "
                            "the bus (a charger, a second pack, a motor turning the inverter's diodes) or charge an "
                            "earlier attempt left that the bleed has not removed",
                            format_si(link, "V"), spec_.rule_text(), format_si(pack, "V")),
                commands, timeline);
    return;
  }
  if (weld_steps_.empty()) {
    start_precharge(time, false, commands, timeline);
    return;
  }
  timeline.push_back(TimelineEntry{time, fmt::format("attempt {} starts", record.number),
                                   fmt::format("weld check first ({} step{})", weld_steps_.size(),
                                               weld_steps_.size() == 1 ? "" : "s")});
  weld_step_ = 0;
  start_weld_step(time, commands, timeline);
}

void SequenceController::start_precharge(double time, bool after_checks, std::vector<Command>& commands,
                                         std::vector<TimelineEntry>& timeline) {
  AttemptRecord& record = history_.back();
  record.start = time;  // the attempt's times run from its pre-charge
  std::string names;
  double last_touch = time;
  energised_.clear();
  for (int part : start_closed_) {
    double touch = time;
    schedule_close(part, time, fmt::format("attempt {} start", record.number), commands, touch);
    last_touch = std::max(last_touch, touch);
    names += (names.empty() ? "" : ", ") + circuit_.part(part).name();
    energised_.push_back(part);
  }
  record.contacts_closed = last_touch;
  if (after_checks) {
    timeline.push_back(TimelineEntry{time, fmt::format("pre-charge {} starts", record.number),
                                     fmt::format("weld check passed; coils of {} energised", names)});
  } else {
    timeline.push_back(TimelineEntry{time, fmt::format("attempt {} starts", record.number),
                                     fmt::format("coils of {} energised", names)});
  }
  loads_.moment(netlist::LoadMoment::AttemptStart, time, record.number);
  phase_ = Phase::Charging;
  have_previous_ = false;
}

void SequenceController::start_weld_step(double time, std::vector<Command>& commands,
                                         std::vector<TimelineEntry>& timeline) {
  const auto& step = spec_.weld_check[weld_step_];
  std::string names;
  energised_.clear();
  for (int part : weld_steps_[weld_step_]) {
    double touch = time;
    schedule_close(part, time, fmt::format("weld check {}", weld_step_ + 1), commands, touch);
    names += (names.empty() ? "" : ", ") + circuit_.part(part).name();
    energised_.push_back(part);
  }
  timeline.push_back(TimelineEntry{
      time, fmt::format("weld check {} of {}", weld_step_ + 1, weld_steps_.size()),
      fmt::format("{}; the link must not rise by {:g} % of pack within {}",
                  names.empty() ? "every contactor open" : "coils of " + names + " energised alone",
                  100.0 * step.below, format_si(step.hold, "s"))});
  weld_step_start_ = time;
  weld_link_start_ = last_link_;
  weld_releasing_ = false;
  phase_ = Phase::Checking;
}

void SequenceController::weld_sample(double time, double pack, double link, std::vector<Command>& commands,
                                     std::vector<TimelineEntry>& timeline) {
  const auto& step = spec_.weld_check[weld_step_];
  if (!weld_releasing_) {
    // A rise, not a level: charge an earlier attempt left behind drains, a weld feeds the link.
    if (pack > 0.0 && link - weld_link_start_ >= step.below * pack) {
      std::string closed, suspects;
      for (const auto& name : step.close) closed += (closed.empty() ? "" : ", ") + name;
      for (const auto& name : spec_.moved_names()) {
        if (std::find(step.close.begin(), step.close.end(), name) == step.close.end()) {
          suspects += (suspects.empty() ? "" : " or ") + name;
        }
      }
      raise_fault(time, netlist::SequenceOutcome::Welded,
                  fmt::format("link rose from {} to {}, by {:g} % of pack ({}) or more, in weld check {} with {}: a "
                              "contactor that should be open is welded ({}?)",
                              format_si(weld_link_start_, "V"), format_si(link, "V"), 100.0 * step.below,
                              format_si(pack, "V"), weld_step_ + 1,
                              closed.empty() ? "every contactor open" : "only " + closed + " closed", suspects),
                  commands, timeline);
      return;
    }
    if (!due(time - weld_step_start_, step.hold)) return;
    weld_next_ = release_coils(time, fmt::format("weld check {} passed", weld_step_ + 1), commands);
    weld_releasing_ = true;
  }
  if (time < weld_next_) return;  // the next step begins only once these contacts have parted
  if (++weld_step_ < weld_steps_.size()) {
    start_weld_step(time, commands, timeline);
  } else {
    start_precharge(time, true, commands, timeline);
  }
}

double SequenceController::release_coils(double time, const std::string& why, std::vector<Command>& commands) {
  double latest = time;
  for (int part : energised_) {
    double parted = time + timing_of(circuit_, part).opening_delay;
    commands.push_back(Command{parted, part, netlist::Action::Open, why});
    latest = std::max(latest, parted);
  }
  energised_.clear();
  return latest;
}

void SequenceController::raise_fault(double time, netlist::SequenceOutcome fault, const std::string& reason,
                                     std::vector<Command>& commands, std::vector<TimelineEntry>& timeline) {
  AttemptRecord& record = history_.back();
  record.fault = fault;
  record.fault_time = time;
  record.reason = reason;
  const char* word = netlist::outcome_word(fault);
  timeline.push_back(TimelineEntry{time, fmt::format("fault {}", word), reason});
  loads_.release(time, word, commands);
  double latest = release_coils(time, fmt::format("fault {}: pre-charge path opened", word), commands);
  const int used = static_cast<int>(history_.size() - cycle_first_);  // attempts of this key cycle
  if (used < spec_.attempts) {
    phase_ = Phase::Waiting;
    next_attempt_ = time + spec_.cool_down;
    timeline.push_back(TimelineEntry{time, "cool-down",
                                     fmt::format("attempt {} of {} at the first sample after {}", used + 1,
                                                 spec_.attempts, format_si(spec_.cool_down, "s"))});
  } else {
    phase_ = Phase::Faulted;
    last_command_ = latest;
  }
}

void SequenceController::sample(const Probe& probe, std::vector<Command>& commands,
                                 std::vector<TimelineEntry>& timeline) {
  const std::size_t first = commands.size();
  if (on_task_sample(probe.time)) run_task(probe, commands, timeline);
  loads_.issue_due(probe.time, commands);
  for (std::size_t c = first; c < commands.size(); ++c) last_event_ = std::max(last_event_, commands[c].time);
}

void SequenceController::run_task(const Probe& probe, std::vector<Command>& commands,
                                  std::vector<TimelineEntry>& timeline) {
  const double t = probe.time;
  const double pack = sensed(probe, pack_sensor_, pack_reading_, pack_plus_, pack_minus_);
  const double link = sensed(probe, link_sensor_, link_reading_, link_plus_, link_minus_);
  last_link_ = link;
  switch (phase_) {
    case Phase::Closed:
      return;
    case Phase::Faulted:
      // A run that follows the sequence ends at end_time() instead, after its settling time.
      if (t > last_command_ && !circuit_.spec().run.follows_sequence()) done_ = true;
      return;
    case Phase::Waiting:
      if (due(t, next_attempt_)) begin_attempt(t, pack, link, commands, timeline);
      previous_link_ = link;
      have_previous_ = true;
      return;
    case Phase::Checking:
      weld_sample(t, pack, link, commands, timeline);
      previous_link_ = link;
      have_previous_ = true;
      return;
    case Phase::Verifying:
      verify_sample(t, pack, link, commands, timeline);
      return;
    case Phase::Holding:
      holding_sample(t, commands, timeline);
      return;
    case Phase::Charging:
      charging_sample(t, pack, link, commands, timeline);
      return;
  }
}

void SequenceController::charging_sample(double t, double pack, double link, std::vector<Command>& commands,
                                         std::vector<TimelineEntry>& timeline) {
  AttemptRecord& record = history_.back();
  const double elapsed = t - record.start;
  double rate = have_previous_ ? std::fabs(link - previous_link_) / spec_.sample_period : 0.0;
  bool level_met = pack > 0.0 && link >= spec_.closing_level(pack);
  bool rate_met = !spec_.max_rate || (have_previous_ && rate <= *spec_.max_rate);
  previous_link_ = link;
  have_previous_ = true;

  if (pack > 0.0 && link > spec_.upper_level(pack)) {
    raise_fault(t, netlist::SequenceOutcome::LiveBus,
                fmt::format("link {} is above pack {} beyond '{}' seen from the other side: the link is fed from "
                            "elsewhere (a charger, a second pack, a motor turning the inverter's diodes)",
                            format_si(link, "V"), format_si(pack, "V"), spec_.rule_text()),
                commands, timeline);
    return;
  }
  if (level_met && rate_met) {
    if (spec_.minimum_time > 0.0 && !due(elapsed, spec_.minimum_time)) {
      raise_fault(t, netlist::SequenceOutcome::TooFast,
                  fmt::format("link {} met '{}' after {}, before the minimum pre-charge time {} (capacitance "
                              "missing?)",
                              format_si(link, "V"), spec_.rule_text(), format_si(elapsed, "s"),
                              format_si(spec_.minimum_time, "s")),
                  commands, timeline);
      return;
    }
    record.reason = fmt::format("link {} met '{}' (pack {}) after {}", format_si(link, "V"), spec_.rule_text(),
                                format_si(pack, "V"), format_si(elapsed, "s"));
    decide(t, commands, timeline);
    return;
  }
  if (spec_.rise_fraction && !rise_checked_ && due(elapsed, spec_.rise_by)) {
    rise_checked_ = true;
    double level = *spec_.rise_fraction * pack;
    if (!(link >= level)) {
      raise_fault(t, netlist::SequenceOutcome::NoRise,
                  fmt::format("link {} is below {:g} % of pack ({}) {} after the start (a short, an open "
                              "path, a reversed connection or a load drawing from the start?)",
                              format_si(link, "V"), 100.0 * *spec_.rise_fraction, format_si(level, "V"),
                              format_si(elapsed, "s")),
                  commands, timeline);
      return;
    }
  }
  if (due(elapsed, spec_.timeout)) {
    raise_fault(t, netlist::SequenceOutcome::Timeout,
                fmt::format("'{}' not met within {}: link {}, pack {}", spec_.rule_text(),
                            format_si(spec_.timeout, "s"), format_si(link, "V"), format_si(pack, "V")),
                commands, timeline);
  }
}

void SequenceController::decide(double t, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline) {
  AttemptRecord& record = history_.back();
  record.decision = t;
  std::string mains;
  for (const auto& name : spec_.mains()) mains += (mains.empty() ? "" : ", ") + name;
  timeline.push_back(TimelineEntry{t, fmt::format("decide to close {}", mains), record.reason});
  double last_touch = t;
  for (int part : mains_) {
    double touch = t;
    schedule_close(part, t, "closing decision", commands, touch);
    if (part == main_) record.main_closed = touch;
    last_touch = std::max(last_touch, touch);
  }
  // Every pre-charge coil is released the overlap after the last main contacts touched.
  const double coil_off = last_touch + spec_.overlap;
  record.released = coil_off;
  for (int part : precharges_) {
    const double opening = timing_of(circuit_, part).opening_delay;
    record.released = std::max(record.released, coil_off + opening);
    commands.push_back(Command{coil_off + opening, part, netlist::Action::Open,
                               fmt::format("overlap {} after the main contacts closed{}", format_si(spec_.overlap, "s"),
                                           opening > 0.0 ? fmt::format(", then opening delay {}", format_si(opening, "s"))
                                                         : "")});
    energised_.erase(std::remove(energised_.begin(), energised_.end(), part), energised_.end());
  }
  loads_.moment(netlist::LoadMoment::MainClosed, record.main_closed, record.number);
  loads_.moment(netlist::LoadMoment::PrechargeOpened, record.released, record.number);
  // From here the BMS holds the main coils and the other start_closed coils.
  for (int part : mains_) energised_.push_back(part);
  if (spec_.closure_check) {
    verify_at_ = record.released + spec_.closure_check->after;
    phase_ = Phase::Verifying;
  } else {
    closed();
  }
}

void SequenceController::closed() {
  if (cycle_ >= spec_.key_cycles.count) {
    phase_ = Phase::Closed;
    return;
  }
  key_off_at_ = history_.back().main_closed + spec_.key_cycles.on_time;
  phase_ = Phase::Holding;
}

void SequenceController::holding_sample(double t, std::vector<Command>& commands,
                                        std::vector<TimelineEntry>& timeline) {
  if (t < key_off_at_ - 1e-9 * spec_.sample_period) return;
  loads_.release(t, "key off", commands);
  release_coils(t, "key off", commands);
  timeline.push_back(TimelineEntry{t, fmt::format("key off {} of {}", cycle_, spec_.key_cycles.count),
                                   fmt::format("every coil released; the next key-on {} later",
                                               format_si(spec_.key_cycles.off_time, "s"))});
  ++cycle_;
  cycle_first_ = history_.size();
  next_attempt_ = t + spec_.key_cycles.off_time;
  phase_ = Phase::Waiting;
}

void SequenceController::verify_sample(double t, double pack, double link, std::vector<Command>& commands,
                                       std::vector<TimelineEntry>& timeline) {
  if (t < verify_at_ - 1e-9 * spec_.sample_period) return;
  const double above = spec_.closure_check->above;
  if (pack > 0.0 && link >= above * pack) {
    timeline.push_back(TimelineEntry{t, "closure verified",
                                     fmt::format("link {} at least {:g} % of pack ({}) after the pre-charge path "
                                                 "opened", format_si(link, "V"), 100.0 * above, format_si(pack, "V"))});
    closed();
    return;
  }
  raise_fault(t, netlist::SequenceOutcome::MainFailed,
              fmt::format("link {} is below {:g} % of pack ({}) {} after the pre-charge path opened: the main "
                          "contactor {} did not close, or the load draws the link down through it",
                          format_si(link, "V"), 100.0 * above, format_si(pack, "V"),
                          format_si(spec_.closure_check->after, "s"), spec_.main),
              commands, timeline);
}

SequenceReport SequenceController::report(double end_time) const {
  SequenceReport report;
  report.spec = spec_;
  report.ground = circuit_.spec().ground;
  report.history = history_;
  auto clear_after = [end_time](double& time) {
    if (!(time <= end_time)) time = kNotReached;
  };
  for (auto& record : report.history) {
    clear_after(record.contacts_closed);
    clear_after(record.main_closed);
    clear_after(record.released);
  }
  report.attempts = static_cast<int>(report.history.size());
  report.cycles = report.history.empty() ? 0 : report.history.back().cycle;
  for (const auto& record : report.history) {
    if (record.fault) {
      report.first_fault = record.fault;
      report.first_fault_time = record.fault_time;
      break;
    }
  }
  if (const AttemptRecord* last = report.last()) {
    if (last->fault && phase_ == Phase::Faulted) {
      report.outcome = *last->fault;  // a closure the check found failed is a fault too
    } else if (!last->fault && !std::isnan(last->main_closed)) {
      report.outcome = netlist::SequenceOutcome::Closed;
    }
  }
  return report;
}

void attach(SequenceController& controller, Options& options) {
  options.supervisor = &controller;
  for (auto& watch : controller.watches()) options.watches.push_back(watch);
  for (auto& command : controller.initial_commands()) options.initial_commands.push_back(command);
}

}  // namespace linkrise::solver
