#include "app/output/waveform_csv.h"

#include <fmt/format.h>

namespace linkrise::app {

std::string waveform_csv(const solver::Waveform& waveform) {
  fmt::memory_buffer out;
  fmt::format_to(std::back_inserter(out), "time [s]");
  for (const auto& header : waveform.headers()) fmt::format_to(std::back_inserter(out), ",{}", header);
  out.push_back('\n');
  for (std::size_t r = 0; r < waveform.row_count(); ++r) {
    fmt::format_to(std::back_inserter(out), "{:.12g}", waveform.time(r));
    for (int c = 0; c < waveform.column_count(); ++c) {
      fmt::format_to(std::back_inserter(out), ",{:.10g}", waveform.value(r, c));
    }
    out.push_back('\n');
  }
  return fmt::to_string(out);
}

}  // namespace linkrise::app
