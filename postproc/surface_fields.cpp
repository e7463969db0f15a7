#include "postproc/surface_fields.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <unordered_map>

#include <Eigen/QR>

#include "solver/elements.h"
#include "solver/mesh_edges.h"

namespace hv {

namespace {

using NodeValues = std::unordered_map<int, double>;

int region_of(const Mesh& mesh, int triangle) {
  return triangle < 0 ? -1 : mesh.triangle_region[static_cast<size_t>(triangle)];
}

bool touches_region(const Mesh& mesh, const MeshEdge& edge, int region) {
  return region_of(mesh, edge.triangles[0]) == region || region_of(mesh, edge.triangles[1]) == region;
}

BoundaryEdge as_boundary_edge(const MeshEdge& edge) {
  BoundaryEdge out;
  out.nodes = edge.nodes;
  return out;
}

// Per mesh edge: true on the axis and on symmetry sides, where the normal flux is zero by the
// natural boundary condition (so they take no part in the flux recovery).
std::vector<bool> zero_flux_edges(const Mesh& mesh, const MeshEdges& edges) {
  std::vector<bool> zero(edges.all().size(), false);
  for (const Boundary& boundary : mesh.boundaries) {
    if (boundary.kind != BoundaryKind::Axis && boundary.kind != BoundaryKind::Symmetry) continue;
    for (const auto& contour : boundary.contours)
      for (const BoundaryEdge& edge : contour) {
        const int found = edges.find(edge.nodes[0], edge.nodes[1]);
        if (found >= 0) zero[static_cast<size_t>(found)] = true;
      }
  }
  return zero;
}

// The edges of a region's outline through which flux can pass: towards a conductor, another region
// or the open boundary (everything but the axis and symmetry sides).
std::vector<int> flux_outline(const Mesh& mesh, const MeshEdges& edges, const std::vector<bool>& zero_flux, int region) {
  std::vector<int> outline;
  for (size_t e = 0; e < edges.all().size(); ++e) {
    const MeshEdge& edge = edges.all()[e];
    const int a = region_of(mesh, edge.triangles[0]), b = region_of(mesh, edge.triangles[1]);
    if (a != b && (a == region || b == region) && !zero_flux[e]) outline.push_back(static_cast<int>(e));
  }
  return outline;
}

// The nodes of a chain of edges in order of travel: first vertex, then per edge its inner nodes
// (order 2 or 3) and its second vertex. Consecutive vertices lie `order` places apart.
std::vector<int> chain_nodes(const std::vector<BoundaryEdge>& chain) {
  std::vector<int> nodes = {chain.front().nodes[0]};
  for (const BoundaryEdge& edge : chain) {
    for (size_t i = 2; i < edge.nodes.size() && edge.nodes[i] >= 0; ++i) nodes.push_back(edge.nodes[i]);
    nodes.push_back(edge.nodes[1]);
  }
  return nodes;
}

// The residual of the region's own element equations at the nodes of its flux outline,
//   r_i = sum over the region's triangles of (K_e u)_i = integral over the outline of eps_r du/dn N_i 2 pi r ds,
// n the region's outward normal, so eps_r du/dn = eps_r E . n_inward: the consistent boundary flux of
// Carey, Chow & Seager (Comput. Methods Appl. Mech. Eng. 50, 1985).
NodeValues outline_residual(const Mesh& mesh, const Eigen::VectorXd& potential, const MeshEdges& edges,
                            const std::vector<int>& outline, int region) {
  NodeValues residual;
  for (int e : outline)
    for (int node : edges.all()[static_cast<size_t>(e)].nodes)
      if (node >= 0) residual[node] = 0.0;
  const int n = mesh.nodes_per_triangle();
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    if (region_of(mesh, t) != region) continue;
    const int* node = mesh.triangle(t);
    bool on_outline = false;
    for (int i = 0; i < n; ++i) on_outline = on_outline || residual.count(node[i]) > 0;
    if (!on_outline) continue;
    double K[kMaxTriangleNodes * kMaxTriangleNodes];
    triangle_stiffness(mesh, t, K);
    for (int i = 0; i < n; ++i) {
      const auto slot = residual.find(node[i]);
      if (slot == residual.end()) continue;
      for (int j = 0; j < n; ++j) slot->second += K[i * n + j] * potential(node[j]);
    }
  }
  return residual;
}

// Reference coordinates of parameter t along a triangle's edge from vertex `from` to vertex `to`.
void edge_point_in_triangle(const Mesh& mesh, int triangle, int from, int to, double t, double* xi, double* eta) {
  static const double vertex_xi[3] = {0, 1, 0}, vertex_eta[3] = {0, 0, 1};
  const int* node = mesh.triangle(triangle);
  int a = 0, b = 0;
  for (int k = 0; k < 3; ++k) {
    if (node[k] == from) a = k;
    if (node[k] == to) b = k;
  }
  *xi = (1 - t) * vertex_xi[a] + t * vertex_xi[b];
  *eta = (1 - t) * vertex_eta[a] + t * vertex_eta[b];
}

// integral over one outline edge of eps_r du/dn N_i 2 pi r ds for its nodes, with du/dn taken
// directly from the gradient in the region's triangle beside it. Used only to take a neighbouring
// face's share out of the residual at a node where two faces meet.
std::array<double, kMaxEdgeNodes> direct_flux_moments(const Mesh& mesh, const Eigen::VectorXd& potential,
                                                      const MeshEdge& edge, int region) {
  const bool first_side = region_of(mesh, edge.triangles[0]) == region;
  const int triangle = first_side ? edge.triangles[0] : edge.triangles[1];
  const double eps_r = mesh.regions[static_cast<size_t>(region)].permittivity;
  const BoundaryEdge along = as_boundary_edge(edge);
  std::array<double, kMaxEdgeNodes> moments{};
  for (const EdgePoint& q : edge_rule(mesh.order)) {
    const EdgeSample s = sample_edge(mesh, along, q.t);
    double xi, eta;
    edge_point_in_triangle(mesh, triangle, edge.nodes[0], edge.nodes[1], q.t, &xi, &eta);
    const Point E = triangle_field(mesh, triangle, potential.data(), xi, eta);
    // The edge runs counter-clockwise around triangles[0], so its outward normal is the tangent
    // turned clockwise; for triangles[1] it is the opposite.
    const double sign = first_side ? 1.0 : -1.0;
    const double du_dn = -(E.r * s.tangent.z - E.z * s.tangent.r) * sign;
    for (int i = 0; i < s.n; ++i) moments[static_cast<size_t>(i)] += eps_r * du_dn * s.N[i] * 2 * kPi * s.at.r * s.ds_dt * q.weight;
  }
  return moments;
}

// The outline edges of a region that meet each outline node.
std::unordered_map<int, std::vector<int>> edges_at_nodes(const MeshEdges& edges, const std::vector<int>& outline) {
  std::unordered_map<int, std::vector<int>> at;
  for (int e : outline)
    for (int node : edges.all()[static_cast<size_t>(e)].nodes)
      if (node >= 0) at[node].push_back(e);
  return at;
}

// A region's flux outline with the residual at its nodes.
struct Outline {
  int region = -1;
  NodeValues residual;
  std::unordered_map<int, std::vector<int>> edges_at_node;
};

// Arc length of an edge between parameters t0 and t1: integral of |dx/dt| dt.
double arc_length(const Mesh& mesh, const BoundaryEdge& edge, double t0, double t1) {
  double length = 0;
  for (const EdgePoint& q : edge_rule(mesh.order)) length += sample_edge(mesh, edge, t0 + (t1 - t0) * q.t).ds_dt * (t1 - t0) * q.weight;
  return length;
}

// The P1 hat functions of a face's vertices sampled along it: at the points of a Gauss rule on every
// edge, the arc length and the weights 2 pi r ds of the hats of the edge's two end vertices. A hat is
// linear in the edge parameter (1 - t and t), so it is a valid test function of the P2 and P3 spaces
// too (their shape functions reproduce linear functions).
struct FaceHats {
  struct Sample {
    double s = 0.0;
    int edge = 0;          // the hats of vertices `edge` and `edge + 1`
    double weight[2] = {0.0, 0.0};  // hat 2 pi r ds_dt w
  };
  std::vector<double> node_s;  // arc length of every chain node
  std::vector<Sample> samples;  // edge by edge, edge_rule(kMomentRuleOrder).size() per edge
};

// The moments integrate s^m times a hat over curved edges; 5-point Gauss-Legendre (exact to degree 9 in
// the edge parameter) keeps their quadrature error far below the fit's own.
constexpr int kMomentRuleOrder = 3;

FaceHats face_hats(const Mesh& mesh, const std::vector<BoundaryEdge>& face) {
  const int step = mesh.order;
  FaceHats hats;
  hats.node_s.assign(face.size() * static_cast<size_t>(step) + 1, 0.0);
  double start = 0.0;
  for (size_t e = 0; e < face.size(); ++e) {
    for (const EdgePoint& q : edge_rule(kMomentRuleOrder)) {
      const EdgeSample at = sample_edge(mesh, face[e], q.t);
      const double weight = 2 * kPi * at.at.r * at.ds_dt * q.weight;
      hats.samples.push_back({start + arc_length(mesh, face[e], 0.0, q.t), static_cast<int>(e), {(1 - q.t) * weight, q.t * weight}});
    }
    for (int j = 1; j < step; ++j)
      hats.node_s[e * static_cast<size_t>(step) + static_cast<size_t>(j)] = start + arc_length(mesh, face[e], 0.0, static_cast<double>(j) / step);
    start += arc_length(mesh, face[e], 0.0, 1.0);
    hats.node_s[(e + 1) * static_cast<size_t>(step)] = start;
  }
  return hats;
}

// The residual of a face's vertex hats from the residual shares of its nodes: the P2 or P3 vertex's
// own share plus, for each inner node j places away (of `step` per edge), (1 - j / step) times its
// share. The hat's residual averages out the alternating vertex / inner-node errors of the single
// node residuals (measured on a sphere: 0.35 % down to 0.03 %), and it stays defined on the axis,
// where the integral of a P2 or P3 vertex's N_i 2 pi r vanishes.
std::vector<double> hat_residuals(const std::vector<double>& share, int step) {
  std::vector<double> residual;
  const size_t stride = static_cast<size_t>(step);
  for (size_t k = 0; k < share.size(); k += stride) {
    double sum = share[k];
    for (size_t j = 1; j < stride; ++j) {
      const double hat = 1.0 - static_cast<double>(j) / static_cast<double>(step);
      if (k >= j) sum += hat * share[k - j];
      if (k + j < share.size()) sum += hat * share[k + j];
    }
    residual.push_back(sum);
  }
  return residual;
}

// The fit around one node: a quadratic in the arc length, fitted to the hats of the vertices within
// kFitReach edges on either side of the node (of its own edge, for an inner node). Chosen by measurement
// (docs/methods.md): a cubic, or a reach of 3, amplified the residual's node-to-node noise more than it
// removed smoothing error, on the coaxial, concentric-sphere and sphere-above-plane cases alike.
constexpr int kFitReach = 2;
constexpr int kFitDegree = 2;
// The fit's matrices have at most 2 kFitReach + 2 rows (the vertices of an inner node's window) and
// live on the stack. Their own types also keep our instantiations of Eigen's QR apart from the
// MatrixXd ones that libgmsh exports: with those, the dynamic linker bound Gmsh's calls to our copies,
// whose memory Gmsh then freed with its own allocator (caught by AddressSanitizer).
using FitMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::ColMajor, 2 * kFitReach + 2, kFitDegree + 1>;
using FitVector = Eigen::Matrix<double, Eigen::Dynamic, 1, Eigen::ColMajor, 2 * kFitReach + 2, 1>;

// The edges [first, last) whose vertex hats inform the flux at chain node k: kFitReach edges on either
// side, shifted inwards where the face ends so that a node near an end still sees as many.
std::pair<int, int> fit_window(size_t k, int step, int edges) {
  const int node = static_cast<int>(k);
  int first = node / step - kFitReach;
  int last = (node % step == 0 ? node / step : node / step + 1) + kFitReach;
  if (first < 0) last -= first, first = 0;
  if (last > edges) first -= last - edges, last = edges;
  return {std::max(first, 0), std::min(last, edges)};
}

// eps_r E_n at chain node k of a face. The hat residuals are weak values, R_v = integral of q hat_v
// 2 pi r ds with q = eps_r E_n, so a local polynomial q(s) is fitted to them by least squares through
// its exact moments and evaluated at the node. Dividing R_v by the hat's lumped mass instead smooths q
// over two elements and errs by O(h^2) q'' wherever q varies along the surface, whatever the element
// order; the fit removes that smoothing error up to its degree. Vertices whose hat reaches outside the
// window are not used. Near a face end on the axis the fit takes even powers of the distance from the
// pole: the surface crosses the axis at a right angle, so the field is even in that distance.
double fitted_flux(const FaceHats& hats, const std::vector<double>& hat_residual, size_t k, int step,
                   bool pole_at_start, bool pole_at_end) {
  const int edges = static_cast<int>(hat_residual.size()) - 1;
  const auto [first, last] = fit_window(k, step, edges);
  const int from = first > 0 ? first + 1 : 0, to = last < edges ? last - 1 : last;  // vertices used
  const int equations = to - from + 1;

  const double scale = (hats.node_s[static_cast<size_t>(last * step)] - hats.node_s[static_cast<size_t>(first * step)]) / (last - first);
  const bool even_from_start = pole_at_start && first == 0, even_from_end = pole_at_end && last == edges;
  const bool even = even_from_start || even_from_end;
  const double centre = even_from_start ? hats.node_s.front() : even_from_end ? hats.node_s.back() : hats.node_s[k];
  const int power_step = even ? 2 : 1;
  const int terms = std::min(kFitDegree / power_step + 1, equations);

  FitMatrix moments = FitMatrix::Zero(equations, terms);
  const size_t per_edge = edge_rule(kMomentRuleOrder).size();
  for (size_t n = static_cast<size_t>(first) * per_edge; n < static_cast<size_t>(last) * per_edge; ++n) {
    const FaceHats::Sample& sample = hats.samples[n];
    for (int end = 0; end < 2; ++end) {
      const int row = sample.edge + end - from;
      if (row < 0 || row >= equations) continue;
      const double x = (sample.s - centre) / scale;
      for (int m = 0; m < terms; ++m) moments(row, m) += sample.weight[end] * std::pow(x, m * power_step);
    }
  }
  const FitVector data = Eigen::Map<const Eigen::VectorXd>(hat_residual.data() + from, equations);
  const FitVector coefficients = moments.colPivHouseholderQr().solve(data);
  const double x = (hats.node_s[k] - centre) / scale;
  double value = 0.0;
  for (int m = 0; m < terms; ++m) value += coefficients(m) * std::pow(x, m * power_step);
  return value;
}

// The share of a node's residual that belongs to a face: its residual less, where the face meets
// another outline face (a corner, a triple junction, the open boundary), the other face's share,
// taken out with its directly computed flux.
double own_share(const Mesh& mesh, const Eigen::VectorXd& potential, const MeshEdges& edges, const Outline& outline,
                 const std::vector<int>& own_edges, int node) {
  double share = outline.residual.at(node);
  for (int e : outline.edges_at_node.at(node)) {
    if (std::find(own_edges.begin(), own_edges.end(), e) != own_edges.end()) continue;
    const MeshEdge& other = edges.all()[static_cast<size_t>(e)];
    const std::array<double, kMaxEdgeNodes> moments = direct_flux_moments(mesh, potential, other, outline.region);
    for (size_t i = 0; i < moments.size(); ++i)
      if (other.nodes[i] == node) share -= moments[i];
  }
  return share;
}

// eps_r E_n (V/m, normal into the region) at the nodes of one face, in chain order, fitted to the
// residual of its vertex hats (fitted_flux). A closed face (a torus's cross-section) has no ends: it is
// fitted as an open chain that runs kFitReach + 1 edges further at both ends, so that every node of the
// face sees whole windows and its first node's residual (which spans both its edges) fits its hat.
std::vector<double> face_flux(const Mesh& mesh, const Eigen::VectorXd& potential, const MeshEdges& edges,
                              const Outline& outline, const std::vector<BoundaryEdge>& face) {
  std::vector<int> own_edges;
  for (const BoundaryEdge& edge : face) own_edges.push_back(edges.find(edge.nodes[0], edge.nodes[1]));
  const std::vector<int> nodes = chain_nodes(face);
  const bool closed = nodes.front() == nodes.back();
  const size_t overlap = closed ? kFitReach + 1 : 0;
  std::vector<BoundaryEdge> chain;
  for (size_t i = 0; i < face.size() + 2 * overlap; ++i) chain.push_back(face[(i + face.size() * overlap - overlap) % face.size()]);

  std::vector<double> share;
  for (int node : chain_nodes(chain)) share.push_back(own_share(mesh, potential, edges, outline, own_edges, node));
  const FaceHats hats = face_hats(mesh, chain);
  const std::vector<double> hat_residual = hat_residuals(share, mesh.order);
  const bool pole_at_start = !closed && mesh.nodes[static_cast<size_t>(nodes.front())].r == 0.0;
  const bool pole_at_end = !closed && mesh.nodes[static_cast<size_t>(nodes.back())].r == 0.0;
  const size_t offset = overlap * static_cast<size_t>(mesh.order);
  std::vector<double> flux(nodes.size());
  for (size_t k = 0; k < nodes.size(); ++k)
    flux[k] = fitted_flux(hats, hat_residual, offset + k, mesh.order, pole_at_start, pole_at_end);
  return flux;
}

// A run split where its direction turns by more than 30 degrees: each piece is a smooth face.
std::vector<std::vector<BoundaryEdge>> split_at_corners(const Mesh& mesh, const std::vector<BoundaryEdge>& run) {
  const double cos_limit = std::cos(30.0 * kPi / 180.0);
  std::vector<std::vector<BoundaryEdge>> faces = {{run.front()}};
  for (size_t k = 1; k < run.size(); ++k) {
    const Point a = sample_edge(mesh, run[k - 1], 1.0).tangent, b = sample_edge(mesh, run[k], 0.0).tangent;
    if (a.r * b.r + a.z * b.z < cos_limit) faces.emplace_back();
    faces.back().push_back(run[k]);
  }
  return faces;
}

// eps_r E_n along a run in chain order; at a corner the larger (in magnitude) of its two one-sided
// values, the conservative choice for a field maximum.
std::vector<double> run_flux(const Mesh& mesh, const Eigen::VectorXd& potential, const MeshEdges& edges,
                             const Outline& outline, const std::vector<BoundaryEdge>& run) {
  std::vector<double> flux;
  for (const auto& face : split_at_corners(mesh, run)) {
    const std::vector<double> values = face_flux(mesh, potential, edges, outline, face);
    if (!flux.empty()) {
      if (std::abs(values.front()) > std::abs(flux.back())) flux.back() = values.front();
      flux.insert(flux.end(), values.begin() + 1, values.end());
    } else {
      flux = values;
    }
  }
  return flux;
}

// -du/ds along an edge at parameter t (direction of travel: first node to second).
double tangential_field(const Mesh& mesh, const BoundaryEdge& edge, const Eigen::VectorXd& potential, double t) {
  const EdgeSample s = sample_edge(mesh, edge, t);
  double du_dt = 0;
  for (int i = 0; i < s.n; ++i) du_dt += potential(edge.nodes[static_cast<size_t>(i)]) * s.dN_dt[i];
  return -du_dt / s.ds_dt;
}

// The samples of one chain of edges, given eps_r E_n at its nodes in chain order. E_t at a vertex
// shared by two edges is the mean of both edges' values; a closed chain ends with its first node again.
std::vector<SurfaceSample> chain_samples(const Mesh& mesh, const std::vector<BoundaryEdge>& chain,
                                         const Eigen::VectorXd& potential, const std::vector<double>& eps_E_n,
                                         double eps_r, bool is_conductor) {
  std::vector<double> s = {0.0}, E_t = {tangential_field(mesh, chain.front(), potential, 0.0)};
  double length = 0;
  for (const BoundaryEdge& edge : chain) {
    E_t.back() = s.size() == 1 ? E_t.back() : 0.5 * (E_t.back() + tangential_field(mesh, edge, potential, 0.0));
    for (int j = 1; j < mesh.order; ++j) {  // the inner nodes, at t = j / order
      const double t = static_cast<double>(j) / mesh.order;
      s.push_back(length + arc_length(mesh, edge, 0.0, t));
      E_t.push_back(tangential_field(mesh, edge, potential, t));
    }
    length += arc_length(mesh, edge, 0.0, 1.0);
    s.push_back(length);
    E_t.push_back(tangential_field(mesh, edge, potential, 1.0));
  }
  const std::vector<int> nodes = chain_nodes(chain);
  if (nodes.back() == nodes.front()) E_t.front() = E_t.back() = 0.5 * (E_t.front() + E_t.back());

  std::vector<SurfaceSample> samples;
  for (size_t k = 0; k < nodes.size(); ++k) {
    SurfaceSample sample;
    sample.s = s[k];
    sample.at = mesh.nodes[static_cast<size_t>(nodes[k])];
    sample.E_n = eps_E_n[k] / eps_r;
    sample.E_t = E_t[k];
    sample.E_abs = std::hypot(sample.E_n, sample.E_t);
    sample.sigma = is_conductor ? kEpsilon0 * eps_E_n[k] : 0.0;  // D_n = eps0 eps_r E_n
    samples.push_back(sample);
  }
  return samples;
}

// The maximal runs of consecutive edges of a contour that border `region`.
std::vector<std::vector<BoundaryEdge>> runs_beside(const Mesh& mesh, const MeshEdges& edges,
                                                   const std::vector<BoundaryEdge>& contour, int region) {
  std::vector<std::vector<BoundaryEdge>> runs;
  bool in_run = false;
  for (const BoundaryEdge& edge : contour) {
    const int found = edges.find(edge.nodes[0], edge.nodes[1]);
    if (found < 0) throw RunError("a boundary edge is not a side of any triangle of the mesh");
    const bool beside = touches_region(mesh, edges.all()[static_cast<size_t>(found)], region);
    if (beside && !in_run) runs.emplace_back();
    if (beside) runs.back().push_back(edge);
    in_run = beside;
  }
  return runs;
}

// The region on the other side of a boundary edge from `region` (-1: none, a conductor).
int region_across(const Mesh& mesh, const MeshEdges& edges, const BoundaryEdge& edge, int region) {
  const MeshEdge& e = edges.all()[static_cast<size_t>(edges.find(edge.nodes[0], edge.nodes[1]))];
  const int a = region_of(mesh, e.triangles[0]), b = region_of(mesh, e.triangles[1]);
  return a == region ? b : a;
}

bool has_surface_field(BoundaryKind kind) {
  return kind == BoundaryKind::Electrode || kind == BoundaryKind::GroundPlane || kind == BoundaryKind::Interface;
}

}  // namespace

