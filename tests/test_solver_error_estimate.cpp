// The Zienkiewicz-Zhu estimator (solver/error_estimate.h) against closed-form fields: the recovery
// reproduces a gradient the elements hold exactly, and on the smooth coaxial field the estimate
// matches the true energy-norm error (effectivity index near 1, as Zienkiewicz & Zhu, Int. J. Numer.
// Methods Eng. 33, 1992, part 2, report for superconvergent patch recovery on regular meshes).
#include <cmath>

#include <gtest/gtest.h>

#include "solver/elements.h"
#include "solver/error_estimate.h"
#include "solver/field_solver.h"
#include "structured_mesh.h"

namespace hv {
namespace {

// Coaxial cylinders a < r < b at potentials V and 0: u = V ln(b / r) / ln(b / a), so
// du/dr = -V / (r ln(b / a)) (cylindrical capacitor, e.g. Jackson, Classical Electrodynamics, 3rd ed.,
// sec. 1.11).
constexpr double kV = 1000.0;

FieldSolution solve_coax(const Mesh& mesh) {
  FieldProblem problem;
  problem.mesh = &mesh;
  problem.conductors = {{"inner", false, kV}, {"outer", false, 0.0}};
  return solve_field(problem);
}

// The true error in the estimator's norm: sqrt(integral of eps0 |grad(u_h) - grad(u)|^2 2 pi r dr dz).
double true_energy_error(const Mesh& mesh, const Eigen::VectorXd& u, double a, double b) {
  double sum = 0.0;
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (const TrianglePoint& q : triangle_rule(mesh.order)) {
      const TriangleSample s = sample_triangle(mesh, t, q.xi, q.eta);
      double g_r = 0, g_z = 0;
      for (int i = 0; i < s.n; ++i) g_r += u[mesh.triangle(t)[i]] * s.dN_dr[i], g_z += u[mesh.triangle(t)[i]] * s.dN_dz[i];
      const double exact = -kV / (s.at.r * std::log(b / a));
      sum += kEpsilon0 * 2 * kPi * s.at.r * s.detJ * q.weight * ((g_r - exact) * (g_r - exact) + g_z * g_z);
    }
  return std::sqrt(sum);
}

double effectivity(int order, int cells) {
  test::CoaxSpec coax;
  coax.order = order;
  coax.nr = cells;
  coax.nz = 2;
  const Mesh mesh = test::coax_mesh(coax);
  const FieldSolution solution = solve_coax(mesh);
  const ErrorEstimate estimate = zz_error_estimate(mesh, solution.potential);
  return estimate.global / true_energy_error(mesh, solution.potential, coax.a, coax.b);
}

// Zienkiewicz & Zhu (part 1): the patch fit of degree p reproduces every gradient of degree p, so a
// potential the elements represent exactly leaves no estimated error.
TEST(ErrorEstimate, VanishesForAPotentialTheElementsHoldExactly) {
  for (int order : {1, 2}) {
    test::CoaxSpec coax;
    coax.order = order;
    const Mesh mesh = test::coax_mesh(coax);
    Eigen::VectorXd u(mesh.n_nodes());
    for (int k = 0; k < mesh.n_nodes(); ++k) {
      const Point& x = mesh.nodes[static_cast<size_t>(k)];
      u[k] = order == 1 ? 3 * x.r - 2 * x.z : x.r * x.r - 2 * x.z * x.z + x.r * x.z;
    }
    const ErrorEstimate estimate = zz_error_estimate(mesh, u);
    EXPECT_LT(estimate.global, 1e-9 * estimate.energy_norm) << "order " << order;
  }
}

TEST(ErrorEstimate, RecoveredGradientOfALinearPotentialIsExact) {
  test::CoaxSpec coax;
  const Mesh mesh = test::coax_mesh(coax);
  Eigen::VectorXd u(mesh.n_nodes());
  for (int k = 0; k < mesh.n_nodes(); ++k) u[k] = 5 * mesh.nodes[static_cast<size_t>(k)].r + 7 * mesh.nodes[static_cast<size_t>(k)].z;
  for (const Eigen::Vector2d& g : recovered_gradient(mesh, u)) {
    EXPECT_NEAR(g.x(), 5.0, 1e-9);
    EXPECT_NEAR(g.y(), 7.0, 1e-9);
  }
}

TEST(ErrorEstimate, EffectivityNearOneOnTheSmoothCoaxialField) {
  for (int order : {1, 2})
    for (int cells : {8, 32}) EXPECT_NEAR(effectivity(order, cells), 1.0, 0.1) << "order " << order << ", " << cells << " cells";
}

}  // namespace
}  // namespace hv
