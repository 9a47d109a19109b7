// CVODE's operations on Eigen (solver/eigen_kernels.h) against SUNDIALS's own: the library as Debian packages it
// is the reference (docs/references.md [R-SUNDIALS-kernels]). Every operation must give the library's numbers to
// rounding — a few units in the last place of the terms it combines — for every special case of its coefficients
// and operands; the LU must solve its system to rounding (residual test, Golub and Van Loan's backward-error
// bound for partial pivoting, from memory); and a whole sequence run must give the same metrics to within its
// tolerance.
#include <cmath>
#include <cstring>
#include <map>
#include <memory>
#include <random>
#include <string>
#include <vector>

#include <Eigen/Dense>
#include <gtest/gtest.h>
#include <nvector/nvector_serial.h>
#include <sundials/sundials_context.h>
#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

#include "app/evaluation/case_run.h"
#include "netlist/case_document.h"
#include "solver/eigen_kernels.h"

namespace {
using linkrise::solver::use_eigen_kernels;

constexpr double kEpsilon = 2.220446049250313e-16;  // IEEE 754 double (docs/references.md [R-IEEE754])

// |a − b| within `ulps` units of rounding of `size` (the magnitude of the terms that made the value).
bool close(double a, double b, double size, double ulps = 4.0) {
  return std::fabs(a - b) <= ulps * kEpsilon * size || a == b;
}

// One vector per kernel set with identical contents: the library's and the compiled ones.
class VectorPair {
 public:
  VectorPair(SUNContext context, long n, bool compiled) : vector_(N_VNew_Serial(n, context)) {
    N_VEnableFusedOps_Serial(vector_, SUNTRUE);
    if (compiled) use_eigen_kernels(vector_);
  }
  ~VectorPair() { N_VDestroy(vector_); }
  VectorPair(const VectorPair&) = delete;
  VectorPair& operator=(const VectorPair&) = delete;
  N_Vector get() const { return vector_; }
  double* data() const { return N_VGetArrayPointer(vector_); }

