// The compiled CVODE kernels (solver/compiled_kernels.h) against SUNDIALS's own: the library as Debian packages
// it is the reference (docs/references.md [R-SUNDIALS-kernels]). Every kernel must give the library's numbers
// bit for bit, for every special case of its coefficients and operands, and a whole sequence run must give
// the same rows and metrics with either set.
#include <cmath>
#include <cstring>
#include <memory>
#include <random>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nvector/nvector_serial.h>
#include <sundials/sundials_context.h>
#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

#include "app/evaluation/case_run.h"
#include "netlist/case_document.h"
#include "solver/compiled_kernels.h"

namespace {
using linkrise::solver::use_compiled_kernels;

bool same_bits(const double* a, const double* b, long n) { return std::memcmp(a, b, sizeof(double) * n) == 0; }
bool same_bits(double a, double b) { return same_bits(&a, &b, 1); }

// One vector per kernel set with identical contents: the library's and the compiled ones.
class VectorPair {
 public:
  VectorPair(SUNContext context, long n, bool compiled) : vector_(N_VNew_Serial(n, context)) {
    N_VEnableFusedOps_Serial(vector_, SUNTRUE);
    if (compiled) use_compiled_kernels(vector_);
  }
  ~VectorPair() { N_VDestroy(vector_); }
  VectorPair(const VectorPair&) = delete;
  VectorPair& operator=(const VectorPair&) = delete;
  N_Vector get() const { return vector_; }
  double* data() const { return N_VGetArrayPointer(vector_); }

