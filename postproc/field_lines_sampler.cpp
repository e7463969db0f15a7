// FieldSampler: point location in a mesh of curved (isoparametric P2) or straight triangles, and the
// finite-element field at any point.
//
// A query walks from the hint through neighbouring triangles over their straight chords (Devillers,
// Pion & Teillaud, Int. J. Found. Comput. Sci. 13, 2002), then settles on the curved triangle by the
// inverse isoparametric map (Newton's method): a point between a chord and its curved edge belongs to
// the neighbour across that edge, or to no triangle at all. When the walk fails (no hint, or a hole
// lies between the hint and the point) a uniform grid of triangle bounding boxes, built once, answers.
// All query state is local, so concurrent queries are safe.
#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <cstdint>
#include <memory>

#include "postproc/field_lines.h"
#include "solver/elements.h"
#include "solver/mesh_edges.h"

namespace hv {
namespace {

// A point belongs to a triangle when its reference coordinates lie in the reference triangle up to this
// margin: it admits points on shared edges and on the mesh boundary despite rounding.
constexpr double kInsideMargin = 1e-10;
// Newton's method stops when the reference coordinates move less than this; gives up after
// kNewtonIterations or when they run further than kFarAway from the element (no continuation there).
constexpr double kNewtonTolerance = 1e-13;
constexpr int kNewtonIterations = 20;
constexpr double kFarAway = 4.0;
// Curved triangles visited after the straight walk before the grid is asked instead.
constexpr int kCurvedSteps = 4;

struct Box {
  double r0 = INFINITY, r1 = -INFINITY, z0 = INFINITY, z1 = -INFINITY;
  void add(Point p) {
    r0 = std::min(r0, p.r), r1 = std::max(r1, p.r);
    z0 = std::min(z0, p.z), z1 = std::max(z1, p.z);
  }
  void grow(double margin) { r0 -= margin, r1 += margin, z0 -= margin, z1 += margin; }
  bool holds(Point p) const { return p.r >= r0 && p.r <= r1 && p.z >= z0 && p.z <= z1; }
};

// How far the reference point (xi, eta) lies beyond each local edge k (from vertex k to k + 1):
// edge 0 is eta = 0, edge 1 is xi + eta = 1, edge 2 is xi = 0. All negative inside.
std::array<double, 3> edge_excess(double xi, double eta) { return {-eta, xi + eta - 1.0, -xi}; }

int most_exceeded_edge(const std::array<double, 3>& excess) {
  return static_cast<int>(std::max_element(excess.begin(), excess.end()) - excess.begin());
}

bool holds_reference(double xi, double eta) {
  const auto excess = edge_excess(xi, eta);
  return excess[static_cast<size_t>(most_exceeded_edge(excess))] <= kInsideMargin;
}

// Twice the signed area of (a, b, p): positive when p lies to the left of a -> b.
double orientation(Point a, Point b, Point p) { return (b.r - a.r) * (p.z - a.z) - (b.z - a.z) * (p.r - a.r); }

const Point& vertex(const Mesh& mesh, int triangle, int k) {
  return mesh.nodes[static_cast<size_t>(mesh.triangle(triangle)[k % 3])];
}

bool is_gas(const Mesh& mesh, int triangle) {
  return mesh.regions[static_cast<size_t>(mesh.triangle_region[static_cast<size_t>(triangle)])].is_gas;
}

// The reference coordinates of p in a triangle: the inverse of its isoparametric map, by Newton's method
// from the affine map of the vertices (exact for P1 and straight P2 triangles: `affine`). p may lie
// outside the triangle, where the map is continued. Positions are taken relative to vertex 0 so that
// rounding stays relative to the element.
bool to_reference(const Mesh& mesh, int triangle, bool affine, Point p, double& xi, double& eta) {
  const int n = mesh.nodes_per_triangle();
  const Point& origin = vertex(mesh, triangle, 0);
  Point local[kMaxTriangleNodes];
  for (int i = 0; i < n; ++i) {
    const Point& node = mesh.nodes[static_cast<size_t>(mesh.triangle(triangle)[i])];
    local[i] = {node.r - origin.r, node.z - origin.z};
  }
  const Point target{p.r - origin.r, p.z - origin.z};
  // Affine guess: target = xi (v1 - v0) + eta (v2 - v0).
  const double det = local[1].r * local[2].z - local[2].r * local[1].z;
  if (!(det > 0)) return false;  // a degenerate or inverted element
  xi = (local[2].z * target.r - local[2].r * target.z) / det;
  eta = (-local[1].z * target.r + local[1].r * target.z) / det;
  if (affine) return true;
  for (int iteration = 0; iteration < kNewtonIterations; ++iteration) {
    double N[kMaxTriangleNodes], dN_dxi[kMaxTriangleNodes], dN_deta[kMaxTriangleNodes];
    triangle_shape(mesh.order, xi, eta, N, dN_dxi, dN_deta);
    double r = 0, z = 0, r_xi = 0, r_eta = 0, z_xi = 0, z_eta = 0;
    for (int i = 0; i < n; ++i) {
      r += N[i] * local[i].r, z += N[i] * local[i].z;
      r_xi += dN_dxi[i] * local[i].r, r_eta += dN_deta[i] * local[i].r;
      z_xi += dN_dxi[i] * local[i].z, z_eta += dN_deta[i] * local[i].z;
    }
    const double J = r_xi * z_eta - r_eta * z_xi;
    if (!(J > 0)) return false;  // the continued map folds over here
    const double dr = target.r - r, dz = target.z - z;
    const double dxi = (z_eta * dr - r_eta * dz) / J;
    const double deta = (-z_xi * dr + r_xi * dz) / J;
    xi += dxi, eta += deta;
    if (std::abs(dxi) + std::abs(deta) < kNewtonTolerance) return true;
    if (std::abs(xi) + std::abs(eta) > kFarAway) return false;
  }
  return false;
}

// A P1 triangle, or a P2 or P3 one whose other nodes lie where the affine map of its vertices puts
// them (to rounding): its isoparametric map is affine. Most triangles of a mesh are; only those on
// curved boundaries bend.
bool has_affine_map(const Mesh& mesh, int triangle) {
  const Point& origin = vertex(mesh, triangle, 0);
  const Point& v1 = vertex(mesh, triangle, 1);
  const Point& v2 = vertex(mesh, triangle, 2);
  const double size = std::hypot(v1.r - origin.r, v1.z - origin.z) + std::hypot(v2.r - origin.r, v2.z - origin.z);
  for (int i = 3; i < mesh.nodes_per_triangle(); ++i) {
    double xi, eta;
    triangle_node_reference(mesh.order, i, &xi, &eta);
    const Point& m = mesh.nodes[static_cast<size_t>(mesh.triangle(triangle)[i])];
    const double r = origin.r + xi * (v1.r - origin.r) + eta * (v2.r - origin.r);
    const double z = origin.z + xi * (v1.z - origin.z) + eta * (v2.z - origin.z);
    if (std::abs(m.r - r) + std::abs(m.z - z) > 1e-13 * size) return false;
  }
  return true;
}

// A box around a triangle. A P2 or P3 triangle is a Bezier triangle of its degree, which lies in the
// convex hull of its control points (Farin, Curves and Surfaces for CAGD, Bezier triangles), hence in
// their box. The control points are the vertices and, from the Lagrange nodes: per P2 edge (mid node m,
// ends a, b) 2 m - (a + b) / 2; per P3 edge (nodes p, q at 1/3 and 2/3) (18 p - 9 q - 5 a + 2 b) / 6 and
// (2 a - 9 p + 18 q - 5 b) / 6; for the P3 interior node x, (9/2) x - (sum of vertices) / 6 - (sum of
// edge control points) / 2 (the Bernstein polynomials at the centroid weigh them 1/27, 1/9 and 2/9).
Box triangle_box(const Mesh& mesh, int triangle) {
  Box box;
  const int* node = mesh.triangle(triangle);
  auto at = [&](int i) { return mesh.nodes[static_cast<size_t>(node[i])]; };
  Point vertices, edge_controls;
  for (int k = 0; k < 3; ++k) {
    const Point a = at(k), b = at((k + 1) % 3);
    box.add(a);
    vertices.r += a.r, vertices.z += a.z;
    if (mesh.order == 2) box.add({2 * at(3 + k).r - (a.r + b.r) / 2, 2 * at(3 + k).z - (a.z + b.z) / 2});
    if (mesh.order != 3) continue;
    const Point p = at(3 + 2 * k), q = at(4 + 2 * k);
    const Point c1{(18 * p.r - 9 * q.r - 5 * a.r + 2 * b.r) / 6, (18 * p.z - 9 * q.z - 5 * a.z + 2 * b.z) / 6};
    const Point c2{(2 * a.r - 9 * p.r + 18 * q.r - 5 * b.r) / 6, (2 * a.z - 9 * p.z + 18 * q.z - 5 * b.z) / 6};
    box.add(c1), box.add(c2);
    edge_controls.r += c1.r + c2.r, edge_controls.z += c1.z + c2.z;
  }
  if (mesh.order == 3)
    box.add({4.5 * at(9).r - vertices.r / 6 - edge_controls.r / 2, 4.5 * at(9).z - vertices.z / 6 - edge_controls.z / 2});
  return box;
}

}  // namespace

struct FieldSampler::Index {
  explicit Index(const Mesh& mesh);

