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

// One boundary element: end nodes, then the mid node (order 2; -1 for order 1). Oriented so that
// consecutive edges of a contour join head to tail.
struct BoundaryEdge {
  std::array<int, 3> nodes{-1, -1, -1};
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

struct Mesh {
  int order = 2;                 // 1: 3-node triangles; 2: curved 6-node triangles
  std::vector<Point> nodes;
  std::vector<int> triangles;    // nodes_per_triangle() node indices per triangle: the vertices
                                 // counter-clockwise, then (order 2) the mid nodes of edges 01, 12, 20
  std::vector<int> triangle_region;
  std::vector<Region> regions;
  std::vector<Boundary> boundaries;
  double open_radius = 0.0;      // radius of the open boundary arc (0 for a box)
  Point open_center;             // its centre, on the axis

  int nodes_per_triangle() const { return order == 1 ? 3 : 6; }
  int n_triangles() const { return static_cast<int>(triangle_region.size()); }
  int n_nodes() const { return static_cast<int>(nodes.size()); }
  const int* triangle(int t) const { return &triangles[static_cast<size_t>(t) * nodes_per_triangle()]; }
};

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
