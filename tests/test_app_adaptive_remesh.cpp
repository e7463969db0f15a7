// The adaptive loop builds a design's geometry once and remeshes it every step (Mesher, in
// mesh/meshing.h). Invariant: a remesh of the kept geometry is the very mesh a fresh build makes
// with the same sizes, whatever was meshed before it (no size field or size callback left over).
#include <gtest/gtest.h>

#include "app_fixture.h"
#include "mesh/meshing.h"

namespace hv {
namespace {

using testing::bundled_case;

GeometrySpec sphere_above_plane() { return read_case(bundled_case("sphere-above-plane.yaml")).geometry; }

// A size map over `mesh`: `near` metres at vertices below z = 60 mm (the gap), `far` elsewhere.
SizeMap graded_sizes(const Mesh& mesh, double near, double far) {
  SizeMap map;
  map.vertices = mesh.nodes;
  map.size.assign(mesh.nodes.size(), 0.0);
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* v = mesh.triangle(t);
    map.triangles.push_back({v[0], v[1], v[2]});
    for (int k = 0; k < 3; ++k) map.size[static_cast<size_t>(v[k])] = mesh.nodes[static_cast<size_t>(v[k])].z < 0.06 ? near : far;
  }
  return map;
}

void expect_same_mesh(const Mesh& a, const Mesh& b) {
  ASSERT_EQ(a.n_nodes(), b.n_nodes());
  ASSERT_EQ(a.triangles, b.triangles);
  for (int i = 0; i < a.n_nodes(); ++i) {
    EXPECT_EQ(a.nodes[static_cast<size_t>(i)].r, b.nodes[static_cast<size_t>(i)].r);
    EXPECT_EQ(a.nodes[static_cast<size_t>(i)].z, b.nodes[static_cast<size_t>(i)].z);
  }
}

TEST(Remesh, KeptGeometryMeshesLikeAFreshBuild) {
  const GeometrySpec spec = sphere_above_plane();
  const MeshResult fresh = build_mesh(spec);
  const SizeMap sizes = graded_sizes(fresh.mesh, 0.002, 0.02);
  const MeshResult fresh_adapted = build_mesh(spec, &sizes);

  Mesher mesher(spec);
  expect_same_mesh(mesher.mesh().mesh, fresh.mesh);
  const MeshResult adapted = mesher.mesh(&sizes);
  expect_same_mesh(adapted.mesh, fresh_adapted.mesh);
  EXPECT_GT(adapted.mesh.n_triangles(), fresh.mesh.n_triangles());  // the map did refine
  expect_same_mesh(mesher.mesh().mesh, fresh.mesh);                  // and left nothing behind
}

}  // namespace
}  // namespace hv
