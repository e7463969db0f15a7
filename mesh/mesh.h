// The mesh of the gas and dielectric regions of the r-z half plane, as the solver needs it.
// Conductors are holes: their surfaces are boundaries. Coordinates (r, z) in metres.
#pragma once

#include <array>
#include <string>
#include <vector>

#include "mesh/base.h"

namespace hv {

// A region of one permittivity: the gas, or a dielectric of the case.
struct Region {
  std::string name;           // "gas" or the material name
  double permittivity = 1.0;  // relative
  bool is_gas = false;
};

// The most nodes a triangle (order 3: 10) and an edge (order 3: 4) of any supported order have.
constexpr int kMaxTriangleNodes = 10;
constexpr int kMaxEdgeNodes = 4;

// One boundary element: end nodes, then the edge's inner nodes (order 2: the mid node; order 3: the
// nodes at 1/3 and 2/3, in order from the first end to the second); -1 in the unused slots. Oriented
// so that consecutive edges of a contour join head to tail.
struct BoundaryEdge {
  std::array<int, kMaxEdgeNodes> nodes{-1, -1, -1, -1};
};

enum class BoundaryKind {
  Electrode,    // surface of a conductor of the case (shape or box side)
  GroundPlane,  // the implicit grounded plane
  Axis,         // r = 0: natural condition, nothing to impose
  Symmetry,     // box side with zero normal field: natural condition
  Open,         // truncating half (or quarter) circle of an open domain: far-field condition
  Interface,    // between two regions of different permittivity
};

// One named boundary: a set of contours (chains of edges ordered by arc length).
struct Boundary {
  BoundaryKind kind = BoundaryKind::Axis;
  std::string name;    // electrode name, "ground_plane", "axis", "top", "right", "bottom", "open",
                       // or "<region a>|<region b>" for an interface
  int conductor = -1;  // Electrode: index into GeometrySpec::electrodes; GroundPlane: electrodes.size()
  int region_a = -1;   // Interface: the two regions; Electrode: the region beside the surface
  int region_b = -1;
  std::vector<std::vector<BoundaryEdge>> contours;
};

// Node order of a triangle (the order Gmsh gives for its types 2, 9 and 21 and VTK takes for its
// triangle, quadratic triangle and Lagrange triangle cells):
//   0, 1, 2  the vertices, counter-clockwise;
//   order 2: 3, 4, 5  the mid nodes of edges 01, 12, 20;
//   order 3: 3, 4  on edge 01 at 1/3 and 2/3 from vertex 0; 5, 6 on edge 12 from vertex 1;
//            7, 8  on edge 20 from vertex 2; 9 the interior node.
// So side k (from vertex k to vertex k + 1) has the inner nodes 3 + (order - 1) k ... in its direction.
struct Mesh {
  int order = 2;                 // 1: 3-node triangles; 2: curved 6-node; 3: curved 10-node triangles
  std::vector<Point> nodes;
  std::vector<int> triangles;    // nodes_per_triangle() node indices per triangle, in the order above
  std::vector<int> triangle_region;
  std::vector<Region> regions;
  std::vector<Boundary> boundaries;
  double open_radius = 0.0;      // radius of the open boundary arc (0 for a box)
  Point open_center;             // its centre, on the axis

  int nodes_per_triangle() const { return (order + 1) * (order + 2) / 2; }
  int nodes_per_edge() const { return order + 1; }
  int n_triangles() const { return static_cast<int>(triangle_region.size()); }
  int n_nodes() const { return static_cast<int>(nodes.size()); }
  const int* triangle(int t) const { return &triangles[static_cast<size_t>(t) * nodes_per_triangle()]; }
  // The nodes of side k of triangle t as an edge from vertex k to vertex k + 1: end nodes, then the
  // inner nodes in that direction (as in BoundaryEdge).
  std::array<int, kMaxEdgeNodes> triangle_side(int t, int k) const {
    const int* node = triangle(t);
    std::array<int, kMaxEdgeNodes> side{node[k], node[(k + 1) % 3], -1, -1};
    for (int j = 0; j < order - 1; ++j) side[static_cast<size_t>(2 + j)] = node[3 + (order - 1) * k + j];
    return side;
  }
};

// The interior node of a curved cubic triangle from its vertices x[0..2] and edge nodes x[3..8] (node
// order above): x_9 = (1/4) (sum of the six edge nodes) - (1/6) (sum of the vertices), the value at the
// centroid of the transfinite (blending) interpolation of the three edges (Gordon & Hall, Int. J. Numer.
// Methods Eng. 7, 1973). It is exact whenever the map is quadratic, so a triangle whose edges follow a
// curve keeps the accuracy of its edges; on a straight triangle it is the centroid.
inline Point blended_interior_node(const Point* x) {
  Point edges, vertices;
  for (int i = 3; i < 9; ++i) edges.r += x[i].r, edges.z += x[i].z;
  for (int i = 0; i < 3; ++i) vertices.r += x[i].r, vertices.z += x[i].z;
  return {edges.r / 4 - vertices.r / 6, edges.z / 4 - vertices.z / 6};
}

// Figures about the mesh for the report.
struct MeshStats {
  int nodes = 0;
  int triangles = 0;
  int boundary_edges = 0;
  int dropped_degenerate = 0;  // zero-area triangles removed after meshing (see meshing.cpp)
  double min_size = 0.0;       // shortest element edge, m
  double max_size = 0.0;       // longest element edge, m
  double seconds = 0.0;
};

}  // namespace hv
