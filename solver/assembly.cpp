#include "solver/assembly.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <string>
#include <tuple>

#include "solver/elements.h"
#include "solver/mesh_edges.h"

namespace hv {

namespace {

// The elements at each row, in ascending order (a compressed incidence list).
struct RowElements {
  std::vector<int> start;    // per row, then one past the end
  std::vector<int> element;  // element numbers, row by row
};

// The elements' nodes relabelled by their rows (see row_numbers): the assembly then reads, for
// consecutive rows, entries that lie near each other in memory.
struct ElementRows {
  int per_element = 0;
  std::vector<int> rows;
  const int* of(int e) const { return &rows[static_cast<size_t>(e) * static_cast<size_t>(per_element)]; }
};

// Per node, its row in the free-then-fixed order: the free number, or n_free + the fixed number. In
// this numbering a free row's columns are K_ff's (below n_free) followed by K_fd's.
std::vector<int> row_numbers(const Partition& p) {
  std::vector<int> row(p.conductor.size());
  for (size_t node = 0; node < p.conductor.size(); ++node)
    row[node] = p.is_free(static_cast<int>(node)) ? p.index[node] : p.n_free + p.index[node];
  return row;
}

ElementRows element_rows(const ElementSet& set, const std::vector<int>& row) {
  ElementRows elements;
  elements.per_element = set.per_element;
  elements.rows.resize(set.nodes.size());
  for (size_t k = 0; k < set.nodes.size(); ++k) elements.rows[k] = row[static_cast<size_t>(set.nodes[k])];
  return elements;
}

RowElements row_elements(const ElementRows& elements, int n_rows) {
  RowElements incidence;
  incidence.start.assign(static_cast<size_t>(n_rows) + 1, 0);
  for (int r : elements.rows) ++incidence.start[static_cast<size_t>(r) + 1];
  for (size_t k = 1; k < incidence.start.size(); ++k) incidence.start[k] += incidence.start[k - 1];
  incidence.element.resize(elements.rows.size());
  std::vector<int> next(incidence.start.begin(), incidence.start.end() - 1);
  for (size_t k = 0; k < elements.rows.size(); ++k)
    incidence.element[static_cast<size_t>(next[static_cast<size_t>(elements.rows[k])]++)] = static_cast<int>(k) / elements.per_element;
  return incidence;
}

// Position of (a, b) in the packed upper triangle of a symmetric n x n matrix.
int packed(int a, int b, int n) {
  if (a > b) std::swap(a, b);
  return a * n - a * (a - 1) / 2 + (b - a);
}

// The triangles of the mesh ordered by the first row (partition_nodes numbering) among their nodes,
// so that the triangles around consecutive rows lie near each other in memory too.
std::vector<int> triangles_in_row_order(const Mesh& mesh, const std::vector<int>& row) {
  std::vector<std::pair<int, int>> first_row(static_cast<size_t>(mesh.n_triangles()));
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* nodes = mesh.triangle(t);
    int first = row[static_cast<size_t>(nodes[0])];
    for (int a = 1; a < mesh.nodes_per_triangle(); ++a) first = std::min(first, row[static_cast<size_t>(nodes[a])]);
    first_row[static_cast<size_t>(t)] = {first, t};
  }
  std::sort(first_row.begin(), first_row.end());
  std::vector<int> order(first_row.size());
  for (size_t k = 0; k < order.size(); ++k) order[k] = first_row[k].second;
  return order;
}

// The element stiffness matrices of the triangles in `order`, computed in parallel (each triangle
// writes only its own slots).
ElementSet triangle_set(const Mesh& mesh, const std::vector<int>& order) {
  ElementSet set;
  set.n_nodes = mesh.n_nodes();
  set.n_elements = mesh.n_triangles();
  set.per_element = mesh.nodes_per_triangle();
  const int n = set.per_element;
  const size_t stride = static_cast<size_t>(n * (n + 1) / 2);
  set.nodes.resize(mesh.triangles.size());
  set.matrices.resize(static_cast<size_t>(mesh.n_triangles()) * stride);
#pragma omp parallel for schedule(static)
  for (int e = 0; e < set.n_elements; ++e) {
    const int t = order[static_cast<size_t>(e)];
    std::copy(mesh.triangle(t), mesh.triangle(t) + n, &set.nodes[static_cast<size_t>(e) * static_cast<size_t>(n)]);
    double K[kMaxTriangleNodes * kMaxTriangleNodes];
    triangle_stiffness(mesh, t, K);
    double* out = &set.matrices[static_cast<size_t>(e) * stride];
    for (int a = 0; a < n; ++a)
      for (int b = a; b < n; ++b) out[packed(a, b, n)] = K[a * n + b];
  }
  return set;
}

// One thread's scratch for building rows: the row's columns (as rows) and, per row number, where it
// sits in the current row (`position`) and which row saw it last (`seen_by`), so that merging the
// elements' nodes into a row and finding an entry's place take constant time instead of a search.
struct RowScratch {
  std::vector<int> columns, position, seen_by;
  std::vector<double> values;
  explicit RowScratch(size_t n_rows) : position(n_rows), seen_by(n_rows, -1) {}
};

// The rows coupled to row r (itself included), ascending.
void coupled_columns(const ElementRows& elements, const RowElements& incidence, int r, RowScratch& row) {
  row.columns.clear();
  for (int k = incidence.start[static_cast<size_t>(r)]; k < incidence.start[static_cast<size_t>(r) + 1]; ++k) {
    const int* rows = elements.of(incidence.element[static_cast<size_t>(k)]);
    for (int a = 0; a < elements.per_element; ++a) {
      if (row.seen_by[static_cast<size_t>(rows[a])] == r) continue;
      row.seen_by[static_cast<size_t>(rows[a])] = r;
      row.columns.push_back(rows[a]);
    }
  }
  std::sort(row.columns.begin(), row.columns.end());
}

// Row sums of the element matrices for row r, aligned with its columns (coupled_columns first), in
// ascending element order.
void row_values(const ElementSet& set, const ElementRows& elements, const RowElements& incidence, int r, RowScratch& row) {
  const int n = set.per_element;
  const size_t stride = static_cast<size_t>(n * (n + 1) / 2);
  for (size_t k = 0; k < row.columns.size(); ++k) row.position[static_cast<size_t>(row.columns[k])] = static_cast<int>(k);
  row.values.assign(row.columns.size(), 0.0);
  for (int k = incidence.start[static_cast<size_t>(r)]; k < incidence.start[static_cast<size_t>(r) + 1]; ++k) {
    const int e = incidence.element[static_cast<size_t>(k)];
    const int* rows = elements.of(e);
    const int a = static_cast<int>(std::find(rows, rows + n, r) - rows);
    const double* Ke = &set.matrices[static_cast<size_t>(e) * stride];
    for (int b = 0; b < n; ++b) row.values[static_cast<size_t>(row.position[static_cast<size_t>(rows[b])])] += Ke[packed(a, b, n)];
  }
}

// A fixed row's entries with its columns turned into node numbers (K_d spans all nodes in node
// order), sorted by node.
void to_node_columns(const std::vector<int>& node_of_row, RowScratch& row) {
  std::vector<std::pair<int, double>> entries(row.columns.size());
  for (size_t k = 0; k < entries.size(); ++k) entries[k] = {node_of_row[static_cast<size_t>(row.columns[k])], row.values[k]};
  std::sort(entries.begin(), entries.end());
  for (size_t k = 0; k < entries.size(); ++k) std::tie(row.columns[k], row.values[k]) = entries[k];
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

// The block rows, in the free-then-fixed row order (row_numbers): pass 1 counts the entries of every
// row, pass 2 fills columns and values.
void assemble_rows(const ElementSet& set, const Partition& p, BlockSystem& system) {
  const std::vector<int> row_of_node = row_numbers(p);
  std::vector<int> node_of_row(row_of_node.size());
  for (size_t node = 0; node < row_of_node.size(); ++node) node_of_row[static_cast<size_t>(row_of_node[node])] = static_cast<int>(node);
  const ElementRows elements = element_rows(set, row_of_node);
  const RowElements incidence = row_elements(elements, set.n_nodes);
  std::vector<int> ff(static_cast<size_t>(p.n_free) + 1, 0), fd(ff.size(), 0), d(static_cast<size_t>(p.n_fixed) + 1, 0);
#pragma omp parallel
  {
    RowScratch row(static_cast<size_t>(set.n_nodes));
#pragma omp for schedule(static)
    for (int r = 0; r < set.n_nodes; ++r) {
      coupled_columns(elements, incidence, r, row);
      const int n_columns = static_cast<int>(row.columns.size());
      if (r >= p.n_free) {
        d[static_cast<size_t>(r - p.n_free) + 1] = n_columns;
        continue;
      }
      ff[static_cast<size_t>(r) + 1] = static_cast<int>(std::lower_bound(row.columns.begin(), row.columns.end(), p.n_free) - row.columns.begin());
      fd[static_cast<size_t>(r) + 1] = n_columns - ff[static_cast<size_t>(r) + 1];
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
    RowScratch row(static_cast<size_t>(set.n_nodes));
#pragma omp for schedule(static)
    for (int r = 0; r < set.n_nodes; ++r) {
      coupled_columns(elements, incidence, r, row);
      row_values(set, elements, incidence, r, row);
      if (r >= p.n_free) {
        to_node_columns(node_of_row, row);
        const int start = d[static_cast<size_t>(r - p.n_free)];
        std::copy(row.columns.begin(), row.columns.end(), system.K_d.innerIndexPtr() + start);
        std::copy(row.values.begin(), row.values.end(), system.K_d.valuePtr() + start);
        continue;
      }
      int next_ff = ff[static_cast<size_t>(r)], next_fd = fd[static_cast<size_t>(r)];
      for (size_t k = 0; k < row.columns.size(); ++k) {
        const int col = row.columns[k];
        if (col < p.n_free) {
          system.K_ff.innerIndexPtr()[next_ff] = col;
          system.K_ff.valuePtr()[next_ff++] = row.values[k];
        } else {
          system.K_fd.innerIndexPtr()[next_fd] = col - p.n_free;
          system.K_fd.valuePtr()[next_fd++] = row.values[k];
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
  const bool has_open = std::any_of(mesh.boundaries.begin(), mesh.boundaries.end(),
                                    [](const Boundary& b) { return b.kind == BoundaryKind::Open; });
  if (!has_open) return matrices;  // a closed domain: spare building the edge table of the whole mesh
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

// Where the cell (x, y) of a 2^16 x 2^16 grid lies along the Hilbert curve (Hilbert, Math. Ann. 38,
// 1891), by the quadrant-by-quadrant descent with rotation and reflection of the sub-square
// (Warren, Hacker's Delight, 2nd ed., 2012, ch. 16).
std::uint64_t hilbert_position(std::uint32_t x, std::uint32_t y) {
  constexpr std::uint32_t kSide = 1u << 16;
  std::uint64_t position = 0;
  for (std::uint32_t half = kSide / 2; half > 0; half /= 2) {
    const std::uint32_t right = (x & half) ? 1 : 0, upper = (y & half) ? 1 : 0;
    position += static_cast<std::uint64_t>(half) * half * ((3 * right) ^ upper);
    if (upper == 0) {
      if (right == 1) {
        x = kSide - 1 - x;
        y = kSide - 1 - y;
      }
      std::swap(x, y);
    }
  }
  return position;
}

// The nodes in the order a Hilbert curve through the mesh's bounding box visits them (ties in node
// order). Unknowns numbered so lie near each other in memory when they are near in space, so matrix
// rows read their neighbours from cache: the mesher's numbering puts most couplings 1e5 rows apart.
std::vector<int> hilbert_sequence(const Mesh& mesh) {
  double r_min = 0, r_max = 0, z_min = 0, z_max = 0;
  for (size_t k = 0; k < mesh.nodes.size(); ++k) {
    const Point& at = mesh.nodes[k];
    if (k == 0 || at.r < r_min) r_min = at.r;
    if (k == 0 || at.r > r_max) r_max = at.r;
    if (k == 0 || at.z < z_min) z_min = at.z;
    if (k == 0 || at.z > z_max) z_max = at.z;
  }
  const double scale = 65535.0 / std::max({r_max - r_min, z_max - z_min, 1e-300});
  std::vector<std::pair<std::uint64_t, int>> keyed(mesh.nodes.size());
  for (size_t k = 0; k < mesh.nodes.size(); ++k) {
    const Point& at = mesh.nodes[k];
    keyed[k] = {hilbert_position(static_cast<std::uint32_t>((at.r - r_min) * scale), static_cast<std::uint32_t>((at.z - z_min) * scale)),
                static_cast<int>(k)};
  }
  std::sort(keyed.begin(), keyed.end());
  std::vector<int> sequence(keyed.size());
  for (size_t k = 0; k < keyed.size(); ++k) sequence[k] = keyed[k].second;
  return sequence;
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

Partition partition_in_sequence(std::vector<int> conductor, const std::vector<int>& sequence) {
  Partition p;
  p.conductor = std::move(conductor);
  p.index.resize(p.conductor.size());
  for (int node : sequence) p.index[static_cast<size_t>(node)] = p.is_free(node) ? p.n_free++ : p.n_fixed++;
  return p;
}

Partition partition_by_conductor(std::vector<int> conductor) {
  std::vector<int> sequence(conductor.size());
  std::iota(sequence.begin(), sequence.end(), 0);
  return partition_in_sequence(std::move(conductor), sequence);
}

Partition partition_nodes(const Mesh& mesh, int n_conductors) {
  Partition p = partition_in_sequence(conductor_of_nodes(mesh, n_conductors), hilbert_sequence(mesh));
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

std::vector<int> triangles_in_row_order(const Mesh& mesh, const Partition& partition) {
  return triangles_in_row_order(mesh, row_numbers(partition));
}

BlockSystem assemble_blocks(const Mesh& mesh, double far_field_c, const Partition& partition) {
  BlockSystem system = assemble_element_set(triangle_set(mesh, triangles_in_row_order(mesh, partition)), partition);
  if (far_field_c != 0.0) assemble_open_boundary(mesh, far_field_c, partition, system);
  return system;
}

}  // namespace hv
