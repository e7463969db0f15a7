#include "mesh/boundaries.h"

#include <cmath>
#include <set>
#include <tuple>

namespace hv {

bool DomainOutline::on(OuterSide side, Point p) const {
  switch (side) {
    case OuterSide::Axis:
      return std::abs(p.r) <= tolerance;
    case OuterSide::GroundPlane:
      return has_ground_plane && std::abs(p.z - ground_z) <= tolerance;
    case OuterSide::Top:
      return !open && std::abs(p.z - z_max) <= tolerance;
    case OuterSide::Right:
      return !open && std::abs(p.r - r_max) <= tolerance;
    case OuterSide::Bottom:
      return !open && !has_ground_plane && std::abs(p.z - z_min) <= tolerance;
    case OuterSide::Open:
      return open && std::abs(std::hypot(p.r - open_center.r, p.z - open_center.z) - open_radius) <= tolerance;
  }
  return false;
}

const BoxSide& DomainOutline::box_side(OuterSide side) const {
  return side == OuterSide::Top ? top : side == OuterSide::Right ? right : bottom;
}

const char* side_name(OuterSide side) {
  switch (side) {
    case OuterSide::Axis:
      return "axis";
    case OuterSide::GroundPlane:
      return "ground_plane";
    case OuterSide::Top:
      return "top";
    case OuterSide::Right:
      return "right";
    case OuterSide::Bottom:
      return "bottom";
    case OuterSide::Open:
      return "open";
  }
  return "";
}

namespace {

// One side of one triangle: its end nodes in the triangle's counter-clockwise direction, so the
// triangle lies to the left, then its inner nodes in that direction (as in BoundaryEdge).
struct DirectedEdge {
  BoundaryEdge edge;
  int triangle = -1;
  int from() const { return edge.nodes[0]; }
  int to() const { return edge.nodes[1]; }
};

// What identifies one Boundary: kind, name, conductor, and the region(s) beside it.
using BoundaryKey = std::tuple<BoundaryKind, std::string, int, int, int>;

std::map<std::pair<int, int>, std::vector<DirectedEdge>> edges_by_vertices(const Mesh& mesh) {
  std::map<std::pair<int, int>, std::vector<DirectedEdge>> edges;
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    for (int k = 0; k < 3; ++k) {
      const DirectedEdge edge{{mesh.triangle_side(t, k)}, t};
      edges[{std::min(edge.from(), edge.to()), std::max(edge.from(), edge.to())}].push_back(edge);
    }
  }
  return edges;
}

// The electrode of an edge on a conductor surface: from the mesher's own edges, else (an edge that
// replaced a dropped degenerate triangle) the electrode both its end nodes lie on.
int electrode_of(const std::pair<int, int>& vertices, const ElectrodeEdges& electrode_edges,
                 const std::map<int, std::set<int>>& node_electrodes) {
  const auto found = electrode_edges.find(vertices);
  if (found != electrode_edges.end()) return found->second;
  const auto a = node_electrodes.find(vertices.first), b = node_electrodes.find(vertices.second);
  if (a == node_electrodes.end() || b == node_electrodes.end()) return -1;
  for (int e : a->second)
    if (b->second.count(e)) return e;
  return -1;
}

BoundaryKey one_sided_key(const GeometrySpec& spec, const DomainOutline& domain, Point a, Point b, int electrode,
                          int region) {
  for (OuterSide side : {OuterSide::Axis, OuterSide::GroundPlane, OuterSide::Top, OuterSide::Right, OuterSide::Bottom,
                         OuterSide::Open}) {
    if (!domain.on(side, a) || !domain.on(side, b)) continue;
    switch (side) {
      case OuterSide::Axis:
        return {BoundaryKind::Axis, side_name(side), -1, region, -1};
      case OuterSide::Open:
        return {BoundaryKind::Open, side_name(side), -1, region, -1};
      case OuterSide::GroundPlane:
        return {BoundaryKind::GroundPlane, side_name(side), static_cast<int>(spec.electrodes.size()), region, -1};
      default: {
        const BoxSide& box_side = domain.box_side(side);
        if (box_side.is_symmetry()) return {BoundaryKind::Symmetry, side_name(side), -1, region, -1};
        int conductor = 0;
        while (spec.electrodes[static_cast<size_t>(conductor)].name != box_side.electrode) ++conductor;
        return {BoundaryKind::Electrode, box_side.electrode, conductor, region, -1};
      }
    }
  }
  if (electrode < 0) return {BoundaryKind::Interface, "", -1, -1, -1};  // nothing fits: caller fails
  return {BoundaryKind::Electrode, spec.electrodes[static_cast<size_t>(electrode)].name, electrode, region, -1};
}

// Chains edges head to tail: first the open chains from their heads, then the closed loops.
std::vector<std::vector<BoundaryEdge>> chain_into_contours(const std::vector<BoundaryEdge>& edges) {
  std::multimap<int, size_t> starting_at;
  std::set<int> ends;
  for (size_t i = 0; i < edges.size(); ++i) {
    starting_at.emplace(edges[i].nodes[0], i);
    ends.insert(edges[i].nodes[1]);
  }
  std::vector<bool> used(edges.size(), false);
  std::vector<std::vector<BoundaryEdge>> contours;
  auto follow = [&](size_t first) {
    std::vector<BoundaryEdge> contour;
    for (size_t i = first;;) {
      used[i] = true;
      contour.push_back(edges[i]);
      const auto range = starting_at.equal_range(edges[i].nodes[1]);
      auto next = range.first;
      while (next != range.second && used[next->second]) ++next;
      if (next == range.second) break;
      i = next->second;
    }
    contours.push_back(std::move(contour));
  };
  for (size_t i = 0; i < edges.size(); ++i)
    if (!used[i] && !ends.count(edges[i].nodes[0])) follow(i);
  for (size_t i = 0; i < edges.size(); ++i)
    if (!used[i]) follow(i);
  return contours;
}

}  // namespace

