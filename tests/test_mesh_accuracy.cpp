// The mesher against exact geometry: areas and lengths of meshed domains, curved mid nodes on
// their circles, element sizes, scaling invariance, orientation, regions and boundaries.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "mesh/meshing.h"
#include "test_mesh_cases.h"

namespace hv {
namespace {

using namespace hv::test;

const Boundary& electrode_boundary(const Mesh& mesh, const std::string& name) {
  const Boundary* b = find_boundary(mesh, BoundaryKind::Electrode, name);
  if (b == nullptr) throw std::runtime_error("no electrode boundary " + name);
  return *b;
}

TEST(MeshArea, SphereInBoxIsBoxMinusHalfDisk) {
  const double R = 0.1;
  const MeshResult result = build_mesh(sphere_in_box(R));
  // Exact: the box 5R x 10R less the half disk pi R^2 / 2 (elementary geometry).
  const double exact = 50 * R * R - kPi * R * R / 2;
  EXPECT_NEAR(mesh_area(result.mesh), exact, 1e-6 * exact);
  EXPECT_EQ(result.stats.dropped_degenerate, 0);
  EXPECT_TRUE(result.warnings.empty());
}

TEST(CurvedEdges, MidNodesLieOnTheSphere) {
  const double R = 0.1;
  const MeshResult result = build_mesh(sphere_in_box(R));
  const Boundary& surface = electrode_boundary(result.mesh, "hv");
  ASSERT_GT(edge_count(surface), 0);
  for (const auto& contour : surface.contours)
    for (const BoundaryEdge& edge : contour)
      for (int node : edge.nodes) {
        if (node < 0) continue;  // an unused slot (order < 3)
        const Point p = result.mesh.nodes[static_cast<size_t>(node)];
        EXPECT_NEAR(std::hypot(p.r, p.z), R, 1e-9 * R);  // the sphere |x| = R
      }
}

TEST(CurvedEdges, MidNodesLieOnAnOffAxisCircle) {
  GeometrySpec spec = sphere_in_box(0.1);
  const Point c{0.25, 0.1};
  const double a = 0.05;
  spec.shapes = {electrode_shape("torus", CircleShape{c, a}, "hv")};
  const MeshResult result = build_mesh(spec);
  // Exact area: the box less the full disk pi a^2 of the torus's cross-section.
  EXPECT_NEAR(mesh_area(result.mesh), 0.5 * 1.0 - kPi * a * a, 1e-6 * 0.5);
  for (const auto& contour : electrode_boundary(result.mesh, "hv").contours)
    for (const BoundaryEdge& edge : contour) {
      const Point p = result.mesh.nodes[static_cast<size_t>(edge.nodes[2])];
      EXPECT_NEAR(std::hypot(p.r - c.r, p.z - c.z), a, 1e-9 * a);
    }
}

TEST(ElectrodeContour, SphereContourIsOneHalfCircleOfLengthPiR) {
  const double R = 0.1;
  const MeshResult result = build_mesh(sphere_in_box(R));
  const Boundary& surface = electrode_boundary(result.mesh, "hv");
  ASSERT_EQ(surface.contours.size(), 1u);
  const auto& contour = surface.contours.front();
  double length = 0;
  for (size_t i = 0; i < contour.size(); ++i) {
    length += edge_length(result.mesh, contour[i]);
    if (i > 0) {
      EXPECT_EQ(contour[i - 1].nodes[1], contour[i].nodes[0]);  // head to tail
    }
  }
  // Half the circumference of a great circle, pi R; the P2 chords deviate by O((h/R)^4).
  EXPECT_NEAR(length, kPi * R, 1e-5 * kPi * R);
  EXPECT_LT(result.mesh.nodes[static_cast<size_t>(contour.front().nodes[0])].r, 1e-12);  // from the axis
  EXPECT_LT(result.mesh.nodes[static_cast<size_t>(contour.back().nodes[1])].r, 1e-12);   // to the axis
}

TEST(SurfaceSize, DefaultGivesAtLeast24EdgesPerTurn) {
  const MeshResult result = build_mesh(sphere_in_box(0.1));
  // 24 elements per full turn = at least 12 over the half circle of the sphere's meridian.
  EXPECT_GE(edge_count(electrode_boundary(result.mesh, "hv")), 12);
}

TEST(SurfaceSize, GivenSizeIsFollowed) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.mesh.surface_size = 0.01;
  const MeshResult result = build_mesh(spec);
  // pi R / h = 31.4 edges over the half circle (within the mesher's size tolerance).
  const int edges = edge_count(electrode_boundary(result.mesh, "hv"));
  EXPECT_GE(edges, 28);
  EXPECT_LE(edges, 36);
}

// A sphere on a stem, a dielectric collar and a torus in an open domain: most features at once.
GeometrySpec busy_case() {
  GeometrySpec spec;
  spec.materials = {{"epoxy", 4.4, {}}};
  spec.electrodes = {fixed_electrode("hv", 100e3), fixed_electrode("earth", 0.0)};
  spec.shapes = {electrode_shape("stem", RectShape{0, 0.02, -0.3, 0.0, 0.005}, "hv"),
                 electrode_shape("ball", CircleShape{{0, 0.0}, 0.05}, "hv"),
                 dielectric_shape("collar", RectShape{0, 0.06, -0.2, -0.1, 0.0}, "epoxy"),
                 electrode_shape("ring", CircleShape{{0.2, -0.2}, 0.02}, "earth")};
  return spec;
}

TEST(Scaling, MeshOfAMillimetreCopyIsTheSameMeshScaled) {
  const MeshResult metres = build_mesh(busy_case());
  const MeshResult millis = build_mesh(scaled(busy_case(), 1e-3));
  ASSERT_EQ(metres.mesh.n_nodes(), millis.mesh.n_nodes());
  EXPECT_EQ(metres.mesh.triangles, millis.mesh.triangles);
  EXPECT_EQ(metres.mesh.triangle_region, millis.mesh.triangle_region);
  double worst = 0;
  for (int i = 0; i < metres.mesh.n_nodes(); ++i) {
    const Point a = metres.mesh.nodes[static_cast<size_t>(i)], b = millis.mesh.nodes[static_cast<size_t>(i)];
    worst = std::max({worst, std::abs(a.r * 1e-3 - b.r), std::abs(a.z * 1e-3 - b.z)});
  }
  EXPECT_LT(worst, 1e-14 * metres.mesh.open_radius * 1e-3);  // the same to rounding
  EXPECT_NEAR(millis.mesh.open_radius, 1e-3 * metres.mesh.open_radius, 1e-15 * metres.mesh.open_radius);
  ASSERT_EQ(metres.mesh.boundaries.size(), millis.mesh.boundaries.size());
  for (size_t b = 0; b < metres.mesh.boundaries.size(); ++b)
    EXPECT_EQ(edge_count(metres.mesh.boundaries[b]), edge_count(millis.mesh.boundaries[b]));
}

TEST(Triangles, EveryTriangleIsCounterClockwiseWithPositiveJacobian) {
  for (int order : {1, 2}) {
    GeometrySpec spec = busy_case();
    spec.mesh.order = order;
    const MeshResult result = build_mesh(spec);
    EXPECT_EQ(result.mesh.nodes_per_triangle(), order == 1 ? 3 : 6);
    EXPECT_EQ(result.stats.dropped_degenerate, 0);
    int bad = 0;
    for (int t = 0; t < result.mesh.n_triangles(); ++t)
      for (const auto& p : {std::pair{0.0, 0.0}, {1.0, 0.0}, {0.0, 1.0}, {1.0 / 3, 1.0 / 3}})
        bad += jacobian(result.mesh, t, p.first, p.second) <= 0;
    EXPECT_EQ(bad, 0);
  }
}

TEST(Regions, DielectricCarriesItsPermittivityAndInterfacesExist) {
  const MeshResult result = build_mesh(busy_case());
  const Mesh& mesh = result.mesh;
  ASSERT_EQ(mesh.regions.size(), 2u);
  EXPECT_TRUE(mesh.regions[0].is_gas);
  EXPECT_EQ(mesh.regions[1].name, "epoxy");
  EXPECT_DOUBLE_EQ(mesh.regions[1].permittivity, 4.4);
  // The collar's meshed area: its rectangle less the stem's part (the collar is painted after the
  // stem, but electrodes always win): 0.06 x 0.1 - 0.02 x 0.1.
  EXPECT_NEAR(mesh_area(mesh, 1), 0.04 * 0.1, 1e-9);
  const Boundary* interface = find_boundary(mesh, BoundaryKind::Interface, "gas|epoxy");
  ASSERT_NE(interface, nullptr);
  EXPECT_EQ(interface->region_a, 0);
  EXPECT_EQ(interface->region_b, 1);
  // The collar's free surface: top 0.04 + right 0.1 + bottom 0.04 (the axis and stem are no interface).
  double length = 0;
  for (const auto& contour : interface->contours)
    for (const BoundaryEdge& edge : contour) length += edge_length(mesh, edge);
  EXPECT_NEAR(length, 0.18, 1e-9);
  // The stem faces both the gas and the epoxy: one electrode boundary per adjacent region.
  int hv_boundaries = 0;
  for (const Boundary& b : mesh.boundaries)
    if (b.kind == BoundaryKind::Electrode && b.name == "hv") {
      ++hv_boundaries;
      EXPECT_EQ(b.conductor, 0);
    }
  EXPECT_EQ(hv_boundaries, 2);
  const Boundary& earth = electrode_boundary(mesh, "earth");
  EXPECT_EQ(earth.conductor, 1);
  EXPECT_EQ(earth.contours.size(), 1u);  // the torus's closed meridian circle
}

TEST(OpenDomain, QuarterCircleAboveTheGroundPlane) {
  GeometrySpec spec;
  spec.electrodes = {fixed_electrode("hv", 1.0)};
  spec.shapes = {electrode_shape("ball", CircleShape{{0, 0.2}, 0.05}, "hv")};
  spec.ground_plane.present = true;
  spec.ground_plane.z = 0.0;
  spec.domain.radius = 1.0;
  const MeshResult result = build_mesh(spec);
  const Mesh& mesh = result.mesh;
  EXPECT_DOUBLE_EQ(mesh.open_radius, 1.0);
  EXPECT_DOUBLE_EQ(mesh.open_center.z, 0.0);
  // Quarter disk pi/4 less the sphere's half disk pi R^2 / 2.
  EXPECT_NEAR(mesh_area(mesh), kPi / 4 - kPi * 0.05 * 0.05 / 2, 1e-6);
  const Boundary* ground = find_boundary(mesh, BoundaryKind::GroundPlane, "ground_plane");
  ASSERT_NE(ground, nullptr);
  EXPECT_EQ(ground->conductor, 1);  // electrodes.size()
  const Boundary* open = find_boundary(mesh, BoundaryKind::Open, "open");
  ASSERT_NE(open, nullptr);
  for (const auto& contour : open->contours)
    for (const BoundaryEdge& edge : contour)
      for (int node : edge.nodes) {
        if (node < 0) continue;  // an unused slot (order < 3)
        const Point p = mesh.nodes[static_cast<size_t>(node)];
        EXPECT_NEAR(std::hypot(p.r, p.z), 1.0, 1e-9);
      }
  EXPECT_NE(find_boundary(mesh, BoundaryKind::Axis, "axis"), nullptr);
}

TEST(OpenDomain, DefaultRadiusIsFiveTimesTheModelExtent) {
  GeometrySpec spec;
  spec.electrodes = {fixed_electrode("hv", 1.0)};
  spec.shapes = {electrode_shape("ball", CircleShape{{0, 0.3}, 0.1}, "hv")};
  const MeshResult result = build_mesh(spec);
  // Model box [0, 0.1] x [0.2, 0.4]: centre (0, 0.3), farthest corner at hypot(0.1, 0.1).
  EXPECT_NEAR(result.mesh.open_radius, 5 * std::hypot(0.1, 0.1), 1e-12);
  EXPECT_NEAR(result.mesh.open_center.z, 0.3, 1e-12);
}

TEST(Shapes, RoundedStemAreaIsExact) {
  GeometrySpec spec = sphere_in_box(0.1);
  const double a = 0.05, h = 0.2, rho = 0.01;
  spec.shapes = {electrode_shape("stem", RectShape{0, a, -0.1, 0.1, rho}, "hv")};
  const MeshResult result = build_mesh(spec);
  // Two corners off the axis, each rounded: the rectangle loses (1 - pi/4) rho^2 per corner.
  const double stem = a * h - 2 * (1 - kPi / 4) * rho * rho;
  EXPECT_NEAR(mesh_area(result.mesh), 0.5 - stem, 1e-6 * 0.5);
  EXPECT_TRUE(result.warnings.empty());
}

TEST(Shapes, PathArcOfPositiveRadiusBulgesLeft) {
  GeometrySpec spec = sphere_in_box(0.1);
  PathShape path;
  path.start = {0, 0.1};
  path.segments = {{PathSegment::Kind::Line, {0.05, 0.1}, 0},
                   {PathSegment::Kind::Arc, {0.05, 0.0}, 0.05},  // travelling down: left is +r
                   {PathSegment::Kind::Line, {0, 0.0}, 0}};      // ends on the axis: the axis closes it
  spec.shapes = {electrode_shape("cap", path, "hv")};
  const MeshResult result = build_mesh(spec);
  // The rectangle 0.05 x 0.1 plus the outward half disk of radius 0.05.
  const double cap = 0.05 * 0.1 + kPi * 0.05 * 0.05 / 2;
  EXPECT_NEAR(mesh_area(result.mesh), 0.5 - cap, 1e-6 * 0.5);
}

TEST(Shapes, RoundedPolygonCornerArcsAreTangent) {
  GeometrySpec spec = sphere_in_box(0.1);
  const double rho = 0.02;
  // Right triangle with legs 0.2 off the axis: three corners rounded. Each corner of interior angle
  // alpha loses rho^2 (cot(alpha/2) - (pi - alpha)/2) (area between two tangents and their arc).
  spec.shapes = {electrode_shape("wedge", PolygonShape{{{0.1, -0.1}, {0.3, -0.1}, {0.1, 0.1}}, rho}, "hv")};
  spec.domain.r_max = 0.5;
  const MeshResult result = build_mesh(spec);
  auto loss = [&](double alpha) { return rho * rho * (1 / std::tan(alpha / 2) - (kPi - alpha) / 2); };
  const double wedge = 0.02 - loss(kPi / 2) - 2 * loss(kPi / 4);
  EXPECT_NEAR(mesh_area(result.mesh), 0.5 - wedge, 1e-6 * 0.5);
}

TEST(BoxSides, ElectrodeSidesAndSymmetrySidesAreNamed) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.electrodes.push_back(fixed_electrode("earth", 0.0));
  spec.domain.top.electrode = "earth";
  const MeshResult result = build_mesh(spec);
  const Boundary& top = electrode_boundary(result.mesh, "earth");
  EXPECT_EQ(top.conductor, 1);
  double length = 0;
  for (const auto& contour : top.contours)
    for (const BoundaryEdge& edge : contour) length += edge_length(result.mesh, edge);
  EXPECT_NEAR(length, 0.5, 1e-12);  // the top side, r from 0 to r_max
  EXPECT_NE(find_boundary(result.mesh, BoundaryKind::Symmetry, "right"), nullptr);
  EXPECT_NE(find_boundary(result.mesh, BoundaryKind::Symmetry, "bottom"), nullptr);
  EXPECT_EQ(find_boundary(result.mesh, BoundaryKind::Symmetry, "top"), nullptr);
}

TEST(Warnings, SharpElectrodeCornerIsReportedOnlyWhereExposed) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.shapes = {electrode_shape("stem", RectShape{0, 0.02, -0.3, 0.0, 0.0}, "hv")};
  const std::vector<std::string> sharp = check_geometry(spec);
  ASSERT_EQ(sharp.size(), 1u);
  EXPECT_NE(sharp.front().find("stem"), std::string::npos);
  // The same stem ending inside a ball: its corners are covered and the field there is regular.
  spec.shapes = {electrode_shape("stem", RectShape{0, 0.02, -0.5, 0.0, 0.0}, "hv"),
                 electrode_shape("ball", CircleShape{{0, 0.0}, 0.05}, "hv")};
  EXPECT_TRUE(check_geometry(spec).empty());
}

}  // namespace
}  // namespace hv
