// Meshing a design through the Gmsh SDK 4.8 (OpenCASCADE kernel):
//  1. build, paint and check the geometry in model units (mesh/occ_model.cpp);
//  2. size the elements: on each electrode's surface its surface size h (mesh.surface_size, else
//     2 pi R_min / 61 from its smallest radius of curvature, so at least 60 elements per turn, else
//     1/8 of its bounding box's shorter side), growing linearly away from it, h + (growth - 1) d,
//     up to max_size. Default max_size: a tenth of the domain's size (the open radius, or the
//     box's longer side). Sizes whose estimated triangle count exceeds mesh.max_elements are
//     refused before Gmsh starts. An adaptive step (tools/app/adaptive.h) passes a SizeMap
//     instead: the sizes then come from it through Gmsh's size callback, up to max_size;
//  3. mesh with straight (order 1) or curved (order 2 or 3: edge nodes on the true curves) triangles;
//  4. read the triangles back in metres, counter-clockwise, dropping zero-area ones (Gmsh 4.8 can
//     leave some on straight boundaries), and derive the boundaries from the triangles themselves.
#include "mesh/meshing.h"

#include <gmsh.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <iomanip>
#include <optional>
#include <sstream>
#include <unordered_map>

#include "mesh/boundaries.h"
#include "mesh/gmsh_session.h"
#include "mesh/lagrange.h"
#include "mesh/occ_model.h"

namespace hv {

namespace {

// Gmsh element types (Gmsh reference manual, MSH file format) by order: triangles of 3, 6, 10 nodes
// and lines of 2, 3, 4 nodes. Their node order is ours (mesh.h): vertices, then per edge (01, 12, 20;
// a line's from its first end) its inner nodes in the edge's direction, then the interior node.
constexpr int kGmshTriangle[4] = {0, 2, 9, 21};
constexpr int kGmshLine[4] = {0, 1, 8, 26};
// A triangle whose straight area is below this fraction of its longest edge squared has no area.
constexpr double kDegenerateArea = 1e-10;
// Distance-field samples: enough that neighbouring samples on a curve are at most h/2 apart.
constexpr int kMaxSamplesPerCurve = 20000;

std::vector<double> as_numbers(const std::vector<int>& tags) { return {tags.begin(), tags.end()}; }

double curve_length(int curve) {
  double length = 0.0;
  gmsh::model::occ::getMass(1, curve, length);
  return length;
}

// The number of triangles the size field below calls for, estimated from the geometry alone. A
// triangle of edge h covers (sqrt 3 / 4) h^2, so the count is about (4 / sqrt 3) times the integral
// of 1/h^2 over the domain. Beside an electrode surface of length L the size grows as
// h0 + (growth - 1) d up to max_size, a band that contributes L (1/h0 - 1/max_size) / (growth - 1);
// the whole meshed area A at max_size adds A / max_size^2. Measured on the bundled cases, Gmsh
// makes 0.95 to 2 times this many triangles: close enough to tell a feasible mesh from one of
// billions. Model units throughout (the count does not depend on them).
double estimated_triangles(const PaintedModel& model, const MeshSpec& mesh) {
  const double largest = model.max_size / model.length_scale;
  double integral = 0.0;  // of 1/h^2
  for (const auto& [surface, region] : model.surfaces) {
    double area = 0.0;
    gmsh::model::occ::getMass(2, surface, area);
    integral += area / (largest * largest);
  }
  for (size_t e = 0; e < model.electrode_curves.size(); ++e) {
    const double h = std::min(model.electrode_size[e], model.max_size) / model.length_scale;
    for (int c : model.electrode_curves[e]) integral += curve_length(c) * (1 / h - 1 / largest) / (mesh.growth - 1);
  }
  return 4 / std::sqrt(3.0) * integral;
}

// Refuses sizes that would take hours and all the memory, before Gmsh starts on them.
void require_affordable_mesh(const PaintedModel& model, const MeshSpec& mesh) {
  const double estimate = estimated_triangles(model, mesh);
  if (estimate <= mesh.max_elements) return;
  std::ostringstream problem;
  problem << "the element sizes call for about " << std::setprecision(2) << estimate
          << " triangles, more than mesh.max_elements (" << mesh.max_elements << ")";
  throw InputError(mesh.where, problem.str(),
                   "Raise mesh.surface_size or mesh.max_size; or raise mesh.max_elements if the machine has the "
                   "memory and time for it");
}

// The size map of an adaptive step as a function of position, for Gmsh's size callback. A quadtree
// over the old triangles' bounding boxes (at most kLeafTriangles per leaf: an adapted mesh is strongly
// graded, so a uniform grid would put hundreds of tiny triangles in one bucket) finds the triangle
// holding a point, and the vertex sizes are interpolated linearly in it. A point outside every
// triangle (a concave curved boundary lies outside its straight chords) takes the value of the nearest
// triangle of its quadrant, or of the smallest enclosing quadrant that has any, barycentric
// coordinates clamped to the triangle.
class SizeLookup {
 public:
  explicit SizeLookup(const SizeMap& map) : map_(map) {
    Quad root;
    root.lo = root.hi = map.vertices.empty() ? Point{} : map.vertices.front();
    for (const Point& p : map.vertices) {
      root.lo = {std::min(root.lo.r, p.r), std::min(root.lo.z, p.z)};
      root.hi = {std::max(root.hi.r, p.r), std::max(root.hi.z, p.z)};
    }
    std::vector<int> all(map.triangles.size());
    for (size_t t = 0; t < all.size(); ++t) all[t] = static_cast<int>(t);
    quads_.push_back(root);
    split(0, std::move(all), 0);
  }

