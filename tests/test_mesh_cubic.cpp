// Cubic (order 3) meshes: the blended interior node against the transfinite interpolation it comes
// from, and Gmsh's 10-node triangles read back in our node order (mesh.h), counter-clockwise, with
// their edge nodes on the true curves.
#include <algorithm>
#include <cmath>

#include <gtest/gtest.h>

#include "mesh/lagrange.h"
#include "mesh/meshing.h"
#include "test_mesh_cases.h"

namespace hv {
namespace {

using test::kPi;

double distance(Point a, Point b) { return std::hypot(a.r - b.r, a.z - b.z); }

// The nodes of a cubic triangle that are the images of the reference nodes under `map`.
template <class Map>
std::array<Point, kMaxTriangleNodes> nodes_under(Map map) {
  std::array<Point, kMaxTriangleNodes> x;
  for (int i = 0; i < kMaxTriangleNodes; ++i) {
    double xi, eta;
    triangle_node_reference(3, i, &xi, &eta);
    x[static_cast<size_t>(i)] = map(xi, eta);
  }
  return x;
}

TEST(BlendedInteriorNode, IsExactForQuadraticMaps) {
  // (1/4) sum of edge values - (1/6) sum of vertex values is the centroid value of every quadratic
  // (check on the basis: L0^2 gives 1/9 = (1/3)^2, L0 L1 gives 1/9), so a triangle whose map is
  // quadratic gets its interior node where that map puts the centroid.
  auto map = [](double xi, double eta) {
    return Point{0.3 + xi + 0.2 * eta + 0.4 * xi * xi - 0.3 * xi * eta, -0.1 + 0.1 * xi + 0.9 * eta + 0.25 * eta * eta};
  };
  const auto x = nodes_under(map);
  const Point blended = blended_interior_node(x.data()), exact = map(1.0 / 3, 1.0 / 3);
  EXPECT_NEAR(blended.r, exact.r, 1e-15);
  EXPECT_NEAR(blended.z, exact.z, 1e-15);
}

TEST(BlendedInteriorNode, IsTheTransfiniteBlendOfACircularEdgeAtTheCentroid) {
  // A triangle with side 01 on the unit circle (nodes at 0, 1/3, 2/3, 1 of a 40 degree arc) and straight
  // sides 12, 20. The transfinite interpolation of its sides (Gordon & Hall, Int. J. Numer. Methods Eng.
  // 7, 1973; in the triangle form of Szabo & Babuska, Finite Element Analysis, 1991, sec. 6.4):
  //   x(L) = sum_i L_i v_i + sum_k L_k L_k+1 / (t_k (1 - t_k)) d_k(t_k),  t_k = L_k+1 / (L_k + L_k+1),
  // d_k the side's departure from its chord. At the centroid t_k = 1/2 and the factor is 4/9; only
  // side 01 departs, by its cubic interpolant at t = 1/2 minus the chord's midpoint.
  const double arc = 40 * kPi / 180;
  auto on_circle = [&](double t) { return Point{std::cos(arc * t), std::sin(arc * t)}; };
  const Point v0 = on_circle(0), v1 = on_circle(1), v2{0.2, 0.3};
  std::array<Point, kMaxTriangleNodes> x;
  x[0] = v0, x[1] = v1, x[2] = v2, x[3] = on_circle(1.0 / 3), x[4] = on_circle(2.0 / 3);
  auto between = [](Point a, Point b, double t) { return Point{a.r + t * (b.r - a.r), a.z + t * (b.z - a.z)}; };
  x[5] = between(v1, v2, 1.0 / 3), x[6] = between(v1, v2, 2.0 / 3);
  x[7] = between(v2, v0, 1.0 / 3), x[8] = between(v2, v0, 2.0 / 3);

  double N[kMaxEdgeNodes], dN[kMaxEdgeNodes];
  edge_shape(3, 0.5, N, dN);
  const Point side_nodes[4] = {x[0], x[1], x[3], x[4]};
  Point middle;
  for (int i = 0; i < 4; ++i) middle.r += N[i] * side_nodes[i].r, middle.z += N[i] * side_nodes[i].z;
  const Point departure{middle.r - (v0.r + v1.r) / 2, middle.z - (v0.z + v1.z) / 2};
  const Point blend{(v0.r + v1.r + v2.r) / 3 + 4.0 / 9 * departure.r, (v0.z + v1.z + v2.z) / 3 + 4.0 / 9 * departure.z};

  const Point placed = blended_interior_node(x.data());
  EXPECT_NEAR(placed.r, blend.r, 1e-15);
  EXPECT_NEAR(placed.z, blend.z, 1e-15);
  EXPECT_GT(distance(placed, {(v0.r + v1.r + v2.r) / 3, (v0.z + v1.z + v2.z) / 3}), 1e-3);  // not the centroid
}

TEST(BlendedInteriorNode, IsTheCentroidOfAStraightTriangle) {
  const auto x = nodes_under([](double xi, double eta) { return Point{1 + 2 * xi - eta, 3 * eta + 0.5 * xi}; });
  const Point c = blended_interior_node(x.data());
  EXPECT_NEAR(c.r, (x[0].r + x[1].r + x[2].r) / 3, 1e-15);
  EXPECT_NEAR(c.z, (x[0].z + x[1].z + x[2].z) / 3, 1e-15);
}

// Determinant of the Jacobian of a mesh triangle's map at (xi, eta).
double jacobian_at(const Mesh& mesh, int t, double xi, double eta) {
  double N[kMaxTriangleNodes], d_xi[kMaxTriangleNodes], d_eta[kMaxTriangleNodes];
  triangle_shape(mesh.order, xi, eta, N, d_xi, d_eta);
  double r_xi = 0, r_eta = 0, z_xi = 0, z_eta = 0;
  for (int i = 0; i < mesh.nodes_per_triangle(); ++i) {
    const Point& x = mesh.nodes[static_cast<size_t>(mesh.triangle(t)[i])];
    r_xi += d_xi[i] * x.r, z_xi += d_xi[i] * x.z, r_eta += d_eta[i] * x.r, z_eta += d_eta[i] * x.z;
  }
  return r_xi * z_eta - r_eta * z_xi;
}

class CubicSphereMesh : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    GeometrySpec spec = test::sphere_in_box(kRadius);
    spec.mesh.order = 3;
    result_ = new MeshResult(build_mesh(spec));
  }
  static void TearDownTestSuite() { delete result_; }
  static constexpr double kRadius = 0.05;
  static const Mesh& mesh() { return result_->mesh; }
  static MeshResult* result_;
};
MeshResult* CubicSphereMesh::result_ = nullptr;

