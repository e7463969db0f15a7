// Isoparametric Lagrange triangles (P1: 3 nodes, P2: 6 and P3: 10 nodes on curved edges) and
// boundary edges (2, 3 or 4 nodes) of the r-z half plane, with the quadrature rules that integrate them.
// Node order follows the mesh (mesh.h): triangle vertices counter-clockwise, then the edge nodes of
// edges 01, 12, 20, then (P3) the interior node; an edge has its two end nodes, then its inner nodes
// from the first end to the second. Reference triangle: (xi, eta) with xi, eta >= 0, xi + eta <= 1;
// reference edge: t in [0, 1] from the first end node to the second, inner nodes at t = j / order.
// Source: Zienkiewicz & Taylor, The Finite Element Method, vol. 1, isoparametric elements. The shape
// functions themselves are in mesh/lagrange.h, which the mesher shares.
#pragma once

#include <vector>

#include "mesh/lagrange.h"  // triangle_shape, edge_shape, triangle_node_reference
#include "mesh/mesh.h"

namespace hv {

constexpr double kEpsilon0 = 8.8541878128e-12;  // vacuum permittivity, F/m (CODATA 2018)
constexpr double kPi = 3.14159265358979323846;

struct TrianglePoint {
  double xi = 0, eta = 0, weight = 0;  // weights sum to 1/2, the reference triangle's area
};
struct EdgePoint {
  double t = 0, weight = 0;  // weights sum to 1
};

// The triangle rule for elements of `order`, symmetric rules of Dunavant (Int. J. Numer. Methods
// Eng. 21, 1985). The axisymmetric stiffness integrand grad N_i . grad N_j r is of degree 2 order - 1
// on a straight element and rational on a curved one, so each rule keeps two degrees or more in hand:
// orders 1 and 2 take the 7-point rule of degree 5, order 3 the 16-point rule of degree 8.
const std::vector<TrianglePoint>& triangle_rule(int order);

// The Gauss-Legendre rule on [0, 1] for edges of `order`: 4 points (degree 7) for orders 1 and 2,
// 5 points (degree 9) for order 3, whose edge mass integrand N_i N_j r is of degree 7.
const std::vector<EdgePoint>& edge_rule(int order);

// One triangle of the mesh, evaluated at a reference point: the position, the Jacobian determinant
// of the isoparametric map (positive for a valid, counter-clockwise element), and the shape functions
// with their gradients in (r, z), 1/m.
struct TriangleSample {
  Point at;
  double detJ = 0.0;
  int n = 0;  // number of nodes: 3, 6 or 10
  double N[kMaxTriangleNodes] = {0};
  double dN_dr[kMaxTriangleNodes] = {0};
  double dN_dz[kMaxTriangleNodes] = {0};
};
TriangleSample sample_triangle(const Mesh& mesh, int triangle, double xi, double eta);

// One boundary edge of the mesh at parameter t in [0, 1]: position, |dx/dt| (the length element),
// the unit tangent along the edge (from its first node to its second), and the 2, 3 or 4 shape functions.
struct EdgeSample {
  Point at;
  double ds_dt = 0.0;
  Point tangent;
  int n = 0;  // 2, 3 or 4
  double N[kMaxEdgeNodes] = {0};
  double dN_dt[kMaxEdgeNodes] = {0};
};
EdgeSample sample_edge(const Mesh& mesh, const BoundaryEdge& edge, double t);

// The element stiffness matrix of one triangle for the axisymmetric Laplace operator, without eps0:
//   K_ij = integral over the triangle of eps_r grad(N_i) . grad(N_j) 2 pi r dr dz
// with eps_r of the triangle's region. `K` receives n x n values, row-major (n = 3, 6 or 10).
void triangle_stiffness(const Mesh& mesh, int triangle, double* K);

// The electric field E = -grad(u) in a triangle at a reference point, V/m, for nodal potentials u.
Point triangle_field(const Mesh& mesh, int triangle, const double* u_all_nodes, double xi, double eta);

}  // namespace hv