  // The size at (r, z), metres.
  double at(Point x) const {
    std::vector<int> path{0};
    while (quads_[static_cast<size_t>(path.back())].first_child >= 0) {
      const Quad& q = quads_[static_cast<size_t>(path.back())];
      const Point mid{(q.lo.r + q.hi.r) / 2, (q.lo.z + q.hi.z) / 2};
      path.push_back(q.first_child + (x.r >= mid.r ? 1 : 0) + (x.z >= mid.z ? 2 : 0));
    }
    for (auto level = path.rbegin(); level != path.rend(); ++level) {
      double best_inside = -INFINITY, value = 0.0;
      for_each_triangle(*level, [&](int t) {
        double weight[3];
        const double inside = barycentric(t, x, weight);
        if (inside > best_inside) best_inside = inside, value = interpolate(t, weight);
      });
      if (best_inside > -INFINITY) return value;
    }
    return 0.0;  // an empty map
  }

 private:
  static constexpr size_t kLeafTriangles = 8;
  static constexpr int kDepth = 24;
  struct Quad {
    Point lo, hi;
    int first_child = -1;  // four children from here: (r low, z low), (r high, z low), (r low, z high), ...
    std::vector<int> triangles;
  };

  void split(int index, std::vector<int> triangles, int depth) {
    if (triangles.size() <= kLeafTriangles || depth == kDepth) {
      quads_[static_cast<size_t>(index)].triangles = std::move(triangles);
      return;
    }
    const Quad parent = quads_[static_cast<size_t>(index)];
    const Point mid{(parent.lo.r + parent.hi.r) / 2, (parent.lo.z + parent.hi.z) / 2};
    const int first = static_cast<int>(quads_.size());
    quads_[static_cast<size_t>(index)].first_child = first;
    std::vector<int> parts[4];
    for (int c = 0; c < 4; ++c) {
      Quad child;
      child.lo = {c & 1 ? mid.r : parent.lo.r, c & 2 ? mid.z : parent.lo.z};
      child.hi = {c & 1 ? parent.hi.r : mid.r, c & 2 ? parent.hi.z : mid.z};
      for (int t : triangles) {
        Point lo{INFINITY, INFINITY}, hi{-INFINITY, -INFINITY};
        for (int v : map_.triangles[static_cast<size_t>(t)]) {
          const Point& p = map_.vertices[static_cast<size_t>(v)];
          lo = {std::min(lo.r, p.r), std::min(lo.z, p.z)}, hi = {std::max(hi.r, p.r), std::max(hi.z, p.z)};
        }
        if (lo.r <= child.hi.r && hi.r >= child.lo.r && lo.z <= child.hi.z && hi.z >= child.lo.z)
          parts[c].push_back(t);
      }
      quads_.push_back(child);
    }
    for (int c = 0; c < 4; ++c) split(first + c, std::move(parts[c]), depth + 1);
  }

  template <class F>
  void for_each_triangle(int index, F f) const {
    const Quad& q = quads_[static_cast<size_t>(index)];
    for (int t : q.triangles) f(t);
    if (q.first_child >= 0)
      for (int c = 0; c < 4; ++c) for_each_triangle(q.first_child + c, f);
  }

