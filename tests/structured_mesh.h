// Test helper: structured P1/P2 meshes of r-z blocks without Gmsh, for checks against closed-form
// fields. A tensor grid of parameter lines (u_i, v_j) is mapped to (r, z) by `map` (identity: r = u,
// z = v; a polar map gives curved P2 elements, mid nodes on the exact curve). Each grid cell gets a
// region (or -1: a hole, e.g. a conductor) and is split into two counter-clockwise triangles.
// Boundaries are given as paths through grid corners (i, j) along grid lines, walked in order.
#pragma once

#include <algorithm>
#include <array>
#include <cmath>
#include <functional>
#include <string>
#include <utility>
#include <vector>

#include "mesh/mesh.h"

namespace hv::test {

// n equal steps from a to b: n + 1 lines.
inline std::vector<double> lines(double a, double b, int n) {
  std::vector<double> out;
  for (int i = 0; i <= n; ++i) out.push_back(a + (b - a) * i / n);
  return out;
}

// Joins line sets that share their end values: (a..c) + (c..b).
inline std::vector<double> join(std::vector<double> first, const std::vector<double>& second) {
  first.insert(first.end(), second.begin() + 1, second.end());
  return first;
}

struct GridSpec {
  int order = 2;
  std::vector<double> u, v;
  std::function<Point(double, double)> map = [](double x, double y) { return Point{x, y}; };  // (u, v) -> (r, z)
  std::function<int(int i, int j)> cell_region = [](int, int) { return 0; };  // cell [u_i, u_i+1] x [v_j, v_j+1]
  std::vector<Region> regions = {{"gas", 1.0, true}};
};

struct GridBoundary {
  BoundaryKind kind = BoundaryKind::Electrode;
  std::string name;
  int conductor = -1;
  int region_a = -1, region_b = -1;
  std::vector<std::vector<std::array<int, 2>>> paths;  // one contour per path of grid corners (i, j)
};

inline Mesh grid_mesh(const GridSpec& spec, const std::vector<GridBoundary>& boundaries) {
  const int nu = static_cast<int>(spec.u.size()) - 1, nv = static_cast<int>(spec.v.size()) - 1;
  // Nodes on the half-step grid (I, J) = (2i, 2j) for corners, odd for mid nodes; created on use.
  const int NI = 2 * nu + 1, NJ = 2 * nv + 1;
  std::vector<int> id(static_cast<size_t>(NI * NJ), -1);
  Mesh mesh;
  mesh.order = spec.order;
  mesh.regions = spec.regions;
  auto param = [](const std::vector<double>& lines_, int I) {
    return I % 2 == 0 ? lines_[static_cast<size_t>(I / 2)] : 0.5 * (lines_[static_cast<size_t>(I / 2)] + lines_[static_cast<size_t>(I / 2 + 1)]);
  };
  auto node = [&](int I, int J) {
    int& slot = id[static_cast<size_t>(J * NI + I)];
    if (slot < 0) {
      Point p = spec.map(param(spec.u, I), param(spec.v, J));
      if (std::abs(p.r) < 1e-14) p.r = 0.0;  // exactly on the axis
      slot = mesh.n_nodes();
      mesh.nodes.push_back(p);
    }
    return slot;
  };
  auto add_triangle = [&](std::array<std::array<int, 2>, 3> c, int region) {
    // Make the corners counter-clockwise in (r, z), then append vertices and mid nodes 01, 12, 20.
    const Point a = spec.map(param(spec.u, c[0][0]), param(spec.v, c[0][1]));
    const Point b = spec.map(param(spec.u, c[1][0]), param(spec.v, c[1][1]));
    const Point d = spec.map(param(spec.u, c[2][0]), param(spec.v, c[2][1]));
    if ((b.r - a.r) * (d.z - a.z) - (b.z - a.z) * (d.r - a.r) < 0) std::swap(c[1], c[2]);
    for (int k = 0; k < 3; ++k) mesh.triangles.push_back(node(c[static_cast<size_t>(k)][0], c[static_cast<size_t>(k)][1]));
    if (spec.order == 2)
      for (int k = 0; k < 3; ++k) {
        const auto& p = c[static_cast<size_t>(k)];
        const auto& q = c[static_cast<size_t>((k + 1) % 3)];
        mesh.triangles.push_back(node((p[0] + q[0]) / 2, (p[1] + q[1]) / 2));
      }
    mesh.triangle_region.push_back(region);
  };
  for (int j = 0; j < nv; ++j)
    for (int i = 0; i < nu; ++i) {
      const int region = spec.cell_region(i, j);
      if (region < 0) continue;
      const int I = 2 * i, J = 2 * j;
      add_triangle({{{I, J}, {I + 2, J}, {I + 2, J + 2}}}, region);
      add_triangle({{{I, J}, {I + 2, J + 2}, {I, J + 2}}}, region);
    }
  for (const GridBoundary& gb : boundaries) {
    Boundary b;
    b.kind = gb.kind, b.name = gb.name, b.conductor = gb.conductor, b.region_a = gb.region_a, b.region_b = gb.region_b;
    for (const auto& path : gb.paths) {
      std::vector<BoundaryEdge> contour;
      for (size_t k = 0; k + 1 < path.size(); ++k) {
        const int di = path[k + 1][0] > path[k][0] ? 1 : path[k + 1][0] < path[k][0] ? -1 : 0;
        const int dj = path[k + 1][1] > path[k][1] ? 1 : path[k + 1][1] < path[k][1] ? -1 : 0;
        for (int i = path[k][0], j = path[k][1]; i != path[k + 1][0] || j != path[k + 1][1]; i += di, j += dj) {
          BoundaryEdge e;
          e.nodes = {node(2 * i, 2 * j), node(2 * (i + di), 2 * (j + dj)), spec.order == 2 ? node(2 * i + di, 2 * j + dj) : -1,
                     -1};
          contour.push_back(e);
        }
      }
      b.contours.push_back(contour);
    }
    mesh.boundaries.push_back(b);
  }
  return mesh;
}

// Coaxial cylinders r in [a, b], z in [0, L], with `nr` x `nz` cells: inner electrode (conductor 0,
// the left side, travelled upward), outer electrode (conductor 1, the right side, upward), symmetric
// top and bottom. Regions are split at the radii in `layers` (each a grid line): region k lies
// between the k-th and (k+1)-th of a, layers..., b, with permittivity `eps[k]`.
struct CoaxSpec {
  int order = 2;
  double a = 0.01, b = 0.03, L = 0.01;
  int nr = 8, nz = 2;
  std::vector<double> layers;  // interface radii
  std::vector<double> eps = {1.0};
};

inline Mesh coax_mesh(const CoaxSpec& c) {
  GridSpec spec;
  spec.order = c.order;
  std::vector<double> radii = {c.a};
  radii.insert(radii.end(), c.layers.begin(), c.layers.end());
  radii.push_back(c.b);
  // Cells per layer proportional to its width, at least 1.
  std::vector<int> first_cell = {0};
  spec.u = {c.a};
  spec.regions.clear();
  for (size_t k = 0; k + 1 < radii.size(); ++k) {
    const int n = std::max(1, static_cast<int>(std::lround(c.nr * (radii[k + 1] - radii[k]) / (c.b - c.a))));
    spec.u = join(spec.u, lines(radii[k], radii[k + 1], n));
    first_cell.push_back(first_cell.back() + n);
    spec.regions.push_back({"layer" + std::to_string(k), c.eps[k], k == 0});
  }
  spec.v = lines(0, c.L, c.nz);
  spec.cell_region = [first_cell](int i, int) {
    int k = 0;
    while (i >= first_cell[static_cast<size_t>(k + 1)]) ++k;
    return k;
  };
  const int nu = static_cast<int>(spec.u.size()) - 1, nz = c.nz;
  const int last = static_cast<int>(radii.size()) - 2;
  std::vector<GridBoundary> bs = {
      {BoundaryKind::Electrode, "inner", 0, 0, -1, {{{0, 0}, {0, nz}}}},
      {BoundaryKind::Electrode, "outer", 1, last, -1, {{{nu, 0}, {nu, nz}}}},
      {BoundaryKind::Symmetry, "bottom", -1, -1, -1, {{{0, 0}, {nu, 0}}}},
      {BoundaryKind::Symmetry, "top", -1, -1, -1, {{{0, nz}, {nu, nz}}}},
  };
  for (size_t k = 1; k + 1 < first_cell.size(); ++k)
    bs.push_back({BoundaryKind::Interface, spec.regions[k - 1].name + "|" + spec.regions[k].name, -1,
                  static_cast<int>(k - 1), static_cast<int>(k), {{{first_cell[k], 0}, {first_cell[k], nz}}}});
  return grid_mesh(spec, bs);
}

// A spherical shell a < rho < b cut by the r-z half plane: (rho, t) -> (rho sin t, -rho cos t), t from
// 0 (bottom pole) to pi (top pole), so P2 mid nodes lie on the exact circles. Inner sphere: conductor
// 0, travelled from the bottom pole to the top; the outer circle (i = nr) is `outer` (Electrode:
// conductor 1, or Open with open_radius = b around the origin); the axis closes both ends.
inline Mesh shell_mesh(int order, double a, double b, int nr, int nt, BoundaryKind outer) {
  GridSpec spec;
  spec.order = order;
  spec.u = lines(a, b, nr);
  spec.v = lines(0, std::acos(-1.0), nt);
  spec.map = [](double rho, double t) { return Point{rho * std::sin(t), -rho * std::cos(t)}; };
  Mesh mesh = grid_mesh(spec, {
      {BoundaryKind::Electrode, "sphere", 0, 0, -1, {{{0, 0}, {0, nt}}}},
      {outer, outer == BoundaryKind::Open ? "open" : "shell", outer == BoundaryKind::Open ? -1 : 1, 0, -1, {{{nr, 0}, {nr, nt}}}},
      {BoundaryKind::Axis, "axis", -1, -1, -1, {{{0, 0}, {nr, 0}}, {{0, nt}, {nr, nt}}}},
  });
  if (outer == BoundaryKind::Open) mesh.open_radius = b;
  return mesh;
}

}  // namespace hv::test
