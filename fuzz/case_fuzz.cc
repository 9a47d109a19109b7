// libFuzzer target: a whole case file through the reader, the validator, the plausibility check and the circuit
// build with its topology checks (and the same for every variant) — everything before the solve. Bad input must
// end in netlist::InputError; any other exception, a crash or a sanitizer report is a finding.
#include <cstdint>
#include <string>

#include "netlist/case_document.h"
#include "netlist/input_error.h"
#include "netlist/plausibility.h"
#include "solver/circuit.h"

namespace {

void build(const linkrise::netlist::CaseDocument& document) {
  linkrise::netlist::Case spec = document.validate();
  (void)linkrise::netlist::plausibility_warnings(spec);
  linkrise::solver::Circuit circuit(spec);
  for (const auto& variant : spec.variants) {
    linkrise::solver::Circuit varied(document.with_variant(variant).validate());
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  std::string text(reinterpret_cast<const char*>(data), size);
  try {
    build(linkrise::netlist::CaseDocument::parse(text, "fuzz.yaml"));
  } catch (const linkrise::netlist::InputError&) {
    // the expected end of bad input
  }
  return 0;
}