  // Barycentric coordinates of x in triangle t; returns the smallest (negative outside).
  double barycentric(int t, Point x, double* weight) const {
    const auto& tri = map_.triangles[static_cast<size_t>(t)];
    const Point& a = map_.vertices[static_cast<size_t>(tri[0])];
    const Point& b = map_.vertices[static_cast<size_t>(tri[1])];
    const Point& c = map_.vertices[static_cast<size_t>(tri[2])];
    const double area = (b.r - a.r) * (c.z - a.z) - (c.r - a.r) * (b.z - a.z);
    weight[1] = ((x.r - a.r) * (c.z - a.z) - (c.r - a.r) * (x.z - a.z)) / area;
    weight[2] = ((b.r - a.r) * (x.z - a.z) - (x.r - a.r) * (b.z - a.z)) / area;
    weight[0] = 1 - weight[1] - weight[2];
    return std::min({weight[0], weight[1], weight[2]});
  }

  double interpolate(int t, const double* weight) const {
    double sum = 0.0, value = 0.0;
    for (int k = 0; k < 3; ++k) {
      const double w = std::max(0.0, weight[k]);
      sum += w;
      value += w * map_.size[static_cast<size_t>(map_.triangles[static_cast<size_t>(t)][static_cast<size_t>(k)])];
    }
    return value / sum;
  }

