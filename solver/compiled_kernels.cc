#include "solver/compiled_kernels.h"

#include <cmath>

#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

// Every kernel below must round exactly as SUNDIALS's does: no fused multiply-add (CMakeLists.txt compiles this
// file with -ffp-contract=off) and no reordered sums.
namespace linkrise::solver {
namespace {

sunindextype length(N_Vector v) { return NV_LENGTH_S(v); }
double* data(N_Vector v) { return NV_DATA_S(v); }

// z[i] = f(x[i], y[i]) for every element (z may be x or y: each element is read before it is written).
template <class Function>
void combine(N_Vector x, N_Vector y, N_Vector z, Function f) {
  const sunindextype n = length(x);
  const double* xd = data(x);
  const double* yd = data(y);
  double* zd = data(z);
  for (sunindextype i = 0; i < n; ++i) zd[i] = f(xd[i], yd[i]);
}

// y <- a·x + y, with a = ±1 as a plain sum or difference.
void add_scaled(double a, N_Vector x, N_Vector y) {
  if (a == 1.0) return combine(x, y, y, [](double u, double v) { return v + u; });
  if (a == -1.0) return combine(x, y, y, [](double u, double v) { return v - u; });
  combine(x, y, y, [a](double u, double v) { return v + a * u; });
}

// z = a·x + b·y, split into SUNDIALS's cases in SUNDIALS's order.
void linear_sum(double a, N_Vector x, double b, N_Vector y, N_Vector z) {
  if (b == 1.0 && z == y) return add_scaled(a, x, y);
  if (a == 1.0 && z == x) return add_scaled(b, y, x);
  if (a == 1.0 && b == 1.0) return combine(x, y, z, [](double u, double v) { return u + v; });
  if (a == 1.0 && b == -1.0) return combine(x, y, z, [](double u, double v) { return u - v; });
  if (a == -1.0 && b == 1.0) return combine(x, y, z, [](double u, double v) { return v - u; });
  if (a == 1.0) return combine(x, y, z, [b](double u, double v) { return b * v + u; });
  if (b == 1.0) return combine(x, y, z, [a](double u, double v) { return a * u + v; });
  if (a == -1.0) return combine(x, y, z, [b](double u, double v) { return b * v - u; });
  if (b == -1.0) return combine(x, y, z, [a](double u, double v) { return a * u - v; });
  if (a == b) return combine(x, y, z, [a](double u, double v) { return a * (u + v); });
  if (a == -b) return combine(x, y, z, [a](double u, double v) { return a * (u - v); });
  combine(x, y, z, [a, b](double u, double v) { return (a * u) + (b * v); });
}

void scale(double c, N_Vector x, N_Vector z) {
  const sunindextype n = length(x);
  const double* xd = data(x);
  double* zd = data(z);
  if (z == x) {
    for (sunindextype i = 0; i < n; ++i) zd[i] *= c;
  } else if (c == 1.0) {
    for (sunindextype i = 0; i < n; ++i) zd[i] = xd[i];
  } else if (c == -1.0) {
    for (sunindextype i = 0; i < n; ++i) zd[i] = -xd[i];
  } else {
    for (sunindextype i = 0; i < n; ++i) zd[i] = c * xd[i];
  }
}

void constant(double c, N_Vector z) {
  double* zd = data(z);
  for (sunindextype i = 0, n = length(z); i < n; ++i) zd[i] = c;
}

void product(N_Vector x, N_Vector y, N_Vector z) {
  combine(x, y, z, [](double u, double v) { return u * v; });
}

void quotient(N_Vector x, N_Vector y, N_Vector z) {
  combine(x, y, z, [](double u, double v) { return u / v; });
}

void absolute(N_Vector x, N_Vector z) {
  combine(x, x, z, [](double u, double) { return std::fabs(u); });
}

void reciprocal(N_Vector x, N_Vector z) {
  combine(x, x, z, [](double u, double) { return 1.0 / u; });
}

void add_constant(N_Vector x, double b, N_Vector z) {
  combine(x, x, z, [b](double u, double) { return u + b; });
}

double max_norm(N_Vector x) {
  const double* xd = data(x);
  double largest = 0.0;
  for (sunindextype i = 0, n = length(x); i < n; ++i) {
    if (std::fabs(xd[i]) > largest) largest = std::fabs(xd[i]);
  }
  return largest;
}

double weighted_square_sum(N_Vector x, N_Vector w) {
  const double* xd = data(x);
  const double* wd = data(w);
  double sum = 0.0;
  for (sunindextype i = 0, n = length(x); i < n; ++i) {
    const double term = xd[i] * wd[i];
    sum += term * term;
  }
  return sum;
}

double weighted_rms_norm(N_Vector x, N_Vector w) {
  const double mean = weighted_square_sum(x, w) / static_cast<double>(length(x));
  return mean <= 0.0 ? 0.0 : std::sqrt(mean);
}

// z = Σ c[k]·X[k], accumulated in k order per element.
int linear_combination(int count, double* c, N_Vector* X, N_Vector z) {
  if (count < 1) return -1;
  if (count == 1) {
    scale(c[0], X[0], z);
    return 0;
  }
  if (count == 2) {
    linear_sum(c[0], X[0], c[1], X[1], z);
    return 0;
  }
  const sunindextype n = length(z);
  double* zd = data(z);
  if (X[0] != z) {
    const double* xd = data(X[0]);
    for (sunindextype i = 0; i < n; ++i) zd[i] = c[0] * xd[i];
  } else if (c[0] != 1.0) {
    for (sunindextype i = 0; i < n; ++i) zd[i] *= c[0];
  }
  for (int k = 1; k < count; ++k) {
    const double* xd = data(X[k]);
    for (sunindextype i = 0; i < n; ++i) zd[i] += c[k] * xd[i];
  }
  return 0;
}

// Z[k] = a[k]·x + Y[k].
int scale_add_multi(int count, double* a, N_Vector x, N_Vector* Y, N_Vector* Z) {
  if (count < 1) return -1;
  if (count == 1) {
    linear_sum(a[0], x, 1.0, Y[0], Z[0]);
    return 0;
  }
  const sunindextype n = length(x);
  const double* xd = data(x);
  for (int k = 0; k < count; ++k) {
    const double* yd = data(Y[k]);
    double* zd = data(Z[k]);
    if (Y == Z) {
      for (sunindextype i = 0; i < n; ++i) zd[i] += a[k] * xd[i];
    } else {
      for (sunindextype i = 0; i < n; ++i) zd[i] = a[k] * xd[i] + yd[i];
    }
  }
  return 0;
}

int scale_vector_array(int count, double* c, N_Vector* X, N_Vector* Z) {
  if (count < 1) return -1;
  if (count == 1) {
    scale(c[0], X[0], Z[0]);
    return 0;
  }
  for (int k = 0; k < count; ++k) {
    const double* xd = data(X[k]);
    double* zd = data(Z[k]);
    const sunindextype n = length(Z[0]);
    if (X == Z) {
      for (sunindextype i = 0; i < n; ++i) zd[i] *= c[k];
    } else {
      for (sunindextype i = 0; i < n; ++i) zd[i] = c[k] * xd[i];
    }
  }
  return 0;
}

// Dense matrices are column-major with a pointer per column (SUNDIALS's `cols`).
double** columns(SUNMatrix A) { return SM_COLS_D(A); }

int matrix_zero(SUNMatrix A) {
  double* values = SM_DATA_D(A);
  for (sunindextype i = 0, n = SM_LDATA_D(A); i < n; ++i) values[i] = 0.0;
  return SUNMAT_SUCCESS;
}

int matrix_copy(SUNMatrix A, SUNMatrix B) {
  if (SM_ROWS_D(A) != SM_ROWS_D(B) || SM_COLUMNS_D(A) != SM_COLUMNS_D(B)) return SUNMAT_ILL_INPUT;
  const double* from = SM_DATA_D(A);
  double* to = SM_DATA_D(B);
  for (sunindextype i = 0, n = SM_LDATA_D(A); i < n; ++i) to[i] = from[i];
  return SUNMAT_SUCCESS;
}

// A = c·A + I.
int matrix_scale_add_identity(double c, SUNMatrix A) {
  double** a = columns(A);
  for (sunindextype j = 0; j < SM_COLUMNS_D(A); ++j) {
    for (sunindextype i = 0; i < SM_ROWS_D(A); ++i) {
      a[j][i] *= c;
      if (i == j) a[j][i] += 1.0;
    }
  }
  return SUNMAT_SUCCESS;
}

void install(SUNMatrix matrix);

SUNMatrix matrix_clone(SUNMatrix A) {
  SUNMatrix copy = SUNDenseMatrix(SM_ROWS_D(A), SM_COLUMNS_D(A), A->sunctx);
  if (copy != nullptr) install(copy);
  return copy;
}

void install(SUNMatrix matrix) {
  matrix->ops->zero = matrix_zero;
  matrix->ops->copy = matrix_copy;
  matrix->ops->scaleaddi = matrix_scale_add_identity;
  matrix->ops->clone = matrix_clone;
}

// LU with partial pivoting, in place: the first largest |entry| of a column below the diagonal is the pivot,
// the multipliers are scaled by one reciprocal, and the update runs column by column. Returns 0, or k + 1 for
// a zero pivot in column k (SUNDIALS's convention).
sunindextype factorise(double** a, sunindextype m, sunindextype n, sunindextype* pivots) {
  for (sunindextype k = 0; k < n; ++k) {
    double* column_k = a[k];
    sunindextype pivot = k;
    for (sunindextype i = k + 1; i < m; ++i) {
      if (std::fabs(column_k[i]) > std::fabs(column_k[pivot])) pivot = i;
    }
    pivots[k] = pivot;
    if (column_k[pivot] == 0.0) return k + 1;
    if (pivot != k) {
      for (sunindextype j = 0; j < n; ++j) std::swap(a[j][pivot], a[j][k]);
    }
    const double multiplier = 1.0 / column_k[k];
    for (sunindextype i = k + 1; i < m; ++i) column_k[i] *= multiplier;
    for (sunindextype j = k + 1; j < n; ++j) {
      double* column_j = a[j];
      const double a_kj = column_j[k];
      if (a_kj == 0.0) continue;
      for (sunindextype i = k + 1; i < m; ++i) column_j[i] -= a_kj * column_k[i];
    }
  }
  return 0;
}

// Solves with the factors in place of b: the row swaps, then L·y = b, then U·x = y.
void back_substitute(double** a, sunindextype n, const sunindextype* pivots, double* b) {
  for (sunindextype k = 0; k < n; ++k) {
    if (pivots[k] != k) std::swap(b[k], b[pivots[k]]);
  }
  for (sunindextype k = 0; k < n - 1; ++k) {
    const double* column_k = a[k];
    const double b_k = b[k];
    for (sunindextype i = k + 1; i < n; ++i) b[i] -= column_k[i] * b_k;
  }
  for (sunindextype k = n - 1; k > 0; --k) {
    const double* column_k = a[k];
    b[k] /= column_k[k];
    const double b_k = b[k];
    for (sunindextype i = 0; i < k; ++i) b[i] -= column_k[i] * b_k;
  }
  b[0] /= a[0][0];
}

SUNLinearSolverContent_Dense content(SUNLinearSolver solver) {
  return static_cast<SUNLinearSolverContent_Dense>(solver->content);
}

int solver_setup(SUNLinearSolver solver, SUNMatrix A) {
  if (solver == nullptr || A == nullptr) return SUNLS_MEM_NULL;
  const sunindextype failed = factorise(columns(A), SM_ROWS_D(A), SM_COLUMNS_D(A), content(solver)->pivots);
  content(solver)->last_flag = failed;
  return failed > 0 ? SUNLS_LUFACT_FAIL : SUNLS_SUCCESS;
}

int solver_solve(SUNLinearSolver solver, SUNMatrix A, N_Vector x, N_Vector b, double) {
  if (solver == nullptr || A == nullptr || x == nullptr || b == nullptr) return SUNLS_MEM_NULL;
  N_VScale(1.0, b, x);
  back_substitute(columns(A), SM_ROWS_D(A), content(solver)->pivots, NV_DATA_S(x));
  content(solver)->last_flag = SUNLS_SUCCESS;
  return SUNLS_SUCCESS;
}

}  // namespace

void use_compiled_kernels(N_Vector vector) {
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

void use_compiled_kernels(SUNMatrix matrix, SUNLinearSolver solver) {
  install(matrix);
  solver->ops->setup = solver_setup;
  solver->ops->solve = solver_solve;
}

}  // namespace linkrise::solver