void find_boundaries(const GeometrySpec& spec, const DomainOutline& domain, const ElectrodeEdges& electrode_edges,
                     Mesh& mesh) {
  std::map<int, std::set<int>> node_electrodes;
  for (const auto& [vertices, electrode] : electrode_edges) {
    node_electrodes[vertices.first].insert(electrode);
    node_electrodes[vertices.second].insert(electrode);
  }

  std::map<BoundaryKey, std::vector<BoundaryEdge>> grouped;
  for (const auto& [vertices, uses] : edges_by_vertices(mesh)) {
    if (uses.size() > 2) throw RunError("mesher defect: an edge is shared by more than two triangles");
    const DirectedEdge& first = uses.front();
    const int region = mesh.triangle_region[static_cast<size_t>(first.triangle)];
    if (uses.size() == 2) {
      const int other = mesh.triangle_region[static_cast<size_t>(uses.back().triangle)];
      if (other == region) continue;                                    // inside one region
      const DirectedEdge& left = region < other ? first : uses.back();  // region_a on the left
      const int a = std::min(region, other), b = std::max(region, other);
      grouped[{BoundaryKind::Interface,
               mesh.regions[static_cast<size_t>(a)].name + "|" + mesh.regions[static_cast<size_t>(b)].name, -1, a, b}]
          .push_back(left.edge);
      continue;
    }
    const BoundaryKey key = one_sided_key(spec, domain, mesh.nodes[static_cast<size_t>(first.from())],
                                          mesh.nodes[static_cast<size_t>(first.to())],
                                          electrode_of(vertices, electrode_edges, node_electrodes), region);
    if (std::get<0>(key) == BoundaryKind::Interface) {
      const Point p = mesh.nodes[static_cast<size_t>(first.from())];
      throw RunError("mesher defect: a boundary edge at (r = " + std::to_string(p.r) +
                     " m, z = " + std::to_string(p.z) + " m) lies on no electrode and no side of the domain");
    }
    grouped[key].push_back(first.edge);
  }

  mesh.boundaries.clear();
  for (const auto& [key, edges] : grouped) {
    Boundary boundary;
    std::tie(boundary.kind, boundary.name, boundary.conductor, boundary.region_a, boundary.region_b) = key;
    boundary.contours = chain_into_contours(edges);
    mesh.boundaries.push_back(std::move(boundary));
  }
}

}  // namespace hv
