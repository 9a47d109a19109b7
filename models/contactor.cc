#include "models/contactor.h"

#include <fmt/format.h>

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

class Contactor final : public Part {
 public:
  const ContactorTiming& timing() const { return timing_; }

  explicit Contactor(const netlist::PartSpec& spec) : Part(spec) {
    auto reader = open_parameters(spec);
    closed_resistance_ = reader.quantity("closed_resistance", Dimension::resistance(), Bound::Positive, 0.3e-3);
    open_resistance_ = reader.quantity("open_resistance", Dimension::resistance(), Bound::Positive, 100e6);
    initially_closed_ = reader.word("initial", {"open", "closed"}, "open") == "closed";
    timing_.closing_delay = reader.quantity("closing_delay", Dimension::time(), Bound::NonNegative, 0.0);
    timing_.opening_delay = reader.quantity("opening_delay", Dimension::time(), Bound::NonNegative, 0.0);
    timing_.bounce_count = reader.count("bounce_count", 0, 0);
    timing_.bounce_interval =
        reader.quantity("bounce_interval", Dimension::time(), Bound::Positive, timing_.bounce_interval);
    if (open_resistance_ <= closed_resistance_) {
      reader.fail("open_resistance", "must be larger than closed_resistance",
                  "an open contact is an insulator: use e.g. '100 MOhm'");
    }
    reader.finish();
  }

 private:
  double resistance(const Point& point, const Layout& layout) const {
    return point.modes[layout.mode] != 0 ? closed_resistance_ : open_resistance_;
  }
  double do_current(const Point& point, const Layout& layout) const override {
    return point.voltage(layout) / resistance(point, layout);
  }
  std::vector<int> do_initial_modes() const override { return {initially_closed_ ? 1 : 0}; }
  std::vector<SignalInfo> do_extra_signals() const override { return {{"closed", "1"}}; }
  void do_extra_signal_values(const Point& point, const Layout& layout, double* out) const override {
    out[0] = point.modes[layout.mode] != 0 ? 1.0 : 0.0;
  }
  Link do_link() const override { return Link::Conductive; }
  PowerChannels do_power_channels() const override { return {false, true, false}; }
  void do_stamp(const Point& point, const Layout& layout, Stamp& stamp) const override {
    double r = resistance(point, layout);
    stamp.terminal_current(layout, point.voltage(layout) / r, 1.0 / r);
  }
  Powers do_powers(const Point& point, const Layout& layout) const override {
    double v = point.voltage(layout);
    return Powers{0.0, v * v / resistance(point, layout), 0.0};
  }
  ModeChange do_command(const std::string& action, const Layout& layout, int* modes) const override {
    if (action != "close" && action != "open") {
      return ModeChange{false, fmt::format("contactor '{}' can only 'close' or 'open', not '{}'", name(), action)};
    }
    int wanted = action == "close" ? 1 : 0;
    bool changed = modes[layout.mode] != wanted;
    modes[layout.mode] = wanted;
    return ModeChange{changed, ""};
  }

  double closed_resistance_ = 0.0;
  double open_resistance_ = 0.0;
  bool initially_closed_ = false;
  ContactorTiming timing_;
};
}  // namespace

std::unique_ptr<Part> make_contactor(const netlist::PartSpec& spec) { return std::make_unique<Contactor>(spec); }

std::optional<ContactorTiming> contactor_timing(const Part& part) {
  if (const auto* contactor = dynamic_cast<const Contactor*>(&part)) return contactor->timing();
  return std::nullopt;
}
}  // namespace linkrise::models
