// The lean assembly (blocks from the mesh's pattern, the same for any thread count), the iterative
// solve (CG with the p-multigrid preconditioner) against the direct one, and the reuse of CHOLMOD's
// symbolic analysis, each also checked against closed-form electrostatics.
#include <cmath>

#include <omp.h>

#include <gtest/gtest.h>

#include "solver/assembly.h"
#include "solver/elements.h"
#include "solver/field_solver.h"
#include "solver/linear_system.h"
#include "structured_mesh.h"

namespace hv {
namespace {

FieldSolution solve(const Mesh& mesh, std::vector<Conductor> conductors, LinearSolverKind kind,
                    FactorizationCache* cache = nullptr) {
  FieldProblem problem;
  problem.mesh = &mesh;
  problem.conductors = std::move(conductors);
  problem.linear_solver = kind;
  problem.factorization_cache = cache;
  return solve_field(problem);
}

double relative_error(double value, double exact) { return std::abs(value / exact - 1); }

// Largest |a - b| over largest |b|.
double relative_difference(const Eigen::VectorXd& a, const Eigen::VectorXd& b) {
  return (a - b).cwiseAbs().maxCoeff() / b.cwiseAbs().maxCoeff();
}

// Runs `work` with `threads` OpenMP threads and restores the previous count.
template <class Work>
auto with_threads(int threads, Work&& work) {
  const int before = omp_get_max_threads();
  omp_set_num_threads(threads);
  auto result = work();
  omp_set_num_threads(before);
  return result;
}

template <class Matrix>
bool identical(const Matrix& a, const Matrix& b) {
  return a.rows() == b.rows() && a.cols() == b.cols() && a.nonZeros() == b.nonZeros() &&
         std::equal(a.outerIndexPtr(), a.outerIndexPtr() + a.outerSize() + 1, b.outerIndexPtr()) &&
         std::equal(a.innerIndexPtr(), a.innerIndexPtr() + a.nonZeros(), b.innerIndexPtr()) &&
         std::equal(a.valuePtr(), a.valuePtr() + a.nonZeros(), b.valuePtr());
}

const Mesh& sphere_in_open_space() {
  static const Mesh mesh = test::shell_mesh(2, 0.05, 0.25, 8, 16, BoundaryKind::Open);
  return mesh;
}

TEST(Assembly, BlocksAreBitForBitTheSameWithOneAndTwoThreads) {
  const Mesh& mesh = sphere_in_open_space();
  const Partition p = partition_nodes(mesh, 1);
  const BlockSystem one = with_threads(1, [&] { return assemble_blocks(mesh, 1.0, p); });
  const BlockSystem two = with_threads(2, [&] { return assemble_blocks(mesh, 1.0, p); });
  EXPECT_TRUE(identical(one.K_ff, two.K_ff));
  EXPECT_TRUE(identical(one.K_fd, two.K_fd));
  EXPECT_TRUE(identical(one.K_d, two.K_d));
}

TEST(Assembly, BlocksAreTheMatchingPartsOfTheWholeMatrix) {
  const Mesh& mesh = sphere_in_open_space();
  const Partition p = partition_nodes(mesh, 1);
  const BlockSystem blocks = assemble_blocks(mesh, 1.0, p);
  const Eigen::MatrixXd K = Eigen::MatrixXd(stiffness_matrix(mesh, 1.0));
  // The blocks number free and fixed nodes by the partition (along a Hilbert curve), K by node.
  std::vector<int> free_nodes(static_cast<size_t>(p.n_free)), fixed_nodes(static_cast<size_t>(p.n_fixed)), all_nodes;
  for (int node = 0; node < mesh.n_nodes(); ++node) {
    (p.is_free(node) ? free_nodes : fixed_nodes)[static_cast<size_t>(p.index[static_cast<size_t>(node)])] = node;
    all_nodes.push_back(node);
  }
  // The two numberings add a row's element contributions in different orders: equal to round-off.
  const double round_off = 1e-14 * K.cwiseAbs().maxCoeff();
  EXPECT_LT((Eigen::MatrixXd(blocks.K_ff) - Eigen::MatrixXd(K(free_nodes, free_nodes))).cwiseAbs().maxCoeff(), round_off);
  EXPECT_LT((Eigen::MatrixXd(blocks.K_fd) - Eigen::MatrixXd(K(free_nodes, fixed_nodes))).cwiseAbs().maxCoeff(), round_off);
  EXPECT_LT((Eigen::MatrixXd(blocks.K_d) - Eigen::MatrixXd(K(fixed_nodes, all_nodes))).cwiseAbs().maxCoeff(), round_off);
  EXPECT_EQ(blocks.K_ff.nonZeros() + blocks.K_fd.nonZeros() + blocks.K_d.nonZeros(),
            Eigen::SparseMatrix<double>(stiffness_matrix(mesh, 1.0)).nonZeros());
}

TEST(IterativeSolve, MatchesTheDirectSolveAndTheIsolatedSphere) {
  // C = 4 pi eps0 a for a sphere alone in space (Jackson, Classical Electrodynamics, 3rd ed., 1.13).
  const Mesh& mesh = sphere_in_open_space();
  const FieldSolution direct = solve(mesh, {{"sphere", false, 1000.0}}, LinearSolverKind::Direct);
  const FieldSolution cg = solve(mesh, {{"sphere", false, 1000.0}}, LinearSolverKind::Iterative);
  ASSERT_TRUE(cg.report.ok) << cg.report.message;
  EXPECT_EQ(direct.report.method, "cholmod-supernodal");
  EXPECT_EQ(cg.report.method, "pcg-p-multigrid");
  EXPECT_GT(cg.report.iterations, 1);
  EXPECT_LT(cg.report.relative_residual, 1e-10);
  EXPECT_LT(relative_difference(cg.potential, direct.potential), 1e-8);  // measured 3e-11
  EXPECT_LT(relative_error(cg.capacitance_F(0, 0), direct.capacitance_F(0, 0)), 1e-8);
  EXPECT_LT(relative_error(cg.capacitance_F(0, 0), 4 * kPi * kEpsilon0 * 0.05), 2e-3);  // truncation at 5 a
}

TEST(IterativeSolve, SolvesEveryUnitRightHandSideOfTwoConductors) {
  // Concentric spheres: C = 4 pi eps0 / (1/a - 1/b) (Jackson, 3rd ed., section 1.13, problem 1.6).
  const double a = 0.05, b = 0.2;
  const Mesh mesh = test::shell_mesh(2, a, b, 12, 32, BoundaryKind::Electrode);
  const std::vector<Conductor> conductors = {{"sphere", false, 1.0}, {"shell", false, 0.0}};
  const FieldSolution direct = solve(mesh, conductors, LinearSolverKind::Direct);
  const FieldSolution cg = solve(mesh, conductors, LinearSolverKind::Iterative);
  EXPECT_LT((cg.capacitance_F - direct.capacitance_F).cwiseAbs().maxCoeff(), 1e-8 * direct.capacitance_F(0, 0));
  EXPECT_LT(relative_error(cg.capacitance_F(0, 0), 4 * kPi * kEpsilon0 / (1 / a - 1 / b)), 1e-4);
}

TEST(IterativeSolve, IterationsHardlyGrowWhenTheMeshIsRefined) {
  // Multigrid convergence does not degrade with h (Helenbrook, Mavriplis & Atkins, AIAA J. 41, 2003).
  const auto iterations = [](int nr, int nt) {
    const Mesh mesh = test::shell_mesh(2, 0.05, 0.25, nr, nt, BoundaryKind::Open);
    return solve(mesh, {{"sphere", false, 1.0}}, LinearSolverKind::Iterative).report.iterations;
  };
  const int coarse = iterations(8, 16), fine = iterations(32, 64);
  EXPECT_LT(fine, 1.5 * coarse) << coarse << " -> " << fine;
}

TEST(IterativeSolve, IsTheSameWithOneAndTwoThreads) {
  const Mesh& mesh = sphere_in_open_space();
  const auto potential = [&](int threads) {
    return with_threads(threads, [&] { return solve(mesh, {{"sphere", false, 1.0}}, LinearSolverKind::Iterative).potential; });
  };
  EXPECT_EQ(potential(1), potential(2));
}

// Right-hand sides -K_fd g for m different sets g of conductor values (a smooth pattern per column).
Eigen::MatrixXd right_hand_sides(const BlockSystem& blocks, int m) {
  Eigen::MatrixXd G(blocks.K_fd.cols(), m);
  for (Eigen::Index i = 0; i < G.rows(); ++i)
    for (int j = 0; j < m; ++j) G(i, j) = std::cos(0.01 * static_cast<double>((j + 1) * i));
  return -(blocks.K_fd * G);
}

TEST(IterativeSolve, AnyNumberOfColumnsMatchesTheDirectSolveAndIsTheSameWithOneAndTwoThreads) {
  // The block kernels are compiled apart for 1 to 4 columns and generically above.
  const Mesh& mesh = sphere_in_open_space();
  const Partition p = partition_nodes(mesh, 1);
  const BlockSystem blocks = assemble_blocks(mesh, 1.0, p);
  for (int m : {1, 3, 4, 6}) {
    const Eigen::MatrixXd B = right_hand_sides(blocks, m);
    SolveReport direct_report, one_report, two_report;
    const Eigen::MatrixXd direct = solve_free_system(mesh, 1.0, p, blocks.K_ff, B, LinearSolverKind::Direct, nullptr, direct_report);
    const auto iterative = [&](int threads, SolveReport& report) {
      return with_threads(threads, [&] {
        return solve_free_system(mesh, 1.0, p, blocks.K_ff, B, LinearSolverKind::Iterative, nullptr, report);
      });
    };
    const Eigen::MatrixXd one = iterative(1, one_report), two = iterative(2, two_report);
    EXPECT_EQ(one, two) << m << " columns";
    EXPECT_LT(one_report.relative_residual, 1e-10) << m << " columns";
    EXPECT_LT((one - direct).cwiseAbs().maxCoeff(), 1e-8 * direct.cwiseAbs().maxCoeff()) << m << " columns";
  }
}

TEST(IterativeSolve, OnAnOrderOneMeshTheCoarseLevelIsExactAndOneIterationSuffices) {
  const Mesh mesh = test::shell_mesh(1, 0.05, 0.25, 8, 16, BoundaryKind::Open);
  const FieldSolution cg = solve(mesh, {{"sphere", false, 1.0}}, LinearSolverKind::Iterative);
  EXPECT_EQ(cg.report.iterations, 1);
  EXPECT_LT(cg.report.relative_residual, 1e-10);
}

TEST(DirectSolve, ReusesTheSymbolicAnalysisWhenOnlyPermittivitiesChange) {
  // Two layers in series: 1/C = (ln(c/a)/eps1 + ln(b/c)/eps2) / (2 pi eps0 L) (any electrostatics text).
  test::CoaxSpec coax;
  coax.nr = 12;
  coax.layers = {0.015};
  coax.eps = {4.4, 1.0};
  Mesh mesh = test::coax_mesh(coax);
  const std::vector<Conductor> conductors = {{"inner", false, 1.0}, {"outer", false, 0.0}};
  FactorizationCache cache;
  solve(mesh, conductors, LinearSolverKind::Direct, &cache);
  mesh.regions[1].permittivity = 2.5;
  const FieldSolution reused = solve(mesh, conductors, LinearSolverKind::Direct, &cache);
  const FieldSolution fresh = solve(mesh, conductors, LinearSolverKind::Direct);
  EXPECT_EQ(cache.analyses(), 1);
  EXPECT_LT(relative_difference(reused.potential, fresh.potential), 1e-14);
  const double C = 2 * kPi * kEpsilon0 * coax.L / (std::log(0.015 / coax.a) / 4.4 + std::log(coax.b / 0.015) / 2.5);
  EXPECT_LT(relative_error(reused.capacitance_F(0, 0), C), 2e-5);
}

}  // namespace
}  // namespace hv
