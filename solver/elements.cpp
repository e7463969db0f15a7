#include "solver/elements.h"

#include <algorithm>
#include <cassert>
#include <cmath>

namespace hv {

const std::vector<TrianglePoint>& triangle_rule() {
  // Dunavant (Int. J. Numer. Methods Eng. 21, 1985), rule for p = 5: a centroid point and two orbits
  // of three points, given there as barycentric coordinates (a, b, b) and weights summing to 1.
  // Weights here are halved so that they sum to the reference triangle's area.
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

const std::vector<EdgePoint>& edge_rule() {
  // Gauss-Legendre abscissae +-x and weights w on [-1, 1] (Abramowitz & Stegun, table 25.4),
  // mapped to [0, 1]: t = (1 + x) / 2, weight w / 2.
  constexpr double x1 = 0.339981043584856, w1 = 0.652145154862546;
  constexpr double x2 = 0.861136311594053, w2 = 0.347854845137454;
  static const std::vector<EdgePoint> rule = {
      {(1 - x2) / 2, w2 / 2}, {(1 - x1) / 2, w1 / 2}, {(1 + x1) / 2, w1 / 2}, {(1 + x2) / 2, w2 / 2},
  };
  return rule;
}

void triangle_shape(int order, double xi, double eta, double* N, double* dN_dxi, double* dN_deta) {
  // Barycentric coordinates L0 = 1 - xi - eta, L1 = xi, L2 = eta.
  const double L0 = 1.0 - xi - eta, L1 = xi, L2 = eta;
  if (order == 1) {
    N[0] = L0, N[1] = L1, N[2] = L2;
    dN_dxi[0] = -1, dN_dxi[1] = 1, dN_dxi[2] = 0;
    dN_deta[0] = -1, dN_deta[1] = 0, dN_deta[2] = 1;
    return;
  }
  assert(order == 2 && "triangles are P1 or P2");
  // Vertices: L (2L - 1); mid nodes of edges 01, 12, 20: 4 La Lb.
  N[0] = L0 * (2 * L0 - 1), N[1] = L1 * (2 * L1 - 1), N[2] = L2 * (2 * L2 - 1);
  N[3] = 4 * L0 * L1, N[4] = 4 * L1 * L2, N[5] = 4 * L2 * L0;
  // dL0/dxi = -1, dL1/dxi = 1, dL2/dxi = 0; dL0/deta = -1, dL1/deta = 0, dL2/deta = 1.
  dN_dxi[0] = -(4 * L0 - 1), dN_dxi[1] = 4 * L1 - 1, dN_dxi[2] = 0;
  dN_dxi[3] = 4 * (L0 - L1), dN_dxi[4] = 4 * L2, dN_dxi[5] = -4 * L2;
  dN_deta[0] = -(4 * L0 - 1), dN_deta[1] = 0, dN_deta[2] = 4 * L2 - 1;
  dN_deta[3] = -4 * L1, dN_deta[4] = 4 * L1, dN_deta[5] = 4 * (L0 - L2);
}

TriangleSample sample_triangle(const Mesh& mesh, int triangle, double xi, double eta) {
  TriangleSample s;
  s.n = mesh.nodes_per_triangle();
  double dN_dxi[6], dN_deta[6];
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
  if (mesh.order == 1) {
    s.n = 2;
    s.N[0] = 1 - t, s.N[1] = t;
    s.dN_dt[0] = -1, s.dN_dt[1] = 1;
  } else {
    // End nodes at t = 0 and 1, mid node at t = 1/2.
    s.n = 3;
    s.N[0] = (1 - t) * (1 - 2 * t), s.N[1] = t * (2 * t - 1), s.N[2] = 4 * t * (1 - t);
    s.dN_dt[0] = 4 * t - 3, s.dN_dt[1] = 4 * t - 1, s.dN_dt[2] = 4 - 8 * t;
  }
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
  for (const TrianglePoint& q : triangle_rule()) {
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

void triangle_node_reference(int order, int local_node, double* xi, double* eta) {
  static const double xi_of[6] = {0, 1, 0, 0.5, 0.5, 0};
  static const double eta_of[6] = {0, 0, 1, 0, 0.5, 0.5};
  assert(local_node >= 0 && local_node < (order == 1 ? 3 : 6) && "node of the triangle");
  (void)order;
  *xi = xi_of[local_node];
  *eta = eta_of[local_node];
}

}  // namespace hv
