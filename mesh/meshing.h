// From a validated design to a mesh, through the Gmsh SDK (OpenCASCADE kernel). The only code that
// includes gmsh.h lives behind this header. Gmsh is not thread-safe: call these from one thread.
#pragma once

#include <array>
#include <string>
#include <vector>

#include "mesh/geometry.h"
#include "mesh/mesh.h"

namespace hv {

struct MeshResult {
  Mesh mesh;
  MeshStats stats;
  std::vector<std::string> warnings;  // e.g. a sharp electrode corner (singular field there)
};

// Builds the geometry of `spec` and checks it: shapes clipped at r < 0, painted in order, outlines
// closed and not crossing themselves, electrodes of different potential must not touch,
// electrodes inside the domain, a ground plane must not cut an electrode, every floating electrode
// has a shape, sizes positive and their estimated triangle count within mesh.max_elements. Throws
// InputError naming the shape (or the key). Returns warnings. Writes nothing.
std::vector<std::string> check_geometry(const GeometrySpec& spec);

// Element sizes to mesh with in place of the size fields of the mesh spec: a target edge length at
// each vertex of an earlier mesh's (straight) triangles, interpolated linearly inside them, and taken
// from the nearest triangle outside them (where a curved boundary bulges past a straight side). The
// adaptive loop builds it from error indicators (tools/app/adaptive.h). Metres.
struct SizeMap {
  std::vector<Point> vertices;
  std::vector<std::array<int, 3>> triangles;  // indices into vertices
  std::vector<double> size;                   // per vertex
};

// check_geometry, then meshes with curved (or first-order) triangles and reads the mesh back:
// regions with their permittivity, boundaries classified and ordered into contours. With `sizes`,
// the elements follow that map (bounded by the largest size) instead of the surface-size fields.
MeshResult build_mesh(const GeometrySpec& spec, const SizeMap* sizes = nullptr);

}  // namespace hv
