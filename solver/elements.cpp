#include "solver/elements.h"

#include <algorithm>
#include <cassert>
#include <cmath>

namespace hv {

namespace {

// Dunavant (Int. J. Numer. Methods Eng. 21, 1985), rule for p = 5: a centroid point and two orbits
// of three points, given there as barycentric coordinates (a, b, b) and weights summing to 1.
// Weights here are halved so that they sum to the reference triangle's area.
const std::vector<TrianglePoint>& degree_five_rule() {
  constexpr double w0 = 0.225000000000000 / 2;
  constexpr double a1 = 0.059715871789770, b1 = 0.470142064105115, w1 = 0.132394152788506 / 2;
  constexpr double a2 = 0.797426985353087, b2 = 0.101286507323456, w2 = 0.125939180544827 / 2;
  static const std::vector<TrianglePoint> rule = {
      {1.0 / 3, 1.0 / 3, w0},
      {b1, b1, w1}, {a1, b1, w1}, {b1, a1, w1},
      {b2, b2, w2}, {a2, b2, w2}, {b2, a2, w2},
  };
  return rule;
}

// Dunavant (1985), rule for p = 8 with 16 points: the centroid, three orbits (a, b, b) and one orbit
// of six points (a, b, c). The paper gives 15 digits; these are its values refined to 20 digits by
// Newton's method on the rule's moment equations (the moments of degree <= 8 then agree to 1e-40).
const std::vector<TrianglePoint>& degree_eight_rule() {
  constexpr double w0 = 0.14431560767778716825 / 2;
  constexpr double a1 = 0.081414823414553687942, b1 = 0.45929258829272315603, w1 = 0.095091634267284624794 / 2;
  constexpr double a2 = 0.65886138449647958676, b2 = 0.17056930775176020662, w2 = 0.10321737053471825028 / 2;
  constexpr double a3 = 0.89890554336593804908, b3 = 0.050547228317030975458, w3 = 0.032458497623198080311 / 2;
  constexpr double a4 = 0.0083947774099576053372, b4 = 0.26311282963463811342, c4 = 0.72849239295540428124,
                   w4 = 0.027230314174434994265 / 2;
  static const std::vector<TrianglePoint> rule = {
      {1.0 / 3, 1.0 / 3, w0},
      {b1, b1, w1}, {a1, b1, w1}, {b1, a1, w1},
      {b2, b2, w2}, {a2, b2, w2}, {b2, a2, w2},
      {b3, b3, w3}, {a3, b3, w3}, {b3, a3, w3},
      {a4, b4, w4}, {b4, a4, w4}, {a4, c4, w4}, {c4, a4, w4}, {b4, c4, w4}, {c4, b4, w4},
  };
  return rule;
}

// Gauss-Legendre abscissae +-x and weights w on [-1, 1] (Abramowitz & Stegun, table 25.4), mapped to
// [0, 1]: t = (1 + x) / 2, weight w / 2. Four points.
const std::vector<EdgePoint>& four_point_rule() {
  constexpr double x1 = 0.339981043584856, w1 = 0.652145154862546;
  constexpr double x2 = 0.861136311594053, w2 = 0.347854845137454;
  static const std::vector<EdgePoint> rule = {
      {(1 - x2) / 2, w2 / 2}, {(1 - x1) / 2, w1 / 2}, {(1 + x1) / 2, w1 / 2}, {(1 + x2) / 2, w2 / 2},
  };
  return rule;
}

// Five points, the same way: x = 0 (w = 128/225), x = sqrt(5 -+ 2 sqrt(10/7)) / 3 with
// w = (322 +- 13 sqrt 70) / 900 (Abramowitz & Stegun, table 25.4), evaluated to 20 digits.
const std::vector<EdgePoint>& five_point_rule() {
  constexpr double x1 = 0.53846931010568309104, w1 = 0.47862867049936646804;
  constexpr double x2 = 0.90617984593866399280, w2 = 0.23692688505618908751;
  static const std::vector<EdgePoint> rule = {
      {(1 - x2) / 2, w2 / 2}, {(1 - x1) / 2, w1 / 2}, {0.5, 64.0 / 225},
      {(1 + x1) / 2, w1 / 2}, {(1 + x2) / 2, w2 / 2},
  };
  return rule;
}

}  // namespace

const std::vector<TrianglePoint>& triangle_rule(int order) { return order == 3 ? degree_eight_rule() : degree_five_rule(); }

const std::vector<EdgePoint>& edge_rule(int order) { return order == 3 ? five_point_rule() : four_point_rule(); }

TriangleSample sample_triangle(const Mesh& mesh, int triangle, double xi, double eta) {
  TriangleSample s;
  s.n = mesh.nodes_per_triangle();
  double dN_dxi[kMaxTriangleNodes], dN_deta[kMaxTriangleNodes];
  triangle_shape(mesh.order, xi, eta, s.N, dN_dxi, dN_deta);
  // Isoparametric map (r, z) = sum N_i (r_i, z_i) and its Jacobian [dr/dxi dr/deta; dz/dxi dz/deta].
  const int* node = mesh.triangle(triangle);
  double r_xi = 0, r_eta = 0, z_xi = 0, z_eta = 0;
  for (int i = 0; i < s.n; ++i) {
    const Point& p = mesh.nodes[static_cast<size_t>(node[i])];
    s.at.r += s.N[i] * p.r;
    s.at.z += s.N[i] * p.z;
    r_xi += dN_dxi[i] * p.r, r_eta += dN_deta[i] * p.r;
    z_xi += dN_dxi[i] * p.z, z_eta += dN_deta[i] * p.z;
  }
  s.detJ = r_xi * z_eta - r_eta * z_xi;
  // grad N = J^-T (dN/dxi, dN/deta).
  for (int i = 0; i < s.n; ++i) {
    s.dN_dr[i] = (z_eta * dN_dxi[i] - z_xi * dN_deta[i]) / s.detJ;
    s.dN_dz[i] = (-r_eta * dN_dxi[i] + r_xi * dN_deta[i]) / s.detJ;
  }
  return s;
}

EdgeSample sample_edge(const Mesh& mesh, const BoundaryEdge& edge, double t) {
  EdgeSample s;
  s.n = mesh.nodes_per_edge();
  edge_shape(mesh.order, t, s.N, s.dN_dt);
  double r_t = 0, z_t = 0;
  for (int i = 0; i < s.n; ++i) {
    const Point& p = mesh.nodes[static_cast<size_t>(edge.nodes[static_cast<size_t>(i)])];
    s.at.r += s.N[i] * p.r, s.at.z += s.N[i] * p.z;
    r_t += s.dN_dt[i] * p.r, z_t += s.dN_dt[i] * p.z;
  }
  s.ds_dt = std::hypot(r_t, z_t);
  s.tangent = {r_t / s.ds_dt, z_t / s.ds_dt};
  return s;
}

void triangle_stiffness(const Mesh& mesh, int triangle, double* K) {
  const int n = mesh.nodes_per_triangle();
  const double eps_r = mesh.regions[static_cast<size_t>(mesh.triangle_region[static_cast<size_t>(triangle)])].permittivity;
  std::fill(K, K + n * n, 0.0);
  for (const TrianglePoint& q : triangle_rule(mesh.order)) {
    const TriangleSample s = sample_triangle(mesh, triangle, q.xi, q.eta);
    // eps_r x (axisymmetric volume element 2 pi r |J| dxi deta).
    const double weight = eps_r * 2 * kPi * s.at.r * s.detJ * q.weight;
    for (int i = 0; i < n; ++i)
      for (int j = 0; j < n; ++j) K[i * n + j] += weight * (s.dN_dr[i] * s.dN_dr[j] + s.dN_dz[i] * s.dN_dz[j]);
  }
}

Point triangle_field(const Mesh& mesh, int triangle, const double* u_all_nodes, double xi, double eta) {
  const TriangleSample s = sample_triangle(mesh, triangle, xi, eta);
  const int* node = mesh.triangle(triangle);
  Point E;
  for (int i = 0; i < s.n; ++i) {
    const double u = u_all_nodes[node[i]];
    E.r -= u * s.dN_dr[i];
    E.z -= u * s.dN_dz[i];
  }
  return E;
}

}  // namespace hv