std::vector<std::array<double, 2>> nodal_field(const Mesh& mesh, const Eigen::VectorXd& potential) {
  std::vector<std::array<double, 2>> field(static_cast<size_t>(mesh.n_nodes()), {0.0, 0.0});
  std::vector<int> count(static_cast<size_t>(mesh.n_nodes()), 0);
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* node = mesh.triangle(t);
    for (int i = 0; i < mesh.nodes_per_triangle(); ++i) {
      double xi, eta;
      triangle_node_reference(mesh.order, i, &xi, &eta);
      const Point E = triangle_field(mesh, t, potential.data(), xi, eta);
      auto& sum = field[static_cast<size_t>(node[i])];
      sum[0] += E.r, sum[1] += E.z;
      ++count[static_cast<size_t>(node[i])];
    }
  }
  for (size_t k = 0; k < field.size(); ++k)
    if (count[k] > 0) field[k] = {field[k][0] / count[k], field[k][1] / count[k]};
  return field;
}

std::vector<SurfaceField> surface_fields(const Mesh& mesh, const Eigen::VectorXd& potential) {
  const MeshEdges edges(mesh);
  const std::vector<bool> zero_flux = zero_flux_edges(mesh, edges);

  // (boundary, region seen from) -> field; the map keeps the output in boundary order, then region.
  std::map<std::pair<size_t, int>, SurfaceField> fields;
  for (int region = 0; region < static_cast<int>(mesh.regions.size()); ++region) {
    const std::vector<int> edges_of_outline = flux_outline(mesh, edges, zero_flux, region);
    if (edges_of_outline.empty()) continue;
    const Outline outline{region, outline_residual(mesh, potential, edges, edges_of_outline, region),
                          edges_at_nodes(edges, edges_of_outline)};
    const double eps_r = mesh.regions[static_cast<size_t>(region)].permittivity;
    for (size_t b = 0; b < mesh.boundaries.size(); ++b) {
      const Boundary& boundary = mesh.boundaries[b];
      if (!has_surface_field(boundary.kind)) continue;
      const bool is_conductor = boundary.kind != BoundaryKind::Interface;
      for (const auto& contour : boundary.contours) {
        for (const auto& run : runs_beside(mesh, edges, contour, region)) {
          SurfaceField& field = fields[{b, region}];
          if (field.contours.empty()) {
            field.kind = boundary.kind;
            field.region = region;
            field.conductor = is_conductor ? boundary.conductor : -1;
            field.name = is_conductor ? boundary.name
                                      : mesh.regions[static_cast<size_t>(region)].name + "|" +
                                            mesh.regions[static_cast<size_t>(region_across(mesh, edges, run.front(), region))].name;
          }
          const std::vector<double> flux = run_flux(mesh, potential, edges, outline, run);
          field.contours.push_back(chain_samples(mesh, run, potential, flux, eps_r, is_conductor));
        }
      }
    }
  }
  std::vector<SurfaceField> out;
  for (auto& entry : fields) out.push_back(std::move(entry.second));
  return out;
}

}  // namespace hv
