#pragma once
// CVODE's vector and dense-matrix kernels, compiled with the project. Debian 12's SUNDIALS 6.4 is built without
// optimisation (its N_VLinearSum_Serial spills every variable to the stack: about 400 instructions for a
// 14-element sum), and those kernels were 37 % of a study sample's instructions (callgrind, README
// *Performance*). These replacements do the same arithmetic: per element the same operations in the same order,
// the same special cases of the coefficients (a = ±1, a = ±b, an operand that is also the result), sums
// accumulated in index order, the LU factorisation with the same pivot choice and loop order. So a run gives
// bit for bit the numbers it gave with SUNDIALS's own kernels (tests/compiled_kernels_test.cc compares every
// kernel with the library's, and a whole run with both).
#include <nvector/nvector_serial.h>
#include <sundials/sundials_linearsolver.h>
#include <sundials/sundials_matrix.h>

namespace linkrise::solver {

/// Points a serial vector's operations at the compiled kernels; vectors CVODE clones from it inherit them.
void use_compiled_kernels(N_Vector vector);

/// The same for a dense matrix (copy, zero, scale-and-add-identity; its clones too) and its dense linear
/// solver (the LU factorisation and the solve).
void use_compiled_kernels(SUNMatrix matrix, SUNLinearSolver solver);

}  // namespace linkrise::solver
