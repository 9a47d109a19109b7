#include "solver/sequence_loads.h"

#include <algorithm>

#include <fmt/format.h>

#include "netlist/units.h"

namespace linkrise::solver {

namespace {
const char* moment_text(netlist::LoadMoment moment) {
  switch (moment) {
    case netlist::LoadMoment::AttemptStart: return "the attempt started";
    case netlist::LoadMoment::MainClosed: return "the main contacts closed";
    case netlist::LoadMoment::PrechargeOpened: return "the pre-charge contacts opened";
  }
  return "";
}
}  // namespace

SequenceLoads::SequenceLoads(const Circuit& circuit, const std::vector<netlist::SequenceLoadSpec>& loads)
    : specs_(loads) {
  for (const auto& load : loads) {
    const int index = circuit.find_part(load.part);
    if (index < 0 || circuit.part(index).role() != models::Role::Load) {
      // Circuit::check_sequence_parts() rejects this with a fix first; kept for controllers built by hand.
      throw netlist::InputError(load.mark, fmt::format("the sequence switches '{}', which is no load", load.part),
                                "name one of the case's loads");
    }
    parts_.push_back(index);
  }
  enabled_.assign(parts_.size(), false);
}

std::vector<Command> SequenceLoads::hold_off(const Circuit& circuit) const {
  std::vector<Command> commands;
  std::vector<int> modes = circuit.initial_modes();
  for (int part : parts_) {
    const auto change = circuit.part(part).command(netlist::Action::Disable, circuit.layout(part), modes.data());
    if (change.changed) {
      commands.push_back(Command{0.0, part, netlist::Action::Disable, "held off until the sequence starts it"});
    }
  }
  return commands;
}

void SequenceLoads::moment(netlist::LoadMoment moment, double time, int attempt) {
  for (std::size_t k = 0; k < specs_.size(); ++k) {
    if (specs_[k].after != moment) continue;
    const double delay = specs_[k].delay;
    Planned plan{time + delay, static_cast<int>(k),
                 fmt::format("{} {} (attempt {})", delay > 0.0 ? netlist::format_si(delay, "s") + " after" : "when",
                             moment_text(moment), attempt)};
    auto position = std::upper_bound(planned_.begin(), planned_.end(), plan.time,
                                     [](double t, const Planned& p) { return t < p.time; });
    planned_.insert(position, std::move(plan));
  }
}

double SequenceLoads::next_time() const {
  return planned_.empty() ? std::numeric_limits<double>::infinity() : planned_.front().time;
}

double SequenceLoads::last_time() const {
  return planned_.empty() ? -std::numeric_limits<double>::infinity() : planned_.back().time;
}

void SequenceLoads::issue_due(double time, std::vector<Command>& commands) {
  while (!planned_.empty() && planned_.front().time <= time) {
    const Planned& plan = planned_.front();
    commands.push_back(Command{std::max(plan.time, time), parts_[plan.load], netlist::Action::Enable, plan.reason});
    enabled_[static_cast<std::size_t>(plan.load)] = true;
    planned_.erase(planned_.begin());
  }
}

void SequenceLoads::release(double time, const std::string& fault, std::vector<Command>& commands) {
  planned_.clear();
  for (std::size_t k = 0; k < parts_.size(); ++k) {
    if (!enabled_[k]) continue;
    enabled_[k] = false;
    commands.push_back(Command{time, parts_[k], netlist::Action::Disable, fmt::format("fault {}: contactors released", fault)});
  }
}

}  // namespace linkrise::solver
