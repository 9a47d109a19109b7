#pragma once
// The HTML report of `linkrise size --report FILE.html` (docs/report.md): the verdict (the window and the chosen
// design), one margin-versus-value plot per constraint with the feasible window shaded and the zero line marked,
// the boundaries with their binding points, the ranked catalogue, and the verification of the chosen design (the
// fault scenarios with the case's BMS window and with the recommended one). Composed from the HtmlReport blocks,
// so it is self-contained and byte-reproducible like the other reports.
#include <string>

#include "app/studies/sizing.h"

namespace linkrise::app {

std::string sizing_report_html(const Sizing& sizing);

}  // namespace linkrise::app
