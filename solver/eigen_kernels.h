#pragma once
// CVODE's vector and dense-matrix operations carried out by Eigen. Debian 12's SUNDIALS 6.4 is built without
// optimisation (its N_VLinearSum_Serial keeps every variable on the stack: about 400 instructions for a
// 14-element sum), and its serial vector kernels, dense LU and dense matrix copies were 37 % of a study
// sample's instructions (callgrind, README *Performance*). SUNDIALS lets a program supply the operations of its
// vectors, matrices and linear solvers (the ops tables of N_Vector, SUNMatrix and SUNLinearSolver); here they
// are Eigen expressions on the same storage — Eigen, a Debian-packaged library compiled with the project, so
// they run optimised — and the dense solver's LU is Eigen's PartialPivLU, factorised in place.
//
// The arithmetic is the same per element for the element-wise operations; sums (norms) and the LU's update
// order may round differently, so a run agrees with one on SUNDIALS's own kernels to rounding, not bit for bit
// (tests/eigen_kernels_test.cc). Options::eigen_kernels = false keeps SUNDIALS's own.
#include <nvector/nvector_serial.h>
#include <sundials/sundials_linearsolver.h>
#include <sundials/sundials_matrix.h>

namespace linkrise::solver {

/// Points a serial vector's operations at Eigen; vectors CVODE clones from it inherit them.
void use_eigen_kernels(N_Vector vector);

/// The same for a dense matrix (copy, zero, scale-and-add-identity; its clones too) and its dense linear
/// solver (the LU factorisation and the solve: Eigen's PartialPivLU in the matrix's own storage).
void use_eigen_kernels(SUNMatrix matrix, SUNLinearSolver solver);

}  // namespace linkrise::solver
