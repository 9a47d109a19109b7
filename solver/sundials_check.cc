#include "solver/sundials_check.h"

#include <cvodes/cvodes.h>
#include <fmt/format.h>

namespace linkrise::solver {

void check(int flag, const char* call, double time) {
  if (flag >= 0) return;
  char* name = CVodeGetReturnFlagName(flag);
  std::string flag_name = name ? name : "unknown";
  free(name);
  std::string hint;
  switch (flag) {
    case CV_TOO_MUCH_WORK:
    case CV_TOO_CLOSE:
      hint = "the solver needed too many steps; check for a part with an extreme value (a very small inductance "
             "or resistance) or lengthen max_step";
      break;
    case CV_ERR_FAILURE:
    case CV_CONV_FAILURE:
      hint = "the solution changes faster than the solver can follow; look for a near-ideal switch or an "
             "unstable constant-power load (no operating point), or tighten rtol";
      break;
    case CV_RHSFUNC_FAIL:
    case CV_REPTD_RHSFUNC_ERR:
    case CV_UNREC_RHSFUNC_ERR:
    case CV_QRHSFUNC_FAIL:
    case CV_REPTD_QRHSFUNC_ERR:
    case CV_UNREC_QRHSFUNC_ERR:
      hint = "the circuit equations could not be solved at this point (Newton did not converge)";
      break;
    default:
      break;
  }
  throw SolverError(fmt::format("{} failed with {} ({}) at t = {:.9g} s{}{}", call, flag_name, flag, time,
                                hint.empty() ? "" : ": ", hint),
                    time);
}

void check_pointer(const void* pointer, const char* call) {
  if (pointer == nullptr) throw SolverError(fmt::format("{} returned no object (out of memory?)", call), 0.0);
}

}  // namespace linkrise::solver
