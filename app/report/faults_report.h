#pragma once
// The HTML report of `linkrise faults CASE.yaml --report FILE.html`: the detection matrix (one table row per
// scenario, failing rows marked by the word FAIL and the reason, not only by colour), the matrix verdict, the
// pre-charge resistor's peak temperature and energy against its ratings per scenario, the link voltage of
// every simulated scenario with its first fault marked, the not-applicable scenarios with their reasons, and
// the high-voltage caution. Composed from the HtmlReport blocks (app/report/report_html.h), so it is self-contained
// and byte-reproducible like the run report (docs/report.md).
#include <string>

#include "app/studies/faults.h"

namespace linkrise::app {

/// The complete HTML report of one detection matrix.
std::string faults_report_html(const DetectionMatrix& matrix);

}  // namespace linkrise::app
