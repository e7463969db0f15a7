#include "solver/mesh_edges.h"

#include <algorithm>

namespace hv {

MeshEdges::MeshEdges(const Mesh& mesh) {
  edges_.reserve(static_cast<size_t>(mesh.n_triangles()) * 3 / 2 + 1);
  index_.reserve(edges_.capacity());
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    for (int k = 0; k < 3; ++k) {
      // Local edge k joins vertices k and k + 1, in that direction.
      const std::array<int, kMaxEdgeNodes> side = mesh.triangle_side(t, k);
      const auto [slot, is_new] = index_.try_emplace(key(side[0], side[1]), static_cast<int>(edges_.size()));
      if (is_new) {
        edges_.push_back({side, {t, -1}});
      } else {
        edges_[static_cast<size_t>(slot->second)].triangles[1] = t;
      }
    }
  }
}

int MeshEdges::find(int a, int b) const {
  const auto found = index_.find(key(a, b));
  return found == index_.end() ? -1 : found->second;
}

std::uint64_t MeshEdges::key(int a, int b) {
  return (static_cast<std::uint64_t>(std::min(a, b)) << 32) | static_cast<std::uint32_t>(std::max(a, b));
}

}  // namespace hv
