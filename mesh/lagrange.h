// The Lagrange shape functions of the isoparametric triangles (P1: 3 nodes, P2: 6, P3: 10) and of
// their edges (2, 3, 4 nodes) on the reference triangle (xi, eta >= 0, xi + eta <= 1) and the reference
// edge (t in [0, 1]), node order as in mesh.h (Zienkiewicz & Taylor, The Finite Element Method, vol. 1,
// isoparametric elements). Header-only, so the mesher (its Jacobian check) and the solver share them.
#pragma once

#include <cassert>

#include "mesh/mesh.h"

namespace hv {

namespace lagrange_detail {

// The cubic Lagrange functions in barycentric coordinates (Zienkiewicz & Taylor vol. 1, cubic
// triangle), shared by the P3 triangle and its edges: at a vertex L (3L - 1)(3L - 2) / 2; at the edge
// node one third of the way from vertex `near` to vertex `far`, (9/2) L_near L_far (3 L_near - 1).
inline double cubic_vertex(double L) { return 0.5 * L * (3 * L - 1) * (3 * L - 2); }
inline double cubic_vertex_slope(double L) { return 0.5 * (27 * L * L - 18 * L + 2); }
inline double cubic_edge(double near, double far) { return 4.5 * near * far * (3 * near - 1); }
inline double cubic_edge_by_near(double near, double far) { return 4.5 * far * (6 * near - 1); }
inline double cubic_edge_by_far(double near) { return 4.5 * near * (3 * near - 1); }

// P3 with the node order of mesh.h. Derivatives by the chain rule through the barycentric
// coordinates L0 = 1 - xi - eta, L1 = xi, L2 = eta.
inline void cubic_triangle_shape(double xi, double eta, double* N, double* dN_dxi, double* dN_deta) {
  const double L[3] = {1.0 - xi - eta, xi, eta};
  double dN_dL[kMaxTriangleNodes][3] = {};
  for (int k = 0; k < 3; ++k) {
    N[k] = cubic_vertex(L[k]);
    dN_dL[k][k] = cubic_vertex_slope(L[k]);
    // Side k from vertex k to vertex k + 1: node 3 + 2k near vertex k, node 4 + 2k near vertex k + 1.
    const int ends[2] = {k, (k + 1) % 3};
    for (int j = 0; j < 2; ++j) {
      const int near = ends[j], far = ends[1 - j], node = 3 + 2 * k + j;
      N[node] = cubic_edge(L[near], L[far]);
      dN_dL[node][near] = cubic_edge_by_near(L[near], L[far]);
      dN_dL[node][far] = cubic_edge_by_far(L[near]);
    }
  }
  N[9] = 27 * L[0] * L[1] * L[2];
  dN_dL[9][0] = 27 * L[1] * L[2], dN_dL[9][1] = 27 * L[0] * L[2], dN_dL[9][2] = 27 * L[0] * L[1];
  for (int i = 0; i < kMaxTriangleNodes; ++i) {
    dN_dxi[i] = dN_dL[i][1] - dN_dL[i][0];
    dN_deta[i] = dN_dL[i][2] - dN_dL[i][0];
  }
}

}  // namespace lagrange_detail

// The shape functions of a P1, P2 or P3 triangle and their derivatives on the reference triangle.
// `N`, `dN_dxi`, `dN_deta` each receive 3, 6 or 10 values.
inline void triangle_shape(int order, double xi, double eta, double* N, double* dN_dxi, double* dN_deta) {
  // Barycentric coordinates L0 = 1 - xi - eta, L1 = xi, L2 = eta.
  const double L0 = 1.0 - xi - eta, L1 = xi, L2 = eta;
  if (order == 1) {
    N[0] = L0, N[1] = L1, N[2] = L2;
    dN_dxi[0] = -1, dN_dxi[1] = 1, dN_dxi[2] = 0;
    dN_deta[0] = -1, dN_deta[1] = 0, dN_deta[2] = 1;
    return;
  }
  if (order == 3) {
    lagrange_detail::cubic_triangle_shape(xi, eta, N, dN_dxi, dN_deta);
    return;
  }
  assert(order == 2 && "triangles are P1, P2 or P3");
  // Vertices: L (2L - 1); mid nodes of edges 01, 12, 20: 4 La Lb.
  N[0] = L0 * (2 * L0 - 1), N[1] = L1 * (2 * L1 - 1), N[2] = L2 * (2 * L2 - 1);
  N[3] = 4 * L0 * L1, N[4] = 4 * L1 * L2, N[5] = 4 * L2 * L0;
  // dL0/dxi = -1, dL1/dxi = 1, dL2/dxi = 0; dL0/deta = -1, dL1/deta = 0, dL2/deta = 1.
  dN_dxi[0] = -(4 * L0 - 1), dN_dxi[1] = 4 * L1 - 1, dN_dxi[2] = 0;
  dN_dxi[3] = 4 * (L0 - L1), dN_dxi[4] = 4 * L2, dN_dxi[5] = -4 * L2;
  dN_deta[0] = -(4 * L0 - 1), dN_deta[1] = 0, dN_deta[2] = 4 * L2 - 1;
  dN_deta[3] = -4 * L1, dN_deta[4] = 4 * L1, dN_deta[5] = 4 * (L0 - L2);
}

// The shape functions of an edge of `order` at t and their derivatives: the triangle's functions
// along side 01 (L0 = 1 - t, L1 = t), nodes as in BoundaryEdge.
inline void edge_shape(int order, double t, double* N, double* dN_dt) {
  if (order == 1) {
    N[0] = 1 - t, N[1] = t;
    dN_dt[0] = -1, dN_dt[1] = 1;
  } else if (order == 2) {
    // End nodes at t = 0 and 1, mid node at t = 1/2.
    N[0] = (1 - t) * (1 - 2 * t), N[1] = t * (2 * t - 1), N[2] = 4 * t * (1 - t);
    dN_dt[0] = 4 * t - 3, dN_dt[1] = 4 * t - 1, dN_dt[2] = 4 - 8 * t;
  } else {
    assert(order == 3 && "edges have 2, 3 or 4 nodes");
    using namespace lagrange_detail;
    const double s = 1 - t;  // L0
    N[0] = cubic_vertex(s), N[1] = cubic_vertex(t), N[2] = cubic_edge(s, t), N[3] = cubic_edge(t, s);
    dN_dt[0] = -cubic_vertex_slope(s), dN_dt[1] = cubic_vertex_slope(t);
    dN_dt[2] = cubic_edge_by_far(s) - cubic_edge_by_near(s, t);  // node at t = 1/3: near = L0, far = L1
    dN_dt[3] = cubic_edge_by_near(t, s) - cubic_edge_by_far(t);  // node at t = 2/3: near = L1, far = L0
  }
}

// Reference coordinates of the triangle's nodes (vertices, edge nodes, interior node), for nodal
// evaluations.
inline void triangle_node_reference(int order, int local_node, double* xi, double* eta) {
  // Orders 1 and 2 share their first nodes; order 3 places its edge nodes at thirds.
  static const double quadratic[6][2] = {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}};
  static const double cubic[10][2] = {{0, 0},           {1, 0},           {0, 1},      {1. / 3, 0},
                                      {2. / 3, 0},      {2. / 3, 1. / 3}, {1. / 3, 2. / 3}, {0, 2. / 3},
                                      {0, 1. / 3},      {1. / 3, 1. / 3}};
  assert(local_node >= 0 && local_node < (order + 1) * (order + 2) / 2 && "node of the triangle");
  const double* at = order == 3 ? cubic[local_node] : quadratic[local_node];
  *xi = at[0];
  *eta = at[1];
}

}  // namespace hv
