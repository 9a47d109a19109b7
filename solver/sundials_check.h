#pragma once
// Every SUNDIALS return code passes through check(), which names the call that failed.
#include <stdexcept>
#include <string>

namespace linkrise::solver {

/// Raised inside the solver layer only; simulate() turns it into a status value with a message.
class SolverError : public std::runtime_error {
 public:
  SolverError(const std::string& message, double time) : std::runtime_error(message), time_(time) {}
  double time() const { return time_; }

 private:
  double time_;
};

/// Throws SolverError when `flag` is negative, with the call name, CVODE's name for the flag and the time.
void check(int flag, const char* call, double time);
/// Throws SolverError when a constructor returned null.
void check_pointer(const void* pointer, const char* call);

}  // namespace linkrise::solver