  int walk_chords(const Mesh& mesh, Point p, int start) const;
  bool settle_on_curved(const Mesh& mesh, Point p, int start, int& triangle, double& xi, double& eta) const;
  bool search_grid(const Mesh& mesh, Point p, int& triangle, double& xi, double& eta) const;

  std::vector<std::array<int, 3>> neighbour;  // the triangle across local edge k; -1 on the mesh outline
  std::vector<std::array<int, 3>> boundary;   // the mesh.boundaries entry holding local edge k, or -1
  std::vector<double> element_size;           // shortest straight edge, m
  std::vector<char> affine;                   // has_affine_map, per triangle
  std::vector<Box> boxes;                     // per triangle, grown by a rounding margin
  Box domain;
  int max_walk = 0;                           // straight-walk steps before the grid is asked

  // Uniform grid over the domain's box; cell (i, j) lists the triangles whose boxes overlap it, in
  // cell_triangles[cell_start[c] .. cell_start[c + 1]) with c = j * cells_r + i.
  int cells_r = 1, cells_z = 1;
  double cell_width = 1, cell_height = 1;
  std::vector<int> cell_start, cell_triangles;

  int cell_r(double r) const { return std::clamp(static_cast<int>((r - domain.r0) / cell_width), 0, cells_r - 1); }
  int cell_z(double z) const { return std::clamp(static_cast<int>((z - domain.z0) / cell_height), 0, cells_z - 1); }
};

FieldSampler::Index::Index(const Mesh& mesh) {
  const int n = mesh.n_triangles();
  const MeshEdges edges(mesh);
  std::vector<int> edge_boundary(edges.all().size(), -1);
  for (size_t b = 0; b < mesh.boundaries.size(); ++b)
    for (const auto& contour : mesh.boundaries[b].contours)
      for (const BoundaryEdge& e : contour) {
        const int id = edges.find(e.nodes[0], e.nodes[1]);
        if (id >= 0) edge_boundary[static_cast<size_t>(id)] = static_cast<int>(b);
      }
  neighbour.resize(static_cast<size_t>(n));
  boundary.resize(static_cast<size_t>(n));
  element_size.resize(static_cast<size_t>(n));
  affine.resize(static_cast<size_t>(n));
  boxes.resize(static_cast<size_t>(n));
  for (const Point& p : mesh.nodes) domain.add(p);
  const double rounding = 1e-9 * std::hypot(domain.r1 - domain.r0, domain.z1 - domain.z0);
  for (int t = 0; t < n; ++t) {
    const size_t ts = static_cast<size_t>(t);
    element_size[ts] = INFINITY;
    for (int k = 0; k < 3; ++k) {
      const Point& a = vertex(mesh, t, k);
      const Point& b = vertex(mesh, t, k + 1);
      const int id = edges.find(mesh.triangle(t)[k], mesh.triangle(t)[(k + 1) % 3]);
      const MeshEdge& edge = edges.all()[static_cast<size_t>(id)];
      neighbour[ts][static_cast<size_t>(k)] = edge.triangles[0] == t ? edge.triangles[1] : edge.triangles[0];
      boundary[ts][static_cast<size_t>(k)] = edge_boundary[static_cast<size_t>(id)];
      element_size[ts] = std::min(element_size[ts], std::hypot(b.r - a.r, b.z - a.z));
    }
    affine[ts] = has_affine_map(mesh, t);
    boxes[ts] = triangle_box(mesh, t);
    boxes[ts].grow(rounding);
    domain.r0 = std::min(domain.r0, boxes[ts].r0), domain.r1 = std::max(domain.r1, boxes[ts].r1);
    domain.z0 = std::min(domain.z0, boxes[ts].z0), domain.z1 = std::max(domain.z1, boxes[ts].z1);
  }
  max_walk = 16 + 4 * static_cast<int>(std::sqrt(static_cast<double>(n)));

  // About one cell per triangle, square cells.
  const double width = domain.r1 - domain.r0, height = domain.z1 - domain.z0;
  const double side = std::sqrt(width * height / std::max(n, 1));
  cells_r = std::clamp(static_cast<int>(std::ceil(width / side)), 1, 4096);
  cells_z = std::clamp(static_cast<int>(std::ceil(height / side)), 1, 4096);
  cell_width = width / cells_r, cell_height = height / cells_z;
  cell_start.assign(static_cast<size_t>(cells_r * cells_z) + 1, 0);
  auto for_each_cell = [&](const Box& box, auto&& visit) {
    for (int j = cell_z(box.z0); j <= cell_z(box.z1); ++j)
      for (int i = cell_r(box.r0); i <= cell_r(box.r1); ++i) visit(j * cells_r + i);
  };
  for (const Box& box : boxes) for_each_cell(box, [&](int c) { ++cell_start[static_cast<size_t>(c) + 1]; });
  for (size_t c = 1; c < cell_start.size(); ++c) cell_start[c] += cell_start[c - 1];
  cell_triangles.resize(static_cast<size_t>(cell_start.back()));
  std::vector<int> filled(cell_start.begin(), cell_start.end() - 1);
  for (int t = 0; t < n; ++t)
    for_each_cell(boxes[static_cast<size_t>(t)], [&](int c) { cell_triangles[static_cast<size_t>(filled[static_cast<size_t>(c)]++)] = t; });
}

// The "remembering stochastic walk" of Devillers, Pion & Teillaud over the straight (chord) triangles:
// from each triangle cross an edge that has p strictly on its far side, never the edge just crossed,
// testing the edges from a randomly chosen one (which rules out endless cycles). Returns the chord
// triangle holding p, the triangle whose outline edge p lies beyond, or -1 when the walk runs too long.
int FieldSampler::Index::walk_chords(const Mesh& mesh, Point p, int start) const {
  std::uint32_t random = 2463534242u;  // per-query state: a linear congruential generator (Knuth, TAOCP 2)
  int t = start, came_from = -1;
  for (int step = 0; step < max_walk; ++step) {
    random = random * 1664525u + 1013904223u;
    const int first = static_cast<int>((random >> 16) % 3);
    int exit_edge = -1;
    for (int i = 0; i < 3 && exit_edge < 0; ++i) {
      const int k = (first + i) % 3;
      const int across = neighbour[static_cast<size_t>(t)][static_cast<size_t>(k)];
      if (came_from >= 0 && across == came_from) continue;
      if (orientation(vertex(mesh, t, k), vertex(mesh, t, k + 1), p) < 0) exit_edge = k;
    }
    if (exit_edge < 0) return t;  // p lies in this chord triangle
    const int across = neighbour[static_cast<size_t>(t)][static_cast<size_t>(exit_edge)];
    if (across < 0) return t;     // p lies beyond the mesh's outline here
    came_from = t;
    t = across;
  }
  return -1;
}

// From the chord triangle found by the walk to the curved triangle holding p: the reference
// coordinates tell across which edge p lies, and a few steps across such edges settle it.
bool FieldSampler::Index::settle_on_curved(const Mesh& mesh, Point p, int start, int& triangle, double& xi,
                                           double& eta) const {
  int t = start, came_from = -1;
  for (int step = 0; step < kCurvedSteps; ++step) {
    if (!to_reference(mesh, t, affine[static_cast<size_t>(t)], p, xi, eta)) return false;
    const auto excess = edge_excess(xi, eta);
    const int k = most_exceeded_edge(excess);
    if (excess[static_cast<size_t>(k)] <= kInsideMargin) {
      triangle = t;
      return true;
    }
    const int across = neighbour[static_cast<size_t>(t)][static_cast<size_t>(k)];
    if (across < 0 || across == came_from) return false;
    came_from = t;
    t = across;
  }
  return false;
}

bool FieldSampler::Index::search_grid(const Mesh& mesh, Point p, int& triangle, double& xi, double& eta) const {
  if (!domain.holds(p)) return false;
  const int c = cell_z(p.z) * cells_r + cell_r(p.r);
  for (int i = cell_start[static_cast<size_t>(c)]; i < cell_start[static_cast<size_t>(c) + 1]; ++i) {
    const int t = cell_triangles[static_cast<size_t>(i)];
    if (boxes[static_cast<size_t>(t)].holds(p) && to_reference(mesh, t, affine[static_cast<size_t>(t)], p, xi, eta) &&
        holds_reference(xi, eta)) {
      triangle = t;
      return true;
    }
  }
  return false;
}

FieldSampler::FieldSampler(const Mesh& mesh, const Eigen::VectorXd& potential)
    : mesh_(mesh), potential_(potential), index_(std::make_unique<const Index>(mesh)) {
  assert(potential.size() == mesh.n_nodes() && "one potential per mesh node");
}

FieldSampler::~FieldSampler() = default;  // here, where Index is complete

bool FieldSampler::locate(Point p, int hint, int& triangle, double& xi, double& eta) const {
  if (!(p.r >= 0.0) || !std::isfinite(p.r) || !std::isfinite(p.z)) return false;  // the half plane r >= 0
  if (hint >= 0 && hint < mesh_.n_triangles()) {
    const int t = index_->walk_chords(mesh_, p, hint);
    if (t >= 0 && index_->settle_on_curved(mesh_, p, t, triangle, xi, eta)) return true;
  }
  return index_->search_grid(mesh_, p, triangle, xi, eta);
}

bool FieldSampler::field(Point p, int& triangle, Point& E) const {
  int found = -1;
  double xi = 0, eta = 0;
  if (!locate(p, triangle, found, xi, eta)) return false;
  triangle = found;
  E = triangle_field(mesh_, found, potential_.data(), xi, eta);
  return true;
}

bool FieldSampler::field_continued(int triangle, Point p, Point& E) const {
  double xi = 0, eta = 0;
  if (!to_reference(mesh_, triangle, index_->affine[static_cast<size_t>(triangle)], p, xi, eta)) return false;
  E = triangle_field(mesh_, triangle, potential_.data(), xi, eta);
  return true;
}

FieldSampler::Border FieldSampler::border_crossed(int triangle, Point outside) const {
  Border border;
  int found = -1;
  double xi = 0, eta = 0;
  if (locate(outside, triangle, found, xi, eta)) {
    if (!is_gas(mesh_, found)) border.region = mesh_.triangle_region[static_cast<size_t>(found)];
    return border;
  }
  // Beyond the mesh: step toward `outside` across the edges it lies beyond until one is on the outline.
  int t = triangle;
  for (int step = 0; step < kCurvedSteps && to_reference(mesh_, t, index_->affine[static_cast<size_t>(t)], outside, xi, eta);
       ++step) {
    const int k = most_exceeded_edge(edge_excess(xi, eta));
    const int across = index_->neighbour[static_cast<size_t>(t)][static_cast<size_t>(k)];
    if (across < 0) {
      border.boundary = index_->boundary[static_cast<size_t>(t)][static_cast<size_t>(k)];
      border.edge_from = vertex(mesh_, t, k);
      border.edge_to = vertex(mesh_, t, k + 1);
      break;
    }
    t = across;
  }
  return border;
}

double FieldSampler::element_size(int triangle) const { return index_->element_size[static_cast<size_t>(triangle)]; }

double FieldSampler::domain_size() const {
  const Box& box = index_->domain;
  return std::hypot(box.r1 - box.r0, box.z1 - box.z0);
}

const Mesh& FieldSampler::mesh() const { return mesh_; }

}  // namespace hv