 private:
  N_Vector vector_;
};

class CompiledKernels : public ::testing::Test {
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

void expect_same(const Operands& library, const Operands& compiled, long n, const std::string& what) {
  EXPECT_TRUE(same_bits(library.x.data(), compiled.x.data(), n)) << what << ": x";
  EXPECT_TRUE(same_bits(library.y.data(), compiled.y.data(), n)) << what << ": y";
  EXPECT_TRUE(same_bits(library.z.data(), compiled.z.data(), n)) << what << ": z";
}

TEST_F(CompiledKernels, LinearSumAndScaleMatchTheLibraryInEverySpecialCase) {
  const double c = 0.37, d = -2.9;
  const std::vector<std::pair<double, double>> coefficients = {{1, 1},  {1, -1}, {-1, 1}, {1, d},  {c, 1}, {-1, d},
                                                               {c, -1}, {c, c},  {c, -c}, {c, d}, {0, d}, {-1, -1}};
  for (long n : {1L, 7L, 14L, 19L}) {
    Operands library(context_, n, false), compiled(context_, n, true);
    std::vector<double> values(3 * n);
    for (const auto& [a, b] : coefficients) {
      for (int target = 0; target < 3; ++target) {  // result in z, in x, in y
        fill(values);
        load(library, values, n);
        load(compiled, values, n);
        auto run = [&](const Operands& o) {
          N_Vector result = target == 0 ? o.z.get() : target == 1 ? o.x.get() : o.y.get();
          N_VLinearSum(a, o.x.get(), b, o.y.get(), result);
        };
        run(library);
        run(compiled);
        expect_same(library, compiled, n, "linear sum a=" + std::to_string(a) + " b=" + std::to_string(b));
      }
    }
    for (double factor : {1.0, -1.0, c}) {
      for (bool in_place : {false, true}) {
        fill(values);
        load(library, values, n);
        load(compiled, values, n);
        N_VScale(factor, library.x.get(), in_place ? library.x.get() : library.z.get());
        N_VScale(factor, compiled.x.get(), in_place ? compiled.x.get() : compiled.z.get());
        expect_same(library, compiled, n, "scale");
      }
    }
  }
}

TEST_F(CompiledKernels, ElementwiseOperationsAndNormsMatchTheLibrary) {
  for (long n : {1L, 14L, 19L}) {
    Operands library(context_, n, false), compiled(context_, n, true);
    std::vector<double> values(3 * n);
    fill(values);
    for (long i = 0; i < n; ++i) values[n + i] = values[n + i] == 0.0 ? 3.0 : values[n + i];  // divisors
    auto both = [&](const std::string& what, auto operation) {
      load(library, values, n);
      load(compiled, values, n);
      operation(library);
      operation(compiled);
      expect_same(library, compiled, n, what);
    };
    both("const", [](const Operands& o) { N_VConst(-4.25, o.z.get()); });
    both("prod", [](const Operands& o) { N_VProd(o.x.get(), o.y.get(), o.z.get()); });
    both("div", [](const Operands& o) { N_VDiv(o.x.get(), o.y.get(), o.z.get()); });
    both("abs", [](const Operands& o) { N_VAbs(o.x.get(), o.z.get()); });
    both("inv", [](const Operands& o) { N_VInv(o.y.get(), o.z.get()); });
    both("add const", [](const Operands& o) { N_VAddConst(o.x.get(), 1.5e-3, o.z.get()); });
    load(library, values, n);
    load(compiled, values, n);
    EXPECT_TRUE(
        same_bits(N_VWrmsNorm(library.x.get(), library.y.get()), N_VWrmsNorm(compiled.x.get(), compiled.y.get())));
    EXPECT_TRUE(same_bits(N_VWSqrSumLocal(library.x.get(), library.y.get()),
                          N_VWSqrSumLocal(compiled.x.get(), compiled.y.get())));
    EXPECT_TRUE(same_bits(N_VMaxNorm(library.x.get()), N_VMaxNorm(compiled.x.get())));
  }
}

TEST_F(CompiledKernels, FusedOperationsMatchTheLibrary) {
  const long n = 19;
  for (int count : {1, 2, 3, 5}) {
    for (int form = 0; form < 3; ++form) {  // result apart; in X[0] with c[0] = 1; in X[0] with c[0] != 1
      std::vector<std::unique_ptr<VectorPair>> library, compiled;
      std::vector<double> values(n);
      for (int k = 0; k <= count; ++k) {
        fill(values);
        library.push_back(std::make_unique<VectorPair>(context_, n, false));
        compiled.push_back(std::make_unique<VectorPair>(context_, n, true));
        std::memcpy(library.back()->data(), values.data(), sizeof(double) * n);
        std::memcpy(compiled.back()->data(), values.data(), sizeof(double) * n);
      }
      std::vector<double> c = {form == 1 ? 1.0 : 0.8, -1.0, 2.5e-3, 1.0, -7.0};
      std::vector<N_Vector> library_x, compiled_x;
      for (int k = 0; k < count; ++k) library_x.push_back(library[k]->get());
      for (int k = 0; k < count; ++k) compiled_x.push_back(compiled[k]->get());
      N_Vector library_z = form == 0 ? library[count]->get() : library_x[0];
      N_Vector compiled_z = form == 0 ? compiled[count]->get() : compiled_x[0];
      ASSERT_EQ(N_VLinearCombination(count, c.data(), library_x.data(), library_z), 0);
      ASSERT_EQ(N_VLinearCombination(count, c.data(), compiled_x.data(), compiled_z), 0);
      for (int k = 0; k <= count; ++k) {
        EXPECT_TRUE(same_bits(library[k]->data(), compiled[k]->data(), n)) << "linear combination of " << count;
      }
      // Scale-add-multi: Z[k] = c[k]·x + Y[k], with Z apart from Y or equal to it.
      std::vector<N_Vector> library_y = library_x, compiled_y = compiled_x;
      std::vector<N_Vector> library_out = library_y, compiled_out = compiled_y;
      N_Vector* library_z_array = form == 0 ? library_out.data() : library_y.data();
      N_Vector* compiled_z_array = form == 0 ? compiled_out.data() : compiled_y.data();
      ASSERT_EQ(N_VScaleAddMulti(count, c.data(), library[count]->get(), library_y.data(), library_z_array), 0);
      ASSERT_EQ(N_VScaleAddMulti(count, c.data(), compiled[count]->get(), compiled_y.data(), compiled_z_array), 0);
      ASSERT_EQ(N_VScaleVectorArray(count, c.data(), library_y.data(), library_y.data()), 0);
      ASSERT_EQ(N_VScaleVectorArray(count, c.data(), compiled_y.data(), compiled_y.data()), 0);
      for (int k = 0; k <= count; ++k) {
        EXPECT_TRUE(same_bits(library[k]->data(), compiled[k]->data(), n)) << "scale-add-multi of " << count;
      }
    }
  }
}

// A dense matrix and its solver, with either kernel set.
struct DenseSystem {
  DenseSystem(SUNContext context, long n, bool compiled)
      : matrix(SUNDenseMatrix(n, n, context)), vector(N_VNew_Serial(n, context)),
        solver(SUNLinSol_Dense(vector, matrix, context)) {
    if (compiled) use_compiled_kernels(matrix, solver);
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

TEST_F(CompiledKernels, DenseFactorisationAndSolveMatchTheLibrary) {
  for (long n : {1L, 2L, 7L, 14L}) {
    for (int shape = 0; shape < 3; ++shape) {  // random; entries of equal size (pivot ties); a zero column
      DenseSystem library(context_, n, false), compiled(context_, n, true);
      std::vector<double> entries(n * n), b(n);
      fill(entries);
      fill(b);
      if (shape == 1) {
        for (double& e : entries) e = e < 0.0 ? -2.0 : 2.0;
      }
      for (DenseSystem* system : {&library, &compiled}) {
        std::memcpy(SUNDenseMatrix_Data(system->matrix), entries.data(), sizeof(double) * n * n);
        ASSERT_EQ(SUNMatScaleAddI(-0.125, system->matrix), 0);  // CVODE's I − γ·J
        if (shape == 2) std::fill_n(SUNDenseMatrix_Data(system->matrix) + (n - 1) * n, n, 0.0);  // singular
      }
      EXPECT_TRUE(same_bits(SUNDenseMatrix_Data(library.matrix), SUNDenseMatrix_Data(compiled.matrix), n * n));
      const int library_setup = SUNLinSolSetup(library.solver, library.matrix);
      const int compiled_setup = SUNLinSolSetup(compiled.solver, compiled.matrix);
      EXPECT_EQ(library_setup, compiled_setup) << "n " << n << ", shape " << shape;
      EXPECT_EQ(SUNLinSolLastFlag(library.solver), SUNLinSolLastFlag(compiled.solver));
      EXPECT_TRUE(same_bits(SUNDenseMatrix_Data(library.matrix), SUNDenseMatrix_Data(compiled.matrix), n * n));
      if (library_setup != SUNLS_SUCCESS) continue;
      for (DenseSystem* system : {&library, &compiled}) {
        N_Vector right = N_VClone(system->vector);
        std::memcpy(N_VGetArrayPointer(right), b.data(), sizeof(double) * n);
        ASSERT_EQ(SUNLinSolSolve(system->solver, system->matrix, system->vector, right, 0.0), SUNLS_SUCCESS);
        N_VDestroy(right);
      }
      EXPECT_TRUE(same_bits(N_VGetArrayPointer(library.vector), N_VGetArrayPointer(compiled.vector), n));
    }
  }
}

TEST_F(CompiledKernels, MatrixCopiesZerosAndClonesKeepTheCompiledKernels) {
  const long n = 7;
  DenseSystem compiled(context_, n, true);
  std::vector<double> entries(n * n);
  fill(entries);
  std::memcpy(SUNDenseMatrix_Data(compiled.matrix), entries.data(), sizeof(double) * n * n);
  SUNMatrix clone = SUNMatClone(compiled.matrix);
  ASSERT_NE(clone, nullptr);
  EXPECT_EQ(clone->ops->copy, compiled.matrix->ops->copy);  // CVODE's saved Jacobian is such a clone
  ASSERT_EQ(SUNMatCopy(compiled.matrix, clone), 0);
  EXPECT_TRUE(same_bits(SUNDenseMatrix_Data(clone), entries.data(), n * n));
  ASSERT_EQ(SUNMatZero(clone), 0);
  for (long i = 0; i < n * n; ++i) EXPECT_EQ(SUNDenseMatrix_Data(clone)[i], 0.0);
  SUNMatDestroy(clone);
}

// The whole pipeline of a study point — a bounced BMS sequence at the study accuracy — with SUNDIALS's kernels
// and with the compiled ones: the same steps, every row and every metric bit for bit.
TEST(CompiledKernelsRun, SequenceRunGivesTheSameRowsAndMetricsBitForBit) {
  auto document = linkrise::netlist::CaseDocument::load(LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml");
  document.apply(linkrise::netlist::Override{"run.rtol", "1e-5", {}});
  const auto spec = document.validate();
  linkrise::app::CaseRun library(spec, [](linkrise::solver::Options& o) { o.compiled_kernels = false; });
  linkrise::app::CaseRun compiled(spec, [](linkrise::solver::Options& o) { o.compiled_kernels = true; });
  ASSERT_FALSE(library.solver_failed());
  ASSERT_FALSE(compiled.solver_failed());
  EXPECT_EQ(library.result().statistics.steps, compiled.result().statistics.steps);
  EXPECT_GT(compiled.result().statistics.steps, 100);
  const auto& a = library.result().steps;
  const auto& b = compiled.result().steps;
  ASSERT_EQ(a.row_count(), b.row_count());
  ASSERT_EQ(a.column_count(), b.column_count());
  EXPECT_TRUE(same_bits(a.times().data(), b.times().data(), static_cast<long>(a.row_count())));
  for (std::size_t row = 0; row < a.row_count(); ++row) {
    for (int column = 0; column < a.column_count(); ++column) {
      ASSERT_TRUE(same_bits(a.value(row, column), b.value(row, column)))
          << "row " << row << ", " << a.headers()[column];
    }
  }
  const auto& metrics_a = library.evaluation().metrics.list();
  const auto& metrics_b = compiled.evaluation().metrics.list();
  ASSERT_EQ(metrics_a.size(), metrics_b.size());
  ASSERT_GT(metrics_a.size(), 50u);
  for (std::size_t m = 0; m < metrics_a.size(); ++m) {
    EXPECT_EQ(metrics_a[m].name, metrics_b[m].name);
    EXPECT_TRUE(same_bits(metrics_a[m].value, metrics_b[m].value)) << metrics_a[m].name;
  }
}

}  // namespace
