// Meshing a design through the Gmsh SDK 4.8 (OpenCASCADE kernel):
//  1. build, paint and check the geometry in model units (mesh/occ_model.cpp);
//  2. size the elements: on each electrode's surface its surface size h (mesh.surface_size, else
//     2 pi R_min / 61 from its smallest radius of curvature, so at least 60 elements per turn, else
//     1/8 of its bounding box's shorter side), growing linearly away from it, h + (growth - 1) d,
//     up to max_size. Default max_size: a tenth of the domain's size (the open radius, or the
//     box's longer side). Sizes whose estimated triangle count exceeds mesh.max_elements are
//     refused before Gmsh starts;
//  3. mesh with straight (order 1) or curved (order 2: mid nodes on the true curves) triangles;
//  4. read the triangles back in metres, counter-clockwise, dropping zero-area ones (Gmsh 4.8 can
//     leave some on straight boundaries), and derive the boundaries from the triangles themselves.
#include "mesh/meshing.h"

#include <gmsh.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <iomanip>
#include <sstream>
#include <unordered_map>

#include "mesh/boundaries.h"
#include "mesh/gmsh_session.h"
#include "mesh/occ_model.h"

namespace hv {

namespace {

constexpr int kGmshTriangle3 = 2, kGmshTriangle6 = 9, kGmshLine2 = 1, kGmshLine3 = 8;
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

// Size fields in model units: per electrode Distance -> Threshold, the minimum of them as the
// background mesh, and nothing taken from points, curvature or boundaries.
void set_element_sizes(const PaintedModel& model, const MeshSpec& mesh) {
  namespace field = gmsh::model::mesh::field;
  const double scale = model.length_scale, largest = to_model(model.max_size, scale);
  gmsh::option::setNumber("Mesh.MeshSizeExtendFromBoundary", 0);
  gmsh::option::setNumber("Mesh.MeshSizeFromPoints", 0);
  gmsh::option::setNumber("Mesh.MeshSizeFromCurvature", 0);
  gmsh::option::setNumber("Mesh.MeshSizeMax", largest);

  std::vector<double> thresholds;
  for (size_t e = 0; e < model.electrode_curves.size(); ++e) {
    const std::vector<int>& curves = model.electrode_curves[e];
    if (curves.empty()) continue;
    const double h = to_model(std::min(model.electrode_size[e], model.max_size), scale);
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

// Determinant of the Jacobian of the P1/P2 map at reference point (xi, eta); nodes as in Mesh.
double jacobian(const Point* x, int order, double xi, double eta) {
  double dxi[6], deta[6];
  const double l0 = 1 - xi - eta;
  if (order == 1) {
    const double a[3] = {-1, 1, 0}, b[3] = {-1, 0, 1};
    std::copy(a, a + 3, dxi), std::copy(b, b + 3, deta);
  } else {
    const double a[6] = {1 - 4 * l0, 4 * xi - 1, 0, 4 * (l0 - xi), 4 * eta, -4 * eta};
    const double b[6] = {1 - 4 * l0, 0, 4 * eta - 1, -4 * xi, 4 * xi, 4 * (l0 - eta)};
    std::copy(a, a + 6, dxi), std::copy(b, b + 6, deta);
  }
  double r_xi = 0, r_eta = 0, z_xi = 0, z_eta = 0;
  for (int i = 0; i < (order == 1 ? 3 : 6); ++i) {
    r_xi += dxi[i] * x[i].r, z_xi += dxi[i] * x[i].z;
    r_eta += deta[i] * x[i].r, z_eta += deta[i] * x[i].z;
  }
  return r_xi * z_eta - r_eta * z_xi;
}

double distance(Point a, Point b) { return std::hypot(a.r - b.r, a.z - b.z); }

enum class TriangleCheck { Valid, ZeroArea, Inverted };

// Orients a triangle counter-clockwise (swapping vertices 1 and 2 and, for P2, the mid nodes of
// edges 01 and 20), then checks its Jacobian at the nodes and the centroid.
TriangleCheck orient_and_check(int order, std::vector<size_t>& tags, std::vector<Point>& x) {
  const double longest = std::max({distance(x[0], x[1]), distance(x[1], x[2]), distance(x[2], x[0])});
  const double area2 = (x[1].r - x[0].r) * (x[2].z - x[0].z) - (x[2].r - x[0].r) * (x[1].z - x[0].z);
  if (std::abs(area2) <= 2 * kDegenerateArea * longest * longest) return TriangleCheck::ZeroArea;
  if (area2 < 0) {
    std::swap(tags[1], tags[2]), std::swap(x[1], x[2]);
    if (order == 2) std::swap(tags[3], tags[5]), std::swap(x[3], x[5]);
  }
  static const double reference[7][2] = {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}, {1. / 3, 1. / 3}};
  for (const auto& p : reference)
    if (jacobian(x.data(), order, p[0], p[1]) <= 0) return TriangleCheck::Inverted;
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
  const size_t per = order == 1 ? 3 : 6;
  int dropped = 0;
  for (const auto& [surface, region] : model.surfaces) {
    std::vector<size_t> element_tags, element_nodes;
    gmsh::model::mesh::getElementsByType(order == 1 ? kGmshTriangle3 : kGmshTriangle6, element_tags, element_nodes,
                                         surface);
    for (size_t t = 0; t < element_tags.size(); ++t) {
      std::vector<size_t> tags(element_nodes.begin() + static_cast<long>(t * per),
                               element_nodes.begin() + static_cast<long>((t + 1) * per));
      std::vector<Point> x;
      for (size_t tag : tags) x.push_back(position.at(tag));
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
      gmsh::model::mesh::getElementsByType(order == 1 ? kGmshLine2 : kGmshLine3, element_tags, element_nodes, curve);
      const size_t per_edge = order == 1 ? 2 : 3;
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

MeshResult build_mesh(const GeometrySpec& spec) {
  const auto start = std::chrono::steady_clock::now();
  GmshSession session;
  MeshResult result;
  ElectrodeEdges electrode_edges;
  const PaintedModel model = run_gmsh("building the geometry", [&] { return build_painted_model(spec); });
  run_gmsh("meshing", [&] {
    require_affordable_mesh(model, spec.mesh);
    set_element_sizes(model, spec.mesh);
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
