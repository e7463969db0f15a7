// Quadrature rules, shape functions and isoparametric triangles against exact integrals and the
// defining properties of Lagrange elements.
#include <algorithm>
#include <cmath>
#include <utility>

#include <gtest/gtest.h>

#include "solver/elements.h"
#include "structured_mesh.h"

namespace hv {
namespace {

double factorial(int n) { return n <= 1 ? 1.0 : n * factorial(n - 1); }

// Error of a triangle rule on xi^a eta^b, relative to the exact integral a! b! / (a + b + 2)!
// (Zienkiewicz & Taylor, The Finite Element Method, vol. 1, area coordinates; recalled from memory).
double monomial_error(const std::vector<TrianglePoint>& rule, int a, int b) {
  double sum = 0;
  for (const TrianglePoint& q : rule) sum += q.weight * std::pow(q.xi, a) * std::pow(q.eta, b);
  const double exact = factorial(a) * factorial(b) / factorial(a + b + 2);
  return std::abs(sum / exact - 1);
}

// The largest relative error over all monomials of one degree.
double worst_error_of_degree(const std::vector<TrianglePoint>& rule, int degree) {
  double worst = 0;
  for (int a = 0; a <= degree; ++a) worst = std::max(worst, monomial_error(rule, a, degree - a));
  return worst;
}

TEST(Quadrature, DunavantRuleIntegratesDegreeFiveExactly) {
  for (int order : {1, 2}) {
    EXPECT_EQ(triangle_rule(order).size(), 7u);
    for (int degree = 0; degree <= 5; ++degree) EXPECT_LT(worst_error_of_degree(triangle_rule(order), degree), 1e-13);
    EXPECT_GT(worst_error_of_degree(triangle_rule(order), 6), 1e-4);  // and no more (Dunavant, p = 5)
  }
}

TEST(Quadrature, DunavantSixteenPointRuleIntegratesDegreeEightExactly) {
  // Dunavant (Int. J. Numer. Methods Eng. 21, 1985), p = 8: 16 points, all inside, positive weights.
  const std::vector<TrianglePoint>& rule = triangle_rule(3);
  EXPECT_EQ(rule.size(), 16u);
  for (const TrianglePoint& q : rule) {
    EXPECT_GT(q.weight, 0.0);
    EXPECT_GT(q.xi, 0.0);
    EXPECT_GT(q.eta, 0.0);
    EXPECT_LT(q.xi + q.eta, 1.0);
  }
  for (int degree = 0; degree <= 8; ++degree) EXPECT_LT(worst_error_of_degree(rule, degree), 2e-15) << degree;
  EXPECT_GT(worst_error_of_degree(rule, 9), 1e-6);  // degree 8 is its limit
}

TEST(Quadrature, GaussLegendreRulesIntegrateTheirDegreesExactly) {
  // n Gauss-Legendre points integrate t^k exactly for k <= 2n - 1 (Abramowitz & Stegun 25.4.29);
  // integral of t^k over [0, 1] = 1 / (k + 1).
  for (const auto& [order, points] : {std::pair{2, 4}, {3, 5}}) {
    const std::vector<EdgePoint>& rule = edge_rule(order);
    EXPECT_EQ(static_cast<int>(rule.size()), points);
    for (int k = 0; k <= 2 * points; ++k) {
      double sum = 0;
      for (const EdgePoint& q : rule) sum += q.weight * std::pow(q.t, k);
      if (k < 2 * points)
        EXPECT_NEAR(sum, 1.0 / (k + 1), 1e-15) << "t^" << k;
      else
        EXPECT_GT(std::abs(sum - 1.0 / (k + 1)), 1e-6) << "t^" << k;
    }
  }
}

TEST(ShapeFunctions, AreNodalAndSumToOne) {
  // A Lagrange basis is 1 at its own node, 0 at the others, and reproduces constants.
  for (int order : {1, 2, 3}) {
    const int n = (order + 1) * (order + 2) / 2;
    double N[kMaxTriangleNodes], dxi[kMaxTriangleNodes], deta[kMaxTriangleNodes];
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

// A complete cubic in (xi, eta) with its gradient, for reproduction checks.
struct Cubic {
  double value, d_xi, d_eta;
};
Cubic cubic(double x, double y) {
  return {1 - 2 * x + 3 * y + x * x - 4 * x * y + 2 * y * y + 5 * x * x * x - x * x * y + 3 * x * y * y - 7 * y * y * y,
          -2 + 2 * x - 4 * y + 15 * x * x - 2 * x * y + 3 * y * y, 3 - 4 * x + 4 * y - x * x + 6 * x * y - 21 * y * y};
}

TEST(ShapeFunctions, CubicTriangleReproducesEveryCubicWithItsGradient) {
  // A complete P3 Lagrange basis interpolates each cubic exactly (Zienkiewicz & Taylor vol. 1): the
  // interpolant through the 10 nodal values equals the cubic, and so does its gradient, everywhere.
  double nodal[kMaxTriangleNodes];
  for (int j = 0; j < kMaxTriangleNodes; ++j) {
    double xi, eta;
    triangle_node_reference(3, j, &xi, &eta);
    nodal[j] = cubic(xi, eta).value;
  }
  for (const auto& [xi, eta] : {std::pair{0.1, 0.2}, {0.7, 0.05}, {0.3, 0.6}, {0.0, 0.0}, {1.0 / 3, 1.0 / 3}}) {
    double N[kMaxTriangleNodes], dxi[kMaxTriangleNodes], deta[kMaxTriangleNodes];
    triangle_shape(3, xi, eta, N, dxi, deta);
    double u = 0, u_xi = 0, u_eta = 0;
    for (int i = 0; i < kMaxTriangleNodes; ++i) u += N[i] * nodal[i], u_xi += dxi[i] * nodal[i], u_eta += deta[i] * nodal[i];
    const Cubic exact = cubic(xi, eta);
    EXPECT_NEAR(u, exact.value, 1e-13);
    EXPECT_NEAR(u_xi, exact.d_xi, 1e-12);
    EXPECT_NEAR(u_eta, exact.d_eta, 1e-12);
  }
}

TEST(ShapeFunctions, CubicEdgeIsNodalAndReproducesCubics) {
  // Edge nodes at t = 0, 1, 1/3, 2/3 (end nodes first, as in BoundaryEdge); p(t) = 2 - t + 4 t^2 - 3 t^3.
  const double node_t[4] = {0, 1, 1.0 / 3, 2.0 / 3};
  auto p = [](double t) { return 2 - t + 4 * t * t - 3 * t * t * t; };
  auto dp = [](double t) { return -1 + 8 * t - 9 * t * t; };
  double N[kMaxEdgeNodes], dN[kMaxEdgeNodes];
  for (int j = 0; j < 4; ++j) {
    edge_shape(3, node_t[j], N, dN);
    for (int i = 0; i < 4; ++i) EXPECT_NEAR(N[i], i == j ? 1.0 : 0.0, 1e-15);
  }
  for (double t : {0.0, 0.15, 0.5, 0.8, 1.0}) {
    edge_shape(3, t, N, dN);
    double u = 0, du = 0;
    for (int i = 0; i < 4; ++i) u += N[i] * p(node_t[i]), du += dN[i] * p(node_t[i]);
    EXPECT_NEAR(u, p(t), 1e-14);
    EXPECT_NEAR(du, dp(t), 1e-13);
  }
}

TEST(ShapeFunctions, CubicTriangleRestrictedToASideIsTheCubicEdge) {
  // Along side 01 (eta = 0) the triangle's functions of that side's nodes are the edge's functions
  // (nodes 0, 1, 3, 4 of the triangle = nodes 0, 1, 2, 3 of the edge), and the others vanish.
  double N[kMaxTriangleNodes], dxi[kMaxTriangleNodes], deta[kMaxTriangleNodes], E[kMaxEdgeNodes], dE[kMaxEdgeNodes];
  for (double t : {0.2, 0.45, 0.9}) {
    triangle_shape(3, t, 0.0, N, dxi, deta);
    edge_shape(3, t, E, dE);
    const int side[4] = {0, 1, 3, 4};
    for (int i = 0; i < 4; ++i) {
      EXPECT_NEAR(N[side[i]], E[i], 1e-15);
      EXPECT_NEAR(dxi[side[i]], dE[i], 1e-14);
    }
    for (int i : {2, 5, 6, 7, 8, 9}) EXPECT_NEAR(N[i], 0.0, 1e-15);
  }
}

// Volume of revolution of a mesh: sum of integral of 2 pi r |J| over its triangles.
double revolved_volume(const Mesh& mesh) {
  double volume = 0;
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (const TrianglePoint& q : triangle_rule(mesh.order)) {
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