TEST_F(CubicSphereMesh, TrianglesHaveTenNodesInOurOrderAndPositiveJacobians) {
  ASSERT_EQ(mesh().order, 3);
  ASSERT_EQ(mesh().nodes_per_triangle(), 10);
  int curved = 0;
  for (int t = 0; t < mesh().n_triangles(); ++t) {
    const int* node = mesh().triangle(t);
    Point x[kMaxTriangleNodes];
    for (int i = 0; i < kMaxTriangleNodes; ++i) x[i] = mesh().nodes[static_cast<size_t>(node[i])];
    for (int k = 0; k < 3; ++k) {  // side k's inner nodes lie a third and two thirds of the way along it
      const Point a = x[k], b = x[(k + 1) % 3];
      const double length = distance(a, b);
      EXPECT_NEAR(distance(a, x[3 + 2 * k]) / length, 1.0 / 3, 0.02) << "triangle " << t << " side " << k;
      EXPECT_NEAR(distance(a, x[4 + 2 * k]) / length, 2.0 / 3, 0.02) << "triangle " << t << " side " << k;
    }
    const Point blended = blended_interior_node(x);
    EXPECT_EQ(x[9].r, blended.r);
    EXPECT_EQ(x[9].z, blended.z);
    curved += distance(x[9], {(x[0].r + x[1].r + x[2].r) / 3, (x[0].z + x[1].z + x[2].z) / 3}) > 1e-9;
    for (int i = 0; i < kMaxTriangleNodes; ++i) {
      double xi, eta;
      triangle_node_reference(3, i, &xi, &eta);
      EXPECT_GT(jacobian_at(mesh(), t, xi, eta), 0.0) << "triangle " << t << " node " << i;
    }
  }
  EXPECT_GT(curved, 20);  // the triangles along the sphere
}

TEST_F(CubicSphereMesh, ElectrodeEdgesHaveFourNodesOnTheSphereFromFirstEndToSecond) {
  int edges = 0;
  for (const Boundary& boundary : mesh().boundaries) {
    if (boundary.kind != BoundaryKind::Electrode) continue;
    for (const auto& contour : boundary.contours)
      for (const BoundaryEdge& edge : contour) {
        ++edges;
        const Point a = mesh().nodes[static_cast<size_t>(edge.nodes[0])], b = mesh().nodes[static_cast<size_t>(edge.nodes[1])];
        for (int i = 0; i < kMaxEdgeNodes; ++i) {
          ASSERT_GE(edge.nodes[static_cast<size_t>(i)], 0);
          const Point p = mesh().nodes[static_cast<size_t>(edge.nodes[static_cast<size_t>(i)])];
          EXPECT_NEAR(std::hypot(p.r, p.z), kRadius, 1e-9 * kRadius);  // on the true circle (OCC's precision)
        }
        const Point p = mesh().nodes[static_cast<size_t>(edge.nodes[2])], q = mesh().nodes[static_cast<size_t>(edge.nodes[3])];
        EXPECT_LT(distance(a, p), distance(a, q));
        EXPECT_LT(distance(q, b), distance(p, b));
      }
  }
  EXPECT_GE(edges, 30);  // at least 60 per turn (mesh.surface_size default), half a turn here
}

TEST_F(CubicSphereMesh, AreaIsTheBoxLessTheHalfDisc) {
  // The box [0, 5R] x [-5R, 5R] less the half disc of radius R: 50 R^2 - pi R^2 / 2. The cubic sides
  // follow the circle closely (measured: 1.2e-9 relative; the same mesh with P2 sides: 8.1e-9). det J of
  // a cubic map has degree 4: Dunavant's 6-point rule of degree 4 (Int. J. Numer. Methods Eng. 21, 1985,
  // p = 4; values recalled from memory) integrates it exactly.
  struct Orbit {
    double a, b, weight;  // barycentric (a, b, b) and its permutations; weights sum to 1
  };
  const Orbit orbits[2] = {{0.108103018168070, 0.445948490915965, 0.223381589678011},
                           {0.816847572980459, 0.091576213509771, 0.109951743655322}};
  double area = 0;
  for (int t = 0; t < mesh().n_triangles(); ++t)
    for (const Orbit& o : orbits)
      area += 0.5 * o.weight * (jacobian_at(mesh(), t, o.b, o.b) + jacobian_at(mesh(), t, o.a, o.b) + jacobian_at(mesh(), t, o.b, o.a));
  const double R = kRadius, exact = 50 * R * R - kPi * R * R / 2;
  EXPECT_NEAR(area, exact, 1e-8 * exact);
}

}  // namespace
}  // namespace hv
