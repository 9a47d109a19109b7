#include "solver/eigen_kernels.h"

#include <Eigen/Dense>
#include <cmath>
#include <cstdint>

#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

namespace linkrise::solver {
namespace {
// SUNDIALS allocates vector and matrix data with malloc, 16-byte aligned on every platform Debian builds for
// (use_eigen_kernels checks): aligned maps spare Eigen the peeling loops it would run on each call for
// unknown alignment (a tenth of a solve's instructions went to N_VLinearSum, CVODE's most frequent call).
using Vector = Eigen::Map<Eigen::VectorXd, Eigen::Aligned16>;
using Matrix = Eigen::Map<Eigen::MatrixXd, Eigen::Aligned16>;

bool aligned(const void* data) { return reinterpret_cast<std::uintptr_t>(data) % 16 == 0; }

Vector map(N_Vector v) { return Vector(NV_DATA_S(v), NV_LENGTH_S(v)); }

void linear_sum(double a, N_Vector x, double b, N_Vector y, N_Vector z) { map(z) = a * map(x) + b * map(y); }
void constant(double c, N_Vector z) { map(z).setConstant(c); }
void product(N_Vector x, N_Vector y, N_Vector z) { map(z) = map(x).cwiseProduct(map(y)); }
void quotient(N_Vector x, N_Vector y, N_Vector z) { map(z) = map(x).cwiseQuotient(map(y)); }
void scale(double c, N_Vector x, N_Vector z) { map(z) = c * map(x); }
void absolute(N_Vector x, N_Vector z) { map(z) = map(x).cwiseAbs(); }
void reciprocal(N_Vector x, N_Vector z) { map(z) = map(x).cwiseInverse(); }
void add_constant(N_Vector x, double b, N_Vector z) { map(z) = map(x).array() + b; }

double max_norm(N_Vector x) { return NV_LENGTH_S(x) > 0 ? map(x).lpNorm<Eigen::Infinity>() : 0.0; }
double weighted_square_sum(N_Vector x, N_Vector w) { return map(x).cwiseProduct(map(w)).squaredNorm(); }
double weighted_rms_norm(N_Vector x, N_Vector w) {
  return std::sqrt(weighted_square_sum(x, w) / static_cast<double>(NV_LENGTH_S(x)));
}

// z = Σ c[k]·X[k]; X[0] may be z (SUNDIALS's contract: no other operand is).
int linear_combination(int count, double* c, N_Vector* X, N_Vector z) {
  if (count < 1) return -1;
  Vector out = map(z);
  if (X[0] == z) {
    out *= c[0];
  } else {
    out = c[0] * map(X[0]);
  }
  for (int k = 1; k < count; ++k) out += c[k] * map(X[k]);
  return 0;
}

// Z[k] = a[k]·x + Y[k].
int scale_add_multi(int count, double* a, N_Vector x, N_Vector* Y, N_Vector* Z) {
  if (count < 1) return -1;
  for (int k = 0; k < count; ++k) map(Z[k]) = a[k] * map(x) + map(Y[k]);
  return 0;
}

// Z[k] = c[k]·X[k].
int scale_vector_array(int count, double* c, N_Vector* X, N_Vector* Z) {
  if (count < 1) return -1;
  for (int k = 0; k < count; ++k) map(Z[k]) = c[k] * map(X[k]);
  return 0;
}

Matrix map(SUNMatrix a) { return Matrix(SM_DATA_D(a), SM_ROWS_D(a), SM_COLUMNS_D(a)); }

int matrix_zero(SUNMatrix a) {
  map(a).setZero();
  return SUNMAT_SUCCESS;
}

int matrix_copy(SUNMatrix a, SUNMatrix b) {
  if (SM_ROWS_D(a) != SM_ROWS_D(b) || SM_COLUMNS_D(a) != SM_COLUMNS_D(b)) return SUNMAT_ILL_INPUT;
  map(b) = map(a);
  return SUNMAT_SUCCESS;
}

// A = c·A + I.
int matrix_scale_add_identity(double c, SUNMatrix a) {
  Matrix m = map(a);
  m *= c;
  m.diagonal().array() += 1.0;
  return SUNMAT_SUCCESS;
}

void install(SUNMatrix matrix);

SUNMatrix matrix_clone(SUNMatrix a) {
  SUNMatrix copy = SUNDenseMatrix(SM_ROWS_D(a), SM_COLUMNS_D(a), a->sunctx);
  if (copy != nullptr && aligned(SM_DATA_D(copy))) install(copy);
  return copy;
}

void install(SUNMatrix matrix) {
  matrix->ops->zero = matrix_zero;
  matrix->ops->copy = matrix_copy;
  matrix->ops->scaleaddi = matrix_scale_add_identity;
  matrix->ops->clone = matrix_clone;
}

SUNLinearSolverContent_Dense content(SUNLinearSolver solver) {
  return static_cast<SUNLinearSolverContent_Dense>(solver->content);
}

// Eigen's PartialPivLU in the matrix's own storage (L and U over A, as the library's dense solver keeps them);
// the row permutation goes to the solver's pivot array, which the solve reads back.
int solver_setup(SUNLinearSolver solver, SUNMatrix a) {
  if (solver == nullptr || a == nullptr) return SUNLS_MEM_NULL;
  Matrix factors = map(a);
  const Eigen::PartialPivLU<Eigen::Ref<Eigen::MatrixXd>> lu(factors);
  const auto& rows = lu.permutationP().indices();
  for (Eigen::Index i = 0; i < rows.size(); ++i) content(solver)->pivots[i] = rows[i];
  // A zero pivot: the library's convention, its column + 1 (a recoverable failure: CVODE cuts the step).
  sunindextype failed = 0;
  for (Eigen::Index k = 0; k < factors.cols() && failed == 0; ++k) {
    if (factors(k, k) == 0.0) failed = k + 1;
  }
  content(solver)->last_flag = failed;
  return failed > 0 ? SUNLS_LUFACT_FAIL : SUNLS_SUCCESS;
}

// x = A⁻¹·b: P·b, then the unit-lower and the upper triangle of the factors.
int solver_solve(SUNLinearSolver solver, SUNMatrix a, N_Vector x, N_Vector b, double) {
  if (solver == nullptr || a == nullptr || x == nullptr || b == nullptr) return SUNLS_MEM_NULL;
  const Matrix factors = map(a);
  Vector out = map(x);
  const Vector in = map(b);
  const sunindextype* rows = content(solver)->pivots;
  if (x == b) {
    const Eigen::VectorXd copy = in;
    for (Eigen::Index i = 0; i < copy.size(); ++i) out[rows[i]] = copy[i];
  } else {
    for (Eigen::Index i = 0; i < in.size(); ++i) out[rows[i]] = in[i];
  }
  factors.triangularView<Eigen::UnitLower>().solveInPlace(out);
  factors.triangularView<Eigen::Upper>().solveInPlace(out);
  content(solver)->last_flag = SUNLS_SUCCESS;
  return SUNLS_SUCCESS;
}

}  // namespace

void use_eigen_kernels(N_Vector vector) {
  if (!aligned(NV_DATA_S(vector))) return;  // the library's own operations then
  N_Vector_Ops ops = vector->ops;
  ops->nvlinearsum = linear_sum;
  ops->nvconst = constant;
  ops->nvprod = product;
  ops->nvdiv = quotient;
  ops->nvscale = scale;
  ops->nvabs = absolute;
  ops->nvinv = reciprocal;
  ops->nvaddconst = add_constant;
  ops->nvmaxnorm = max_norm;
  ops->nvmaxnormlocal = max_norm;
  ops->nvwrmsnorm = weighted_rms_norm;
  ops->nvwsqrsumlocal = weighted_square_sum;
  // The fused operations only where the vector has them switched on (N_VEnableFusedOps_Serial).
  if (ops->nvlinearcombination != nullptr) ops->nvlinearcombination = linear_combination;
  if (ops->nvscaleaddmulti != nullptr) ops->nvscaleaddmulti = scale_add_multi;
  if (ops->nvscalevectorarray != nullptr) ops->nvscalevectorarray = scale_vector_array;
}

void use_eigen_kernels(SUNMatrix matrix, SUNLinearSolver solver) {
  if (!aligned(SM_DATA_D(matrix))) return;
  install(matrix);
  solver->ops->setup = solver_setup;
  solver->ops->solve = solver_solve;
}

}  // namespace linkrise::solver