 private:
  N_Vector vector_;
};

class EigenKernels : public ::testing::Test {
 protected:
  void SetUp() override { ASSERT_EQ(SUNContext_Create(nullptr, &context_), 0); }
  void TearDown() override { SUNContext_Free(&context_); }
  // Values over many decades and both signs, some exactly zero.
  void fill(std::vector<double>& values) {
    std::uniform_real_distribution<double> mantissa(-1.0, 1.0);
    std::uniform_int_distribution<int> exponent(-12, 12);
    for (double& v : values) v = (random_() % 11 == 0) ? 0.0 : mantissa(random_) * std::pow(10.0, exponent(random_));
  }
  SUNContext context_ = nullptr;
  std::mt19937_64 random_{20261203};
};

// Three operands per kernel set, loaded with the same random values.
struct Operands {
  Operands(SUNContext context, long n, bool compiled)
      : x(context, n, compiled), y(context, n, compiled), z(context, n, compiled) {}
  VectorPair x, y, z;
};

void load(const Operands& to, const std::vector<double>& values, long n) {
  std::memcpy(to.x.data(), values.data(), sizeof(double) * n);
  std::memcpy(to.y.data(), values.data() + n, sizeof(double) * n);
  std::memcpy(to.z.data(), values.data() + 2 * n, sizeof(double) * n);
}

// Every element of the three operands within rounding of `size(i)`, the magnitude of the terms of element i.
template <class Size>
void expect_close(const Operands& library, const Operands& compiled, long n, const std::string& what, Size size) {
  for (long i = 0; i < n; ++i) {
    EXPECT_TRUE(close(library.x.data()[i], compiled.x.data()[i], size(i))) << what << ": x[" << i << "]";
    EXPECT_TRUE(close(library.y.data()[i], compiled.y.data()[i], size(i))) << what << ": y[" << i << "]";
    EXPECT_TRUE(close(library.z.data()[i], compiled.z.data()[i], size(i))) << what << ": z[" << i << "]";
  }
}

TEST_F(EigenKernels, LinearSumAndScaleMatchTheLibraryInEverySpecialCase) {
  const double c = 0.37, d = -2.9;
  const std::vector<std::pair<double, double>> coefficients = {{1, 1},  {1, -1}, {-1, 1}, {1, d},  {c, 1}, {-1, d},
                                                               {c, -1}, {c, c},  {c, -c}, {c, d}, {0, d}, {-1, -1}};
  for (long n : {1L, 7L, 14L, 19L}) {
    Operands library(context_, n, false), eigen(context_, n, true);
    std::vector<double> values(3 * n);
    for (const auto& pair : coefficients) {
      const double a = pair.first, b = pair.second;  // named: clang 14 does not capture structured bindings
      for (int target = 0; target < 3; ++target) {  // result in z, in x, in y
        fill(values);
        load(library, values, n);
        load(eigen, values, n);
        auto run = [&](const Operands& o) {
          N_Vector result = target == 0 ? o.z.get() : target == 1 ? o.x.get() : o.y.get();
          N_VLinearSum(a, o.x.get(), b, o.y.get(), result);
        };
        run(library);
        run(eigen);
        expect_close(library, eigen, n, "linear sum a=" + std::to_string(a) + " b=" + std::to_string(b),
                     [&](long i) { return std::fabs(a * values[i]) + std::fabs(b * values[n + i]); });
      }
    }
    for (double factor : {1.0, -1.0, c}) {
      for (bool in_place : {false, true}) {
        fill(values);
        load(library, values, n);
        load(eigen, values, n);
        N_VScale(factor, library.x.get(), in_place ? library.x.get() : library.z.get());
        N_VScale(factor, eigen.x.get(), in_place ? eigen.x.get() : eigen.z.get());
        expect_close(library, eigen, n, "scale", [](long) { return 0.0; });  // one product: exact
      }
    }
  }
}

TEST_F(EigenKernels, ElementwiseOperationsAndNormsMatchTheLibrary) {
  for (long n : {1L, 14L, 19L}) {
    Operands library(context_, n, false), eigen(context_, n, true);
    std::vector<double> values(3 * n);
    fill(values);
    for (long i = 0; i < n; ++i) values[n + i] = values[n + i] == 0.0 ? 3.0 : values[n + i];  // divisors
    auto both = [&](const std::string& what, auto operation) {
      load(library, values, n);
      load(eigen, values, n);
      operation(library);
      operation(eigen);
      expect_close(library, eigen, n, what, [](long) { return 0.0; });  // one rounding each: exact
    };
    both("const", [](const Operands& o) { N_VConst(-4.25, o.z.get()); });
    both("prod", [](const Operands& o) { N_VProd(o.x.get(), o.y.get(), o.z.get()); });
    both("div", [](const Operands& o) { N_VDiv(o.x.get(), o.y.get(), o.z.get()); });
    both("abs", [](const Operands& o) { N_VAbs(o.x.get(), o.z.get()); });
    both("inv", [](const Operands& o) { N_VInv(o.y.get(), o.z.get()); });
    both("add const", [](const Operands& o) { N_VAddConst(o.x.get(), 1.5e-3, o.z.get()); });
    load(library, values, n);
    load(eigen, values, n);
    // A sum of n non-negative squares: its rounding is at most n·ε of the sum whatever the order.
    const double squares = N_VWSqrSumLocal(library.x.get(), library.y.get());
    EXPECT_TRUE(close(squares, N_VWSqrSumLocal(eigen.x.get(), eigen.y.get()), squares, 2.0 * n));
    const double norm = N_VWrmsNorm(library.x.get(), library.y.get());
    EXPECT_TRUE(close(norm, N_VWrmsNorm(eigen.x.get(), eigen.y.get()), norm, 2.0 * n));
    EXPECT_EQ(N_VMaxNorm(library.x.get()), N_VMaxNorm(eigen.x.get()));  // a largest |entry| is exact
  }
}

TEST_F(EigenKernels, FusedOperationsMatchTheLibrary) {
  const long n = 19;
  for (int count : {1, 2, 3, 5}) {
    for (int form = 0; form < 3; ++form) {  // result apart; in X[0] with c[0] = 1; in X[0] with c[0] != 1
      std::vector<std::unique_ptr<VectorPair>> library, eigen;
      std::vector<std::vector<double>> start;
      std::vector<double> values(n);
      for (int k = 0; k <= count; ++k) {
        fill(values);
        start.push_back(values);
        library.push_back(std::make_unique<VectorPair>(context_, n, false));
        eigen.push_back(std::make_unique<VectorPair>(context_, n, true));
        std::memcpy(library.back()->data(), values.data(), sizeof(double) * n);
        std::memcpy(eigen.back()->data(), values.data(), sizeof(double) * n);
      }
      std::vector<double> c = {form == 1 ? 1.0 : 0.8, -1.0, 2.5e-3, 1.0, -7.0};
      // The magnitude of the terms of element i of Σ c[k]·X[k] (and of the later updates, a few times that).
      auto size = [&](long i) {
        double total = 0.0;
        for (int k = 0; k <= count; ++k) total += 8.0 * std::fabs(start[k][i]);
        return total;
      };
      std::vector<N_Vector> library_x, eigen_x;
      for (int k = 0; k < count; ++k) library_x.push_back(library[k]->get());
      for (int k = 0; k < count; ++k) eigen_x.push_back(eigen[k]->get());
      N_Vector library_z = form == 0 ? library[count]->get() : library_x[0];
      N_Vector eigen_z = form == 0 ? eigen[count]->get() : eigen_x[0];
      ASSERT_EQ(N_VLinearCombination(count, c.data(), library_x.data(), library_z), 0);
      ASSERT_EQ(N_VLinearCombination(count, c.data(), eigen_x.data(), eigen_z), 0);
      for (int k = 0; k <= count; ++k) {
        for (long i = 0; i < n; ++i) {
          EXPECT_TRUE(close(library[k]->data()[i], eigen[k]->data()[i], size(i), 2.0 * count))
              << "linear combination of " << count;
        }
      }
      // Scale-add-multi: Z[k] = c[k]·x + Y[k], with Z apart from Y or equal to it.
      std::vector<N_Vector> library_y = library_x, eigen_y = eigen_x;
      std::vector<N_Vector> library_out = library_y, eigen_out = eigen_y;
      N_Vector* library_z_array = form == 0 ? library_out.data() : library_y.data();
      N_Vector* eigen_z_array = form == 0 ? eigen_out.data() : eigen_y.data();
      ASSERT_EQ(N_VScaleAddMulti(count, c.data(), library[count]->get(), library_y.data(), library_z_array), 0);
      ASSERT_EQ(N_VScaleAddMulti(count, c.data(), eigen[count]->get(), eigen_y.data(), eigen_z_array), 0);
      ASSERT_EQ(N_VScaleVectorArray(count, c.data(), library_y.data(), library_y.data()), 0);
      ASSERT_EQ(N_VScaleVectorArray(count, c.data(), eigen_y.data(), eigen_y.data()), 0);
      for (int k = 0; k <= count; ++k) {
        for (long i = 0; i < n; ++i) {
          EXPECT_TRUE(close(library[k]->data()[i], eigen[k]->data()[i], size(i), 8.0 * count))
              << "scale-add-multi of " << count;
        }
      }
    }
  }
}

// A dense matrix and its solver, with either kernel set.
struct DenseSystem {
  DenseSystem(SUNContext context, long n, bool eigen)
      : matrix(SUNDenseMatrix(n, n, context)), vector(N_VNew_Serial(n, context)),
        solver(SUNLinSol_Dense(vector, matrix, context)) {
    if (eigen) use_eigen_kernels(matrix, solver);
  }
  ~DenseSystem() {
    SUNLinSolFree(solver);
    SUNMatDestroy(matrix);
    N_VDestroy(vector);
  }
  DenseSystem(const DenseSystem&) = delete;
  DenseSystem& operator=(const DenseSystem&) = delete;
  SUNMatrix matrix;
  N_Vector vector;
  SUNLinearSolver solver;
};

// Partial pivoting solves A·x = b with a residual of order n·ε·‖A‖·‖x‖ (backward stable in practice; Golub and
// Van Loan, Matrix Computations, section 3.4, from memory); both solvers must meet that, and agree with each
// other within the condition number's amplification of it.
TEST_F(EigenKernels, DenseFactorisationSolvesToRoundingAndFlagsASingularMatrix) {
  for (long n : {1L, 2L, 7L, 14L}) {
    for (int shape = 0; shape < 2; ++shape) {  // CVODE's I − γ·J of a random J; a zero last column (singular)
      DenseSystem library(context_, n, false), eigen(context_, n, true);
      std::vector<double> entries(n * n), b(n);
      fill(entries);
      fill(b);
      for (double& e : entries) e = e == 0.0 ? 0.5 : e;
      for (DenseSystem* system : {&library, &eigen}) {
        std::memcpy(SUNDenseMatrix_Data(system->matrix), entries.data(), sizeof(double) * n * n);
        ASSERT_EQ(SUNMatScaleAddI(-0.125, system->matrix), 0);
        if (shape == 1) std::fill_n(SUNDenseMatrix_Data(system->matrix) + (n - 1) * n, n, 0.0);
      }
      const Eigen::MatrixXd a = Eigen::Map<const Eigen::MatrixXd>(SUNDenseMatrix_Data(eigen.matrix), n, n);
      EXPECT_EQ(a, Eigen::Map<const Eigen::MatrixXd>(SUNDenseMatrix_Data(library.matrix), n, n));
      const int library_setup = SUNLinSolSetup(library.solver, library.matrix);
      const int eigen_setup = SUNLinSolSetup(eigen.solver, eigen.matrix);
      EXPECT_EQ(library_setup, eigen_setup) << "n " << n << ", shape " << shape;
      if (shape == 1) {
        EXPECT_EQ(SUNLinSolLastFlag(eigen.solver), n);  // the zero pivot's column + 1, as the library says
        continue;
      }
      ASSERT_EQ(eigen_setup, SUNLS_SUCCESS);
      Eigen::VectorXd solutions[2];
      int which = 0;
      for (DenseSystem* system : {&library, &eigen}) {
        N_Vector right = N_VClone(system->vector);
        std::memcpy(N_VGetArrayPointer(right), b.data(), sizeof(double) * n);
        ASSERT_EQ(SUNLinSolSolve(system->solver, system->matrix, system->vector, right, 0.0), SUNLS_SUCCESS);
        solutions[which++] = Eigen::Map<const Eigen::VectorXd>(N_VGetArrayPointer(system->vector), n);
        N_VDestroy(right);
      }
      const Eigen::VectorXd rhs = Eigen::Map<const Eigen::VectorXd>(b.data(), n);
      const double scale = a.cwiseAbs().rowwise().sum().maxCoeff() * solutions[1].cwiseAbs().maxCoeff() +
                           rhs.cwiseAbs().maxCoeff();
      EXPECT_LE((a * solutions[1] - rhs).cwiseAbs().maxCoeff(), 16.0 * n * kEpsilon * scale) << "n " << n;
      const double condition = a.inverse().cwiseAbs().rowwise().sum().maxCoeff() * a.cwiseAbs().rowwise().sum().maxCoeff();
      EXPECT_LE((solutions[0] - solutions[1]).cwiseAbs().maxCoeff(),
                32.0 * n * kEpsilon * condition * solutions[0].cwiseAbs().maxCoeff())
          << "n " << n;
    }
  }
}

TEST_F(EigenKernels, MatrixCopiesZerosAndClonesKeepTheEigenKernels) {
  const long n = 7;
  DenseSystem eigen(context_, n, true);
  std::vector<double> entries(n * n);
  fill(entries);
  std::memcpy(SUNDenseMatrix_Data(eigen.matrix), entries.data(), sizeof(double) * n * n);
  SUNMatrix clone = SUNMatClone(eigen.matrix);
  ASSERT_NE(clone, nullptr);
  EXPECT_EQ(clone->ops->copy, eigen.matrix->ops->copy);  // CVODE's saved Jacobian is such a clone
  ASSERT_EQ(SUNMatCopy(eigen.matrix, clone), 0);
  EXPECT_EQ(std::memcmp(SUNDenseMatrix_Data(clone), entries.data(), sizeof(double) * n * n), 0);
  ASSERT_EQ(SUNMatZero(clone), 0);
  for (long i = 0; i < n * n; ++i) EXPECT_EQ(SUNDenseMatrix_Data(clone)[i], 0.0);
  SUNMatDestroy(clone);
}

// The whole pipeline of a study point — a bounced BMS sequence — with SUNDIALS's kernels and with Eigen's, at a
// tight tolerance (rtol 1e-9): rounding differences move the steps, and the metrics read from the rows between
// them (a pulse's energy from its threshold crossings, found row by row) follow by a few 1e-6; they must agree
// within 1e-5 relative (ten times inside the goldens' 1e-4) or 1e-5 of the largest value of their unit.
TEST(EigenKernelsRun, SequenceRunGivesTheSameMetricsToItsTolerance) {
  auto document = linkrise::netlist::CaseDocument::load(LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml");
  document.apply(linkrise::netlist::Override{"run.rtol", "1e-9", {}});
  const auto spec = document.validate();
  linkrise::app::CaseRun library(spec, [](linkrise::solver::Options& o) { o.eigen_kernels = false; });
  linkrise::app::CaseRun eigen(spec, [](linkrise::solver::Options& o) { o.eigen_kernels = true; });
  ASSERT_FALSE(library.solver_failed());
  ASSERT_FALSE(eigen.solver_failed());
  EXPECT_GT(eigen.result().statistics.steps, 100);
  const auto& metrics_a = library.evaluation().metrics.list();
  const auto& metrics_b = eigen.evaluation().metrics.list();
  ASSERT_EQ(metrics_a.size(), metrics_b.size());
  ASSERT_GT(metrics_a.size(), 50u);
  std::map<std::string, double> largest;  // per unit
  for (const auto& m : metrics_a) {
    if (std::isfinite(m.value)) largest[m.unit] = std::max(largest[m.unit], std::fabs(m.value));
  }
  for (std::size_t m = 0; m < metrics_a.size(); ++m) {
    EXPECT_EQ(metrics_a[m].name, metrics_b[m].name);
    const double a = metrics_a[m].value, b = metrics_b[m].value;
    if (std::isnan(a)) {
      EXPECT_TRUE(std::isnan(b)) << metrics_a[m].name;
      continue;
    }
    EXPECT_LE(std::fabs(a - b), 1e-5 * std::max(std::fabs(a), largest[metrics_a[m].unit]))
        << metrics_a[m].name << ": " << a << " against " << b;
  }
}

}  // namespace
