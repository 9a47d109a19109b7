#pragma once
// The HTML report of `linkrise fit`: the fitted parameters with their intervals, the correlation matrix and the
// warnings, and every fitted signal measured beside simulated with its residual.
#include <string>

#include "app/report/report_html.h"
#include "app/studies/fit.h"

namespace linkrise::app {

std::string fit_report_html(const FitResult& fit);

/// The measured signals of a fit as curves in case time (measured, simulated at the solution, residual).
std::vector<MeasuredCurve> fit_curves(const FitResult& fit);

}  // namespace linkrise::app
