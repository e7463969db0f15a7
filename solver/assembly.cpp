#include "solver/assembly.h"

#include <algorithm>
#include <cmath>
#include <string>

#include "solver/elements.h"
#include "solver/mesh_edges.h"

namespace hv {

namespace {

// The elements at each node, in ascending order (a compressed incidence list).
struct NodeElements {
  std::vector<int> start;    // per node, then one past the end
  std::vector<int> element;  // element numbers, node by node
};

const int* element_nodes(const ElementSet& set, int e) { return set.nodes + static_cast<size_t>(e) * static_cast<size_t>(set.per_element); }

NodeElements node_elements(const ElementSet& set) {
  NodeElements incidence;
  incidence.start.assign(static_cast<size_t>(set.n_nodes) + 1, 0);
  const size_t total = static_cast<size_t>(set.n_elements) * static_cast<size_t>(set.per_element);
  for (size_t k = 0; k < total; ++k) ++incidence.start[static_cast<size_t>(set.nodes[k]) + 1];
  for (size_t k = 1; k < incidence.start.size(); ++k) incidence.start[k] += incidence.start[k - 1];
  incidence.element.resize(total);
  std::vector<int> next(incidence.start.begin(), incidence.start.end() - 1);
  for (int e = 0; e < set.n_elements; ++e)
    for (int a = 0; a < set.per_element; ++a) incidence.element[static_cast<size_t>(next[static_cast<size_t>(element_nodes(set, e)[a])]++)] = e;
  return incidence;
}

// Position of (a, b) in the packed upper triangle of a symmetric n x n matrix.
int packed(int a, int b, int n) {
  if (a > b) std::swap(a, b);
  return a * n - a * (a - 1) / 2 + (b - a);
}

// The element stiffness matrices of all triangles, computed in parallel (each triangle writes only
// its own slots).
ElementSet triangle_set(const Mesh& mesh) {
  ElementSet set;
  set.n_nodes = mesh.n_nodes();
  set.n_elements = mesh.n_triangles();
  set.per_element = mesh.nodes_per_triangle();
  set.nodes = mesh.triangles.data();
  const int n = set.per_element;
  const size_t stride = static_cast<size_t>(n * (n + 1) / 2);
  set.matrices.resize(static_cast<size_t>(mesh.n_triangles()) * stride);
#pragma omp parallel for schedule(static)
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    double K[kMaxTriangleNodes * kMaxTriangleNodes];
    triangle_stiffness(mesh, t, K);
    double* out = &set.matrices[static_cast<size_t>(t) * stride];
    for (int a = 0; a < n; ++a)
      for (int b = a; b < n; ++b) out[packed(a, b, n)] = K[a * n + b];
  }
  return set;
}

// The nodes coupled to `node` (itself included), ascending.
void coupled_nodes(const ElementSet& set, const NodeElements& incidence, int node, std::vector<int>& out) {
  out.clear();
  for (int k = incidence.start[static_cast<size_t>(node)]; k < incidence.start[static_cast<size_t>(node) + 1]; ++k) {
    const int* nodes = element_nodes(set, incidence.element[static_cast<size_t>(k)]);
    out.insert(out.end(), nodes, nodes + set.per_element);
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
}

// Row sums of the element matrices for `node`, aligned with `columns`, in ascending element order.
void row_values(const ElementSet& set, const NodeElements& incidence, int node, const std::vector<int>& columns,
                std::vector<double>& values) {
  const int n = set.per_element;
  const size_t stride = static_cast<size_t>(n * (n + 1) / 2);
  values.assign(columns.size(), 0.0);
  for (int k = incidence.start[static_cast<size_t>(node)]; k < incidence.start[static_cast<size_t>(node) + 1]; ++k) {
    const int e = incidence.element[static_cast<size_t>(k)];
    const int* nodes = element_nodes(set, e);
    const int a = static_cast<int>(std::find(nodes, nodes + n, node) - nodes);
    const double* Ke = &set.matrices[static_cast<size_t>(e) * stride];
    for (int b = 0; b < n; ++b) {
      const size_t position = static_cast<size_t>(std::lower_bound(columns.begin(), columns.end(), nodes[b]) - columns.begin());
      values[position] += Ke[packed(a, b, n)];
    }
  }
}

// Sizes a compressed sparse matrix and installs its outer index array.
template <class Matrix>
void shape(Matrix& matrix, int rows, int cols, const std::vector<int>& outer) {
  matrix.resize(rows, cols);
  matrix.resizeNonZeros(outer.back());
  std::copy(outer.begin(), outer.end(), matrix.outerIndexPtr());
}

void prefix_sum(std::vector<int>& counts) {
  for (size_t k = 1; k < counts.size(); ++k) counts[k] += counts[k - 1];
}

// The block rows: pass 1 counts the entries of every row, pass 2 fills columns and values.
void assemble_rows(const ElementSet& set, const Partition& p, BlockSystem& system) {
  const NodeElements incidence = node_elements(set);
  std::vector<int> ff(static_cast<size_t>(p.n_free) + 1, 0), fd(ff.size(), 0), d(static_cast<size_t>(p.n_fixed) + 1, 0);
#pragma omp parallel
  {
    std::vector<int> columns;
#pragma omp for schedule(static)
    for (int node = 0; node < set.n_nodes; ++node) {
      coupled_nodes(set, incidence, node, columns);
      const size_t row = static_cast<size_t>(p.index[static_cast<size_t>(node)]) + 1;
      if (!p.is_free(node)) {
        d[row] = static_cast<int>(columns.size());
        continue;
      }
      const auto n_free = std::count_if(columns.begin(), columns.end(), [&](int c) { return p.is_free(c); });
      ff[row] = static_cast<int>(n_free);
      fd[row] = static_cast<int>(columns.size()) - ff[row];
    }
  }
  prefix_sum(ff);
  prefix_sum(fd);
  prefix_sum(d);
  shape(system.K_ff, p.n_free, p.n_free, ff);
  shape(system.K_fd, p.n_free, p.n_fixed, fd);
  shape(system.K_d, p.n_fixed, set.n_nodes, d);

#pragma omp parallel
  {
    std::vector<int> columns;
    std::vector<double> values;
#pragma omp for schedule(static)
    for (int node = 0; node < set.n_nodes; ++node) {
      coupled_nodes(set, incidence, node, columns);
      row_values(set, incidence, node, columns, values);
      const size_t row = static_cast<size_t>(p.index[static_cast<size_t>(node)]);
      int next_ff = p.is_free(node) ? ff[row] : 0, next_fd = p.is_free(node) ? fd[row] : 0;
      for (size_t k = 0; k < columns.size(); ++k) {
        const int col = columns[k];
        if (!p.is_free(node)) {
          system.K_d.innerIndexPtr()[d[row] + static_cast<int>(k)] = col;
          system.K_d.valuePtr()[d[row] + static_cast<int>(k)] = values[k];
        } else if (p.is_free(col)) {
          system.K_ff.innerIndexPtr()[next_ff] = p.index[static_cast<size_t>(col)];
          system.K_ff.valuePtr()[next_ff++] = values[k];
        } else {
          system.K_fd.innerIndexPtr()[next_fd] = p.index[static_cast<size_t>(col)];
          system.K_fd.valuePtr()[next_fd++] = values[k];
        }
      }
    }
  }
}

// The stored entry (row, col) of a compressed matrix whose pattern holds it.
template <class Matrix>
double& entry(Matrix& matrix, int row, int col) {
  const int* begin = matrix.innerIndexPtr() + matrix.outerIndexPtr()[row];
  const int* end = matrix.innerIndexPtr() + matrix.outerIndexPtr()[row + 1];
  const int* found = std::lower_bound(begin, end, col);
  if (found == end || *found != col) throw RunError("assembly: an entry lies outside the mesh's sparsity pattern");
  return matrix.valuePtr()[found - matrix.innerIndexPtr()];
}

}  // namespace

void add_to_blocks(const Partition& p, int i, int j, double value, BlockSystem& system) {
  const int row = p.index[static_cast<size_t>(i)], col = p.index[static_cast<size_t>(j)];
  if (!p.is_free(i)) entry(system.K_d, row, j) += value;
  else if (p.is_free(j)) entry(system.K_ff, row, col) += value;
  else entry(system.K_fd, row, col) += value;
}

// The weak form of the asymptotic condition du/dn + c u / R = 0 (Bayliss, Gunzburger & Turkel, SIAM
// J. Appl. Math. 42, 1982) on every Open edge, with eps_r of the region beside the edge.
std::vector<EdgeMatrix> open_boundary_matrices(const Mesh& mesh, double far_field_c) {
  std::vector<EdgeMatrix> matrices;
  const MeshEdges edges(mesh);
  for (const Boundary& boundary : mesh.boundaries) {
    if (boundary.kind != BoundaryKind::Open) continue;
    for (const auto& contour : boundary.contours) {
      for (const BoundaryEdge& edge : contour) {
        const int found = edges.find(edge.nodes[0], edge.nodes[1]);
        if (found < 0) throw RunError("open boundary edge is not a side of any triangle of the mesh");
        const int triangle = edges.all()[static_cast<size_t>(found)].triangles[0];
        const double eps_r = mesh.regions[static_cast<size_t>(mesh.triangle_region[static_cast<size_t>(triangle)])].permittivity;
        EdgeMatrix matrix;
        matrix.nodes = edge.nodes;
        for (const EdgePoint& q : edge_rule(mesh.order)) {
          const EdgeSample s = sample_edge(mesh, edge, q.t);
          matrix.n = s.n;
          const double R = std::hypot(s.at.r - mesh.open_center.r, s.at.z - mesh.open_center.z);
          // eps_r (c / R) x (axisymmetric surface element 2 pi r ds).
          const double weight = eps_r * far_field_c / R * 2 * kPi * s.at.r * s.ds_dt * q.weight;
          for (int i = 0; i < s.n; ++i)
            for (int j = 0; j < s.n; ++j) matrix.M[i][j] += weight * s.N[i] * s.N[j];
        }
        matrices.push_back(matrix);
      }
    }
  }
  return matrices;
}

namespace {

// Every Open edge is a triangle side, so its entries lie in the pattern; they are added one edge
// after another, in mesh order.
void assemble_open_boundary(const Mesh& mesh, double far_field_c, const Partition& p, BlockSystem& system) {
  for (const EdgeMatrix& edge : open_boundary_matrices(mesh, far_field_c))
    for (int i = 0; i < edge.n; ++i)
      for (int j = 0; j < edge.n; ++j)
        add_to_blocks(p, edge.nodes[static_cast<size_t>(i)], edge.nodes[static_cast<size_t>(j)], edge.M[i][j], system);
}

// The conductor each node lies on, or -1 for a free node.
std::vector<int> conductor_of_nodes(const Mesh& mesh, int n_conductors) {
  std::vector<int> conductor(static_cast<size_t>(mesh.n_nodes()), -1);
  for (const Boundary& boundary : mesh.boundaries) {
    if (boundary.kind != BoundaryKind::Electrode && boundary.kind != BoundaryKind::GroundPlane) continue;
    if (boundary.conductor < 0 || boundary.conductor >= n_conductors)
      throw RunError("mesh boundary '" + boundary.name + "' names conductor " + std::to_string(boundary.conductor) +
                     ", but the problem has " + std::to_string(n_conductors) + " conductors");
    for (const auto& contour : boundary.contours)
      for (const BoundaryEdge& edge : contour)
        for (int node : edge.nodes)
          if (node >= 0 && conductor[static_cast<size_t>(node)] < 0) conductor[static_cast<size_t>(node)] = boundary.conductor;
  }
  return conductor;
}

}  // namespace

Partition partition_by_conductor(std::vector<int> conductor) {
  Partition p;
  p.conductor = std::move(conductor);
  p.index.resize(p.conductor.size());
  for (size_t node = 0; node < p.conductor.size(); ++node) p.index[node] = p.conductor[node] < 0 ? p.n_free++ : p.n_fixed++;
  return p;
}

Partition partition_nodes(const Mesh& mesh, int n_conductors) {
  Partition p = partition_by_conductor(conductor_of_nodes(mesh, n_conductors));
  if (p.n_fixed == 0) throw RunError("the mesh has no conductor surface: nothing fixes the potential");
  if (p.n_free == 0) throw RunError("the mesh has no free node: every node lies on a conductor");
  return p;
}

Partition all_nodes_free(const Mesh& mesh) {
  return partition_by_conductor(std::vector<int>(static_cast<size_t>(mesh.n_nodes()), -1));
}

BlockSystem assemble_element_set(const ElementSet& elements, const Partition& partition) {
  BlockSystem system;
  assemble_rows(elements, partition, system);
  return system;
}

BlockSystem assemble_blocks(const Mesh& mesh, double far_field_c, const Partition& partition) {
  BlockSystem system = assemble_element_set(triangle_set(mesh), partition);
  if (far_field_c != 0.0) assemble_open_boundary(mesh, far_field_c, partition, system);
  return system;
}

}  // namespace hv