  const SizeMap& map_;
  std::vector<Quad> quads_;
};

// Size fields in model units: per electrode Distance -> Threshold, the minimum of them as the
// background mesh, and nothing taken from points, curvature or boundaries. With an adaptive size
// map, Gmsh's size callback takes the map instead of the fields (bounded by the largest size).
void set_element_sizes(const PaintedModel& model, const MeshSpec& mesh, const SizeLookup* adapted) {
  namespace field = gmsh::model::mesh::field;
  const double scale = model.length_scale, largest = to_model(model.max_size, scale);
  gmsh::option::setNumber("Mesh.MeshSizeExtendFromBoundary", 0);
  gmsh::option::setNumber("Mesh.MeshSizeFromPoints", 0);
  gmsh::option::setNumber("Mesh.MeshSizeFromCurvature", 0);
  gmsh::option::setNumber("Mesh.MeshSizeMax", largest);
  // Frontal-Delaunay (6), Gmsh's default, chosen explicitly: on the sphere above a plane at ~1e5
  // unknowns it meshed in 16.5 s against 20.2 s for Delaunay (5) and 73 s for MeshAdapt (1), with
  // the same field error to 1e-5, and 8 crashed in Gmsh 4.8.4 (measured on a loaded 2-core machine).
  gmsh::option::setNumber("Mesh.Algorithm", 6);
  if (adapted) {
    // Gmsh 4.8 hands the callback model coordinates. The size is rounded like every other length
    // (to_model), so that a scaled copy of a case gets the same mesh.
    gmsh::model::mesh::setSizeCallback([adapted, scale](int, int, double x, double y, double) {
      return to_model(adapted->at({x * scale, y * scale}), scale);
    });
    return;
  }

  std::vector<double> thresholds;
  for (size_t e = 0; e < model.electrode_curves.size(); ++e) {
    const std::vector<int>& curves = model.electrode_curves[e];
    if (curves.empty()) continue;
    const double factor = mesh.surface_size > 0 ? 1.0 : mesh.default_size_factor;
    const double h = to_model(std::min(factor * model.electrode_size[e], model.max_size), scale);
    double longest = 0.0;
    for (int c : curves) longest = std::max(longest, curve_length(c));
    const int distance = field::add("Distance");
    field::setNumbers(distance, "CurvesList", as_numbers(curves));
    field::setNumber(distance, "NumPointsPerCurve",
                     std::min<double>(kMaxSamplesPerCurve, std::ceil(2 * longest / h) + 2));
    const int threshold = field::add("Threshold");
    field::setNumber(threshold, "InField", distance);
    field::setNumber(threshold, "SizeMin", h);
    field::setNumber(threshold, "SizeMax", largest);
    field::setNumber(threshold, "DistMin", 0);
    field::setNumber(threshold, "DistMax", (largest - h) / (mesh.growth - 1));
    thresholds.push_back(threshold);
  }
  if (thresholds.empty()) return;
  const int smallest = field::add("Min");
  field::setNumbers(smallest, "FieldsList", thresholds);
  field::setAsBackgroundMesh(smallest);
}

// Determinant of the Jacobian of the isoparametric map at reference point (xi, eta); nodes as in Mesh.
double jacobian(const Point* x, int order, double xi, double eta) {
  double N[kMaxTriangleNodes], dxi[kMaxTriangleNodes], deta[kMaxTriangleNodes];
  triangle_shape(order, xi, eta, N, dxi, deta);
  double r_xi = 0, r_eta = 0, z_xi = 0, z_eta = 0;
  for (int i = 0; i < (order + 1) * (order + 2) / 2; ++i) {
    r_xi += dxi[i] * x[i].r, z_xi += dxi[i] * x[i].z;
    r_eta += deta[i] * x[i].r, z_eta += deta[i] * x[i].z;
  }
  return r_xi * z_eta - r_eta * z_xi;
}

double distance(Point a, Point b) { return std::hypot(a.r - b.r, a.z - b.z); }

enum class TriangleCheck { Valid, ZeroArea, Inverted };

// The local node order of a triangle whose vertices 1 and 2 trade places: the cycle (0, 1, 2) becomes
// (0, 2, 1), so sides 01 and 20 trade places and every side runs backwards (its inner nodes reversed).
const int* reversed_nodes(int order) {
  static const int reversed[4][kMaxTriangleNodes] = {
      {}, {0, 2, 1}, {0, 2, 1, 5, 4, 3}, {0, 2, 1, 8, 7, 6, 5, 4, 3, 9}};
  return reversed[order];
}

// Orients a triangle counter-clockwise (reversing its node order when its vertices run clockwise),
// then checks its Jacobian at its nodes and the centroid (with the P2 nodes for a P1 triangle).
TriangleCheck orient_and_check(int order, std::vector<size_t>& tags, std::vector<Point>& x) {
  const double longest = std::max({distance(x[0], x[1]), distance(x[1], x[2]), distance(x[2], x[0])});
  const double area2 = (x[1].r - x[0].r) * (x[2].z - x[0].z) - (x[2].r - x[0].r) * (x[1].z - x[0].z);
  if (std::abs(area2) <= 2 * kDegenerateArea * longest * longest) return TriangleCheck::ZeroArea;
  if (area2 < 0) {
    const std::vector<size_t> old_tags = tags;
    const std::vector<Point> old_x = x;
    const int* reversed = reversed_nodes(order);
    for (size_t i = 0; i < tags.size(); ++i)
      tags[i] = old_tags[static_cast<size_t>(reversed[i])], x[i] = old_x[static_cast<size_t>(reversed[i])];
  }
  const int checked = std::max(order, 2);
  for (int i = 0; i < (checked + 1) * (checked + 2) / 2; ++i) {
    double xi, eta;
    triangle_node_reference(checked, i, &xi, &eta);
    if (jacobian(x.data(), order, xi, eta) <= 0) return TriangleCheck::Inverted;
  }
  if (jacobian(x.data(), order, 1. / 3, 1. / 3) <= 0) return TriangleCheck::Inverted;
  return TriangleCheck::Valid;
}

// Reads the triangles of every painted surface into `mesh` (nodes numbered in order of first use),
// and the electrode edges for the boundaries. Returns the number of zero-area triangles dropped.
int read_triangles(const PaintedModel& model, int order, Mesh& mesh, ElectrodeEdges& electrode_edges) {
  std::vector<size_t> node_tags;
  std::vector<double> coords, parametric;
  gmsh::model::mesh::getNodes(node_tags, coords, parametric, -1, -1, true, false);
  // Nodes on the axis come back from OCC with |r| of order 1e-16, sometimes negative; the solver and
  // the surface-field recovery recognise the axis by r == 0 exactly (the weight 2 pi r vanishes).
  constexpr double kAxisSnap = 1e-9;  // model units (fractions of the model's extent)
  std::unordered_map<size_t, Point> position;
  for (size_t i = 0; i < node_tags.size(); ++i) {
    const double x = std::abs(coords[3 * i]) <= kAxisSnap ? 0.0 : coords[3 * i];
    position[node_tags[i]] = {x * model.length_scale, coords[3 * i + 1] * model.length_scale};
  }

  std::unordered_map<size_t, int> index_of;
  auto index = [&](size_t tag) {
    const auto [it, inserted] = index_of.emplace(tag, mesh.n_nodes());
    if (inserted) mesh.nodes.push_back(position.at(tag));
    return it->second;
  };

  mesh.order = order;
  const size_t per = static_cast<size_t>(mesh.nodes_per_triangle());
  int dropped = 0;
  for (const auto& [surface, region] : model.surfaces) {
    std::vector<size_t> element_tags, element_nodes;
    gmsh::model::mesh::getElementsByType(kGmshTriangle[order], element_tags, element_nodes, surface);
    for (size_t t = 0; t < element_tags.size(); ++t) {
      std::vector<size_t> tags(element_nodes.begin() + static_cast<long>(t * per),
                               element_nodes.begin() + static_cast<long>((t + 1) * per));
      std::vector<Point> x;
      for (size_t tag : tags) x.push_back(position.at(tag));
      // Gmsh 4.8 puts the interior node of a curved cubic triangle at (sum of edge nodes - sum of
      // vertices) / 3 (measured), a third of the edges' bulge beyond the blended position; that is
      // not exact even for quadratic maps and costs the element an order of accuracy. The node
      // belongs to this triangle alone, so it moves without touching a neighbour.
      if (order == 3) x[9] = position[tags[9]] = blended_interior_node(x.data());
      const TriangleCheck check = orient_and_check(order, tags, x);
      if (check == TriangleCheck::ZeroArea) {
        ++dropped;
        continue;
      }
      if (check == TriangleCheck::Inverted)
        throw RunError("a curved triangle near (r = " + std::to_string(x[0].r) + " m, z = " + std::to_string(x[0].z) +
                       " m) is inverted; set a smaller mesh.surface_size or mesh.max_size");
      for (size_t tag : tags) mesh.triangles.push_back(index(tag));
      mesh.triangle_region.push_back(region);
    }
  }

  for (size_t e = 0; e < model.electrode_curves.size(); ++e) {
    for (int curve : model.electrode_curves[e]) {
      std::vector<size_t> element_tags, element_nodes;
      gmsh::model::mesh::getElementsByType(kGmshLine[order], element_tags, element_nodes, curve);
      const size_t per_edge = static_cast<size_t>(order + 1);
      for (size_t k = 0; k < element_tags.size(); ++k) {
        const auto a = index_of.find(element_nodes[k * per_edge]), b = index_of.find(element_nodes[k * per_edge + 1]);
        if (a == index_of.end() || b == index_of.end()) continue;
        electrode_edges[{std::min(a->second, b->second), std::max(a->second, b->second)}] = static_cast<int>(e);
      }
    }
  }
  return dropped;
}

void fill_statistics(const Mesh& mesh, MeshStats& stats) {
  stats.nodes = mesh.n_nodes();
  stats.triangles = mesh.n_triangles();
  stats.boundary_edges = 0;
  for (const Boundary& boundary : mesh.boundaries)
    for (const auto& contour : boundary.contours) stats.boundary_edges += static_cast<int>(contour.size());
  stats.min_size = mesh.n_triangles() > 0 ? INFINITY : 0.0;
  stats.max_size = 0.0;
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* v = mesh.triangle(t);
    for (int k = 0; k < 3; ++k) {
      const double edge =
          distance(mesh.nodes[static_cast<size_t>(v[k])], mesh.nodes[static_cast<size_t>(v[(k + 1) % 3])]);
      stats.min_size = std::min(stats.min_size, edge);
      stats.max_size = std::max(stats.max_size, edge);
    }
  }
}

}  // namespace

