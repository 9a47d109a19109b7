#include "app/evaluation/case_run.h"


namespace linkrise::app {

CaseRun::CaseRun(const netlist::Case& spec, const std::function<void(solver::Options&)>& adjust)
    : circuit_(spec), options_(solver::options_from(circuit_)) {
  if (adjust) adjust(options_);
  if (const auto& sequence = circuit_.spec().sequence) {
    solver::attach(controller_.emplace(circuit_, *sequence), options_);
  }
  result_ = solver::simulate(circuit_, options_);
  audit_ = analysis::audit_energy(circuit_, result_);
  if (controller_) report_ = controller_->report(result_.end_time);
  if (!solver_failed()) evaluation_ = analysis::evaluate(circuit_, result_, audit_, report());
}

}  // namespace linkrise::app
