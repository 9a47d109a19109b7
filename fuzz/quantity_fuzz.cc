// libFuzzer target: the quantity parser ("47 Ohm", "1.2 mF", "2.5 K/W") on arbitrary bytes. It must return a
// quantity or a problem, never crash, and a quantity it accepts must read back identically from the text
// linkrise writes for it (quantity_text, used when a program writes a case for a case to read back).
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <string_view>

#include "netlist/units.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace linkrise::netlist;
  std::string_view text(reinterpret_cast<const char*>(data), size);
  std::string problem;
  auto quantity = parse_quantity(text, problem);
  if (!quantity) {
    if (problem.empty()) std::abort();  // a refusal must say why
    return 0;
  }
  (void)display_quantity(*quantity);
  if (!std::isfinite(quantity->value)) return 0;
  std::string written = quantity_text(quantity->value, quantity->dimension, quantity->absolute_temperature);
  std::string again_problem;
  auto again = parse_quantity(written, again_problem);
  if (!again || again->value != quantity->value || !(again->dimension == quantity->dimension)) std::abort();
  return 0;
}