std::vector<std::string> check_geometry(const GeometrySpec& spec) {
  GmshSession session;
  return run_gmsh("building the geometry", [&] {
    const PaintedModel model = build_painted_model(spec);
    require_affordable_mesh(model, spec.mesh);
    return model.warnings;
  });
}

MeshResult build_mesh(const GeometrySpec& spec, const SizeMap* sizes) {
  const auto start = std::chrono::steady_clock::now();
  GmshSession session;
  MeshResult result;
  ElectrodeEdges electrode_edges;
  const PaintedModel model = run_gmsh("building the geometry", [&] { return build_painted_model(spec); });
  run_gmsh("meshing", [&] {
    require_affordable_mesh(model, spec.mesh);
    const std::optional<SizeLookup> adapted = sizes ? std::optional<SizeLookup>(*sizes) : std::nullopt;
    set_element_sizes(model, spec.mesh, adapted ? &*adapted : nullptr);
    gmsh::model::mesh::generate(2);
    gmsh::model::mesh::setOrder(spec.mesh.order);
    result.stats.dropped_degenerate = read_triangles(model, spec.mesh.order, result.mesh, electrode_edges);
  });
  result.warnings = model.warnings;
  result.mesh.regions = model.regions;
  if (model.domain.open) {
    result.mesh.open_radius = model.domain.open_radius;
    result.mesh.open_center = model.domain.open_center;
  }
  find_boundaries(spec, model.domain, electrode_edges, result.mesh);
  fill_statistics(result.mesh, result.stats);
  result.stats.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return result;
}

}  // namespace hv
