// The assembled system and solve_field against closed-form electrostatics: coaxial cylinders,
// layered dielectrics, a floating cylinder, concentric and isolated spheres, a grounded enclosure.
#include <cmath>

#include <gtest/gtest.h>

#include "solver/elements.h"
#include "solver/field_solver.h"
#include "structured_mesh.h"

namespace hv {
namespace {

FieldSolution solve(const Mesh& mesh, std::vector<Conductor> conductors, double far_field_c = 1.0) {
  FieldProblem problem;
  problem.mesh = &mesh;
  problem.conductors = std::move(conductors);
  problem.far_field_c = far_field_c;
  return solve_field(problem);
}

double relative_error(double value, double exact) { return std::abs(value / exact - 1); }

TEST(Stiffness, ConstantLiesInItsNullSpace) {
  // Without the open-boundary term, K 1 = 0: a uniform potential carries no field.
  test::CoaxSpec coax;
  coax.layers = {0.02};
  coax.eps = {1.0, 4.4};
  for (const Mesh& mesh : {test::coax_mesh(coax), test::shell_mesh(2, 0.05, 0.2, 4, 12, BoundaryKind::Open)}) {
    const Eigen::SparseMatrix<double> K = stiffness_matrix(mesh, 0.0);
    const double scale = Eigen::MatrixXd(K).cwiseAbs().maxCoeff();
    EXPECT_LT((K * Eigen::VectorXd::Ones(mesh.n_nodes())).cwiseAbs().maxCoeff(), 1e-13 * scale);
    EXPECT_LT(Eigen::MatrixXd(K - Eigen::SparseMatrix<double>(K.transpose())).cwiseAbs().maxCoeff(), 1e-15 * scale);
  }
}

TEST(Stiffness, OpenBoundaryTermIntegratesOverTheSphere) {
  // 1^T K 1 = eps_r (c / b) x (area 4 pi b^2 of the truncating sphere) when only the Robin term acts.
  const double b = 0.2, c = 2.0;
  const Mesh mesh = test::shell_mesh(2, 0.05, b, 2, 24, BoundaryKind::Open);
  const Eigen::VectorXd one = Eigen::VectorXd::Ones(mesh.n_nodes());
  const double robin = one.dot(stiffness_matrix(mesh, c) * one);
  EXPECT_LT(relative_error(robin, c / b * 4 * kPi * b * b), 1e-6);
}

TEST(FieldSolver, CoaxialCapacitanceAndPotentialMatchTheLogFormula) {
  // Coaxial cylinders: u = V ln(b/r) / ln(b/a), C = 2 pi eps0 L / ln(b/a) (Jackson, Classical
  // Electrodynamics, 3rd ed., section 1.13 problems; any electrostatics text).
  test::CoaxSpec coax;
  coax.nr = 8;
  const Mesh mesh = test::coax_mesh(coax);
  const double V = 1000.0, log_ratio = std::log(coax.b / coax.a);
  const FieldSolution s = solve(mesh, {{"inner", false, V}, {"outer", false, 0.0}});
  ASSERT_TRUE(s.report.ok) << s.report.message;
  const double C = 2 * kPi * kEpsilon0 * coax.L / log_ratio;
  EXPECT_LT(relative_error(s.capacitance_F(0, 0), C), 1e-5);  // measured 4.1e-6
  EXPECT_LT(relative_error(-s.capacitance_F(0, 1), C), 1e-5);
  EXPECT_LT(relative_error(s.conductor_charge_C[0], C * V), 1e-5);
  EXPECT_LT(relative_error(s.energy_J, 0.5 * C * V * V), 1e-5);
  double worst = 0;
  for (int k = 0; k < mesh.n_nodes(); ++k)
    worst = std::max(worst, std::abs(s.potential(k) - V * std::log(coax.b / mesh.nodes[static_cast<size_t>(k)].r) / log_ratio));
  EXPECT_LT(worst, 3e-4 * V);
  EXPECT_LT(s.report.relative_residual, 1e-12);
  EXPECT_EQ(s.report.method, "cholmod-supernodal");
}

TEST(FieldSolver, TwoLayerCoaxialCapacitanceIsTheSeriesOfItsLayers) {
  // Layers in series: 1/C = (ln(c/a)/eps1 + ln(b/c)/eps2) / (2 pi eps0 L).
  test::CoaxSpec coax;
  coax.nr = 12;
  coax.layers = {0.015};
  coax.eps = {4.4, 1.0};
  const FieldSolution s = solve(test::coax_mesh(coax), {{"inner", false, 1.0}, {"outer", false, 0.0}});
  const double C = 2 * kPi * kEpsilon0 * coax.L / (std::log(0.015 / coax.a) / 4.4 + std::log(coax.b / 0.015) / 1.0);
  EXPECT_LT(relative_error(s.capacitance_F(0, 0), C), 2e-5);
}

// Gas between r = a and r1 and between r2 and b; the floating cylinder r1 < r < r2 is a hole.
Mesh floating_cylinder_mesh(double a, double r1, double r2, double b, double L, int n) {
  test::GridSpec spec;
  spec.u = test::join(test::join(test::lines(a, r1, n), test::lines(r1, r2, 2)), test::lines(r2, b, n));
  spec.v = test::lines(0, L, 2);
  spec.cell_region = [n](int i, int) { return i >= n && i < n + 2 ? -1 : 0; };
  const int nu = 2 * n + 2;
  return test::grid_mesh(spec, {
      {BoundaryKind::Electrode, "inner", 0, 0, -1, {{{0, 0}, {0, 2}}}},
      {BoundaryKind::Electrode, "middle", 1, 0, -1, {{{n, 0}, {n, 2}}, {{n + 2, 0}, {n + 2, 2}}}},
      {BoundaryKind::Electrode, "outer", 2, 0, -1, {{{nu, 0}, {nu, 2}}}},
      {BoundaryKind::Symmetry, "bottom", -1, -1, -1, {{{0, 0}, {n, 0}}, {{n + 2, 0}, {nu, 0}}}},
      {BoundaryKind::Symmetry, "top", -1, -1, -1, {{{0, 2}, {n, 2}}, {{n + 2, 2}, {nu, 2}}}},
  });
}

TEST(FieldSolver, FloatingCylinderTakesThePotentialOfItsSeriesCapacitances) {
  // Zero net charge on the middle cylinder: C1 (V - Vf) = C2 Vf with C1 ~ 1/ln(r1/a), C2 ~ 1/ln(b/r2),
  // so Vf = V ln(b/r2) / (ln(r1/a) + ln(b/r2)).
  const double a = 0.01, r1 = 0.02, r2 = 0.025, b = 0.05, V = 1000.0;
  const FieldSolution s = solve(floating_cylinder_mesh(a, r1, r2, b, 0.01, 8),
                                {{"inner", false, V}, {"middle", true, 0.0}, {"outer", false, 0.0}});
  const double expected = V * std::log(b / r2) / (std::log(r1 / a) + std::log(b / r2));
  EXPECT_LT(relative_error(s.conductor_potential_V[1], expected), 1e-5);
  const double scale = std::abs(s.conductor_charge_C[0]);
  EXPECT_LT(std::abs(s.conductor_charge_C[1]), 1e-10 * scale);
  EXPECT_LT(std::abs(s.conductor_charge_C[0] + s.conductor_charge_C[2]), 1e-10 * scale);
}

TEST(FieldSolver, GroundedEnclosureHoldsTheOppositeChargeOfItsContents) {
  // Gauss's law: every field line from the inner conductor ends on the closed grounded enclosure.
  // Enclosure r < 0.1, 0 < z < 0.2 (bottom, side and top at 0 V); inner rod r < 0.02, 0.08 < z < 0.12.
  test::GridSpec spec;
  spec.u = test::join(test::lines(0, 0.02, 2), test::lines(0.02, 0.1, 6));
  spec.v = test::join(test::join(test::lines(0, 0.08, 5), test::lines(0.08, 0.12, 3)), test::lines(0.12, 0.2, 5));
  spec.cell_region = [](int i, int j) { return i < 2 && j >= 5 && j < 8 ? -1 : 0; };
  const Mesh mesh = test::grid_mesh(spec, {
      {BoundaryKind::Electrode, "rod", 0, 0, -1, {{{0, 5}, {2, 5}, {2, 8}, {0, 8}}}},
      {BoundaryKind::Electrode, "enclosure", 1, 0, -1, {{{0, 0}, {8, 0}, {8, 13}, {0, 13}}}},
      {BoundaryKind::Axis, "axis", -1, -1, -1, {{{0, 0}, {0, 5}}, {{0, 8}, {0, 13}}}},
  });
  const FieldSolution s = solve(mesh, {{"rod", false, 5000.0}, {"enclosure", false, 0.0}});
  ASSERT_GT(s.conductor_charge_C[0], 0.0);
  EXPECT_LT(std::abs(s.conductor_charge_C[0] + s.conductor_charge_C[1]), 1e-10 * s.conductor_charge_C[0]);
  EXPECT_LT(std::abs(s.capacitance_F(0, 0) + s.capacitance_F(1, 0)), 1e-10 * s.capacitance_F(0, 0));
}

TEST(FieldSolver, ConcentricSpheresMatchTheSphericalCapacitor) {
  // C = 4 pi eps0 / (1/a - 1/b) (Jackson, 3rd ed., section 1.13, problem 1.6).
  const double a = 0.05, b = 0.2;
  const FieldSolution s = solve(test::shell_mesh(2, a, b, 16, 48, BoundaryKind::Electrode),
                                {{"sphere", false, 1.0}, {"shell", false, 0.0}});
  EXPECT_LT(relative_error(s.capacitance_F(0, 0), 4 * kPi * kEpsilon0 / (1 / a - 1 / b)), 3e-5);  // measured 1.7e-5
}

TEST(FieldSolver, IsolatedSphereUnderTheFarFieldConditionHasCapacitance4PiEps0a) {
  // u = V a / rho satisfies du/dn + u/R = 0 on rho = R exactly (Bayliss, Gunzburger & Turkel 1982,
  // first order for a monopole), so the truncated problem keeps C = 4 pi eps0 a of the open one.
  const double a = 0.05, V = 100e3;
  const Mesh mesh = test::shell_mesh(2, a, 0.25, 16, 32, BoundaryKind::Open);
  const FieldSolution s = solve(mesh, {{"sphere", false, V}}, 1.0);
  const double C = 4 * kPi * kEpsilon0 * a;
  EXPECT_LT(relative_error(s.capacitance_F(0, 0), C), 6e-5);  // measured 3.9e-5
  EXPECT_LT(relative_error(s.energy_J, 0.5 * C * V * V), 6e-5);
  // c = 2 (the dipole condition) is wrong for a monopole and must show it.
  EXPECT_GT(relative_error(solve(mesh, {{"sphere", false, V}}, 2.0).capacitance_F(0, 0), C), 1e-2);
}

TEST(FieldSolver, RejectsAProblemWhereEveryConductorFloats) {
  test::CoaxSpec coax;
  EXPECT_THROW(solve(test::coax_mesh(coax), {{"inner", true, 0.0}, {"outer", true, 0.0}}), InputError);
}

TEST(FieldSolver, RejectsAFloatingConductorThatNoFieldReaches) {
  // Conductor 2 has no surface in the mesh, so its capacitance row is zero.
  test::CoaxSpec coax;
  EXPECT_THROW(solve(test::coax_mesh(coax), {{"inner", false, 1.0}, {"outer", false, 0.0}, {"lost", true, 0.0}}),
               InputError);
}

}  // namespace
}  // namespace hv
