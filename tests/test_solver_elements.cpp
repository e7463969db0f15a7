// Quadrature rules, shape functions and isoparametric triangles against exact integrals and the
// defining properties of Lagrange elements.
#include <cmath>

#include <gtest/gtest.h>

#include "solver/elements.h"
#include "structured_mesh.h"

namespace hv {
namespace {

double factorial(int n) { return n <= 1 ? 1.0 : n * factorial(n - 1); }

TEST(Quadrature, DunavantRuleIntegratesDegreeFiveExactly) {
  // Integral of xi^a eta^b over the reference triangle = a! b! / (a + b + 2)!
  // (Zienkiewicz & Taylor, The Finite Element Method, vol. 1, area coordinates; recalled from memory).
  for (int a = 0; a <= 5; ++a)
    for (int b = 0; a + b <= 5; ++b) {
      double sum = 0;
      for (const TrianglePoint& q : triangle_rule()) sum += q.weight * std::pow(q.xi, a) * std::pow(q.eta, b);
      const double exact = factorial(a) * factorial(b) / factorial(a + b + 2);
      EXPECT_NEAR(sum, exact, 1e-14 * exact + 1e-15) << "xi^" << a << " eta^" << b;
    }
}

TEST(Quadrature, GaussLegendreFourPointsIntegratesDegreeSevenExactly) {
  for (int k = 0; k <= 7; ++k) {
    double sum = 0;
    for (const EdgePoint& q : edge_rule()) sum += q.weight * std::pow(q.t, k);
    EXPECT_NEAR(sum, 1.0 / (k + 1), 1e-14) << "t^" << k;  // integral of t^k over [0, 1]
  }
}

TEST(ShapeFunctions, AreNodalAndSumToOne) {
  // A Lagrange basis is 1 at its own node, 0 at the others, and reproduces constants.
  for (int order : {1, 2}) {
    const int n = order == 1 ? 3 : 6;
    double N[6], dxi[6], deta[6];
    for (int j = 0; j < n; ++j) {
      double xi, eta;
      triangle_node_reference(order, j, &xi, &eta);
      triangle_shape(order, xi, eta, N, dxi, deta);
      for (int i = 0; i < n; ++i) EXPECT_NEAR(N[i], i == j ? 1.0 : 0.0, 1e-15);
    }
    triangle_shape(order, 0.21, 0.37, N, dxi, deta);
    double sum = 0, sum_dxi = 0, sum_deta = 0;
    for (int i = 0; i < n; ++i) sum += N[i], sum_dxi += dxi[i], sum_deta += deta[i];
    EXPECT_NEAR(sum, 1.0, 1e-15);
    EXPECT_NEAR(sum_dxi, 0.0, 1e-14);
    EXPECT_NEAR(sum_deta, 0.0, 1e-14);
  }
}

// Volume of revolution of a mesh: sum of integral of 2 pi r |J| over its triangles.
double revolved_volume(const Mesh& mesh) {
  double volume = 0;
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (const TrianglePoint& q : triangle_rule()) {
      const TriangleSample s = sample_triangle(mesh, t, q.xi, q.eta);
      EXPECT_GT(s.detJ, 0.0);
      volume += 2 * kPi * s.at.r * s.detJ * q.weight;
    }
  return volume;
}

TEST(IsoparametricTriangle, CurvedP2ShellHasTheSphericalShellVolume) {
  // Spherical shell 4/3 pi (b^3 - a^3); P2's curved edges follow the circles, P1's chords do not.
  const double a = 0.05, b = 0.2, exact = 4.0 / 3.0 * kPi * (b * b * b - a * a * a);
  const double p2 = revolved_volume(test::shell_mesh(2, a, b, 4, 16, BoundaryKind::Electrode));
  const double p1 = revolved_volume(test::shell_mesh(1, a, b, 8, 32, BoundaryKind::Electrode));
  EXPECT_LT(std::abs(p2 / exact - 1), 2e-5);
  EXPECT_GT(std::abs(p1 / exact - 1), 10 * std::abs(p2 / exact - 1));
}

TEST(IsoparametricTriangle, ReproducesALinearPotentialOnCurvedElements) {
  // Isoparametric elements contain the linear functions (the patch test, Zienkiewicz & Taylor vol. 1):
  // u = 3 r - 2 z gives E = (-3, 2) everywhere, even on curved triangles.
  const Mesh mesh = test::shell_mesh(2, 0.05, 0.2, 3, 7, BoundaryKind::Electrode);
  std::vector<double> u;
  for (const Point& p : mesh.nodes) u.push_back(3 * p.r - 2 * p.z);
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const Point E = triangle_field(mesh, t, u.data(), 0.2, 0.3);
    EXPECT_NEAR(E.r, -3.0, 1e-10);
    EXPECT_NEAR(E.z, 2.0, 1e-10);
  }
}

TEST(IsoparametricTriangle, StiffnessOfLinearPotentialIsItsFieldEnergy) {
  // u = z in a cylinder r < R, 0 < z < H with eps_r = 2: u^T K u = integral of eps_r |grad u|^2 dV
  // = 2 pi R^2 H, exactly (the integrand is linear in r).
  test::GridSpec spec;
  spec.u = test::lines(0.0, 0.3, 3);
  spec.v = test::lines(0.0, 0.5, 4);
  spec.regions = {{"oil", 2.0, false}};
  const Mesh mesh = test::grid_mesh(spec, {});
  double energy = 0;
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    double K[36], u[6];
    triangle_stiffness(mesh, t, K);
    for (int i = 0; i < 6; ++i) u[i] = mesh.nodes[static_cast<size_t>(mesh.triangle(t)[i])].z;
    for (int i = 0; i < 6; ++i)
      for (int j = 0; j < 6; ++j) energy += u[i] * K[i * 6 + j] * u[j];
  }
  EXPECT_NEAR(energy, 2 * kPi * 0.3 * 0.3 * 0.5, 1e-12);
}

}  // namespace
}  // namespace hv
