// Boundaries derived from a hand-made triangle set: classification by side, electrode and region
// pair, orientation (region on the left), and an electrode edge that replaced a dropped triangle.
#include <gtest/gtest.h>

#include "mesh/boundaries.h"
#include "test_mesh_cases.h"

namespace hv {
namespace {

using namespace hv::test;

// The unit square [0, 1] x [0, 1] as two P1 triangles, gas below the diagonal 0-3 and epoxy above.
// Node 1 at (0.5, 0) is where the mesher's zero-area triangle (0, 1, 2) was dropped: the bottom,
// an electrode surface, now runs straight from 0 to 2.
Mesh unit_square() {
  Mesh mesh;
  mesh.order = 1;
  mesh.nodes = {{0, 0}, {0.5, 0}, {1, 0}, {1, 1}, {0, 1}};
  mesh.triangles = {0, 2, 3, 0, 3, 4};
  mesh.triangle_region = {0, 1};
  mesh.regions = {{"gas", 1.0, true}, {"epoxy", 4.4, false}};
  return mesh;
}

TEST(Boundaries, EveryEdgeIsClassifiedAndOrientedWithItsRegionOnTheLeft) {
  GeometrySpec spec;
  spec.electrodes = {fixed_electrode("hv", 1.0)};
  DomainOutline domain;
  domain.open = false;
  domain.r_max = 1, domain.z_min = -1, domain.z_max = 1;  // the square's bottom is no side of the box
  domain.tolerance = 1e-9;
  const ElectrodeEdges mesher_edges{{{0, 1}, 0}, {{1, 2}, 0}};
  Mesh mesh = unit_square();
  find_boundaries(spec, domain, mesher_edges, mesh);

  const Boundary* electrode = find_boundary(mesh, BoundaryKind::Electrode, "hv");
  ASSERT_NE(electrode, nullptr);
  EXPECT_EQ(electrode->conductor, 0);
  EXPECT_EQ(electrode->region_a, 0);
  ASSERT_EQ(edge_count(*electrode), 1);
  EXPECT_EQ(electrode->contours[0][0].nodes[0], 0);  // along +r: the gas above lies on the left
  EXPECT_EQ(electrode->contours[0][0].nodes[1], 2);

  const Boundary* interface = find_boundary(mesh, BoundaryKind::Interface, "gas|epoxy");
  ASSERT_NE(interface, nullptr);
  EXPECT_EQ(interface->region_a, 0);
  EXPECT_EQ(interface->region_b, 1);
  EXPECT_EQ(interface->contours[0][0].nodes[0], 3);  // from (1, 1) to (0, 0): the gas on the left
  EXPECT_EQ(interface->contours[0][0].nodes[1], 0);

  const Boundary* axis = find_boundary(mesh, BoundaryKind::Axis, "axis");
  ASSERT_NE(axis, nullptr);
  EXPECT_EQ(axis->region_a, 1);
  EXPECT_NE(find_boundary(mesh, BoundaryKind::Symmetry, "right"), nullptr);
  EXPECT_NE(find_boundary(mesh, BoundaryKind::Symmetry, "top"), nullptr);
  EXPECT_EQ(find_boundary(mesh, BoundaryKind::Symmetry, "bottom"), nullptr);
  int edges = 0;
  for (const Boundary& b : mesh.boundaries) edges += edge_count(b);
  EXPECT_EQ(edges, 5);  // four sides and the diagonal
}

TEST(Boundaries, AnEdgeOnNoSideAndNoElectrodeIsAMesherDefect) {
  GeometrySpec spec;
  spec.electrodes = {fixed_electrode("hv", 1.0)};
  DomainOutline domain;
  domain.open = false;
  domain.r_max = 1, domain.z_min = -1, domain.z_max = 1;
  domain.tolerance = 1e-9;
  Mesh mesh = unit_square();
  EXPECT_THROW(find_boundaries(spec, domain, {}, mesh), RunError);
}

}  // namespace
}  // namespace hv
