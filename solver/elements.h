// Isoparametric Lagrange triangles (P1: 3 nodes, P2: 6 nodes on curved edges) and boundary edges
// (2 or 3 nodes) of the r-z half plane, with the quadrature rules that integrate them.
// Node order follows the mesh: triangle vertices counter-clockwise, then the mid nodes of edges
// 01, 12, 20; an edge has its two end nodes, then its mid node. Reference triangle: (xi, eta) with
// xi, eta >= 0, xi + eta <= 1; reference edge: t in [0, 1] from the first end node to the second.
// Source: Zienkiewicz & Taylor, The Finite Element Method, vol. 1, isoparametric elements.
#pragma once

#include <vector>

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

// Dunavant's symmetric 7-point rule, exact for polynomials of degree 5 on the triangle
// (Dunavant, Int. J. Numer. Methods Eng. 21, 1985, table for p = 5).
const std::vector<TrianglePoint>& triangle_rule();

// Gauss-Legendre rule with 4 points on [0, 1], exact for degree 7.
const std::vector<EdgePoint>& edge_rule();

// The shape functions of a P1 or P2 triangle and their derivatives on the reference triangle.
// `N`, `dN_dxi`, `dN_deta` each receive 3 (order 1) or 6 (order 2) values.
void triangle_shape(int order, double xi, double eta, double* N, double* dN_dxi, double* dN_deta);

// One triangle of the mesh, evaluated at a reference point: the position, the Jacobian determinant
// of the isoparametric map (positive for a valid, counter-clockwise element), and the shape functions
// with their gradients in (r, z), 1/m.
struct TriangleSample {
  Point at;
  double detJ = 0.0;
  int n = 0;  // number of nodes: 3 or 6
  double N[6] = {0};
  double dN_dr[6] = {0};
  double dN_dz[6] = {0};
};
TriangleSample sample_triangle(const Mesh& mesh, int triangle, double xi, double eta);

// One boundary edge of the mesh at parameter t in [0, 1]: position, |dx/dt| (the length element),
// the unit tangent along the edge (from its first node to its second), and the 2 or 3 shape functions.
struct EdgeSample {
  Point at;
  double ds_dt = 0.0;
  Point tangent;
  int n = 0;  // 2 or 3
  double N[3] = {0};
  double dN_dt[3] = {0};
};
EdgeSample sample_edge(const Mesh& mesh, const BoundaryEdge& edge, double t);

// The element stiffness matrix of one triangle for the axisymmetric Laplace operator, without eps0:
//   K_ij = integral over the triangle of eps_r grad(N_i) . grad(N_j) 2 pi r dr dz
// with eps_r of the triangle's region. `K` receives n x n values, row-major (n = 3 or 6).
void triangle_stiffness(const Mesh& mesh, int triangle, double* K);

// The electric field E = -grad(u) in a triangle at a reference point, V/m, for nodal potentials u.
Point triangle_field(const Mesh& mesh, int triangle, const double* u_all_nodes, double xi, double eta);

// Reference coordinates of the triangle's nodes (vertices, then mid nodes), for nodal evaluations.
void triangle_node_reference(int order, int local_node, double* xi, double* eta);

}  // namespace hv
