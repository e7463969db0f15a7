// The edges of a mesh's triangles, each with the triangle(s) on either side. Tells what a boundary
// edge borders (which region lies beside an electrode, on which sides of an interface) and finds the
// outlines of each region.
#pragma once

#include <array>
#include <cstdint>
#include <unordered_map>
#include <vector>

#include "mesh/mesh.h"

namespace hv {

struct MeshEdge {
  std::array<int, kMaxEdgeNodes> nodes{-1, -1, -1, -1};  // as in BoundaryEdge: end vertices, then inner nodes
  std::array<int, 2> triangles{-1, -1};  // the triangles beside it; [1] is -1 on the mesh's outline
};

class MeshEdges {
 public:
  explicit MeshEdges(const Mesh& mesh);

  const std::vector<MeshEdge>& all() const { return edges_; }
  // The index of the edge between vertices a and b (either order), or -1 if no triangle has it.
  int find(int a, int b) const;

 private:
  static std::uint64_t key(int a, int b);
  std::vector<MeshEdge> edges_;
  std::unordered_map<std::uint64_t, int> index_;
};

}  // namespace hv
