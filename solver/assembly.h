// Assembly of the axisymmetric system straight into the blocks the solve needs, without an n x n
// triplet list or a full-matrix copy: K_ff (free x free) for the unknowns, K_fd (free x fixed) for
// the right-hand sides, and the rows K_d of the fixed (conductor) nodes for charges and energy.
// The sparsity pattern comes from the mesh (two nodes couple when a triangle holds both). Element
// matrices are computed in parallel; every matrix row is then summed by one thread in element order,
// so the result is bit-for-bit the same for any number of threads.
#pragma once

#include <array>
#include <vector>

#include <Eigen/SparseCore>

#include "mesh/mesh.h"

namespace hv {

// Nodes split into free unknowns and fixed (conductor) values, each numbered from 0 (partition_nodes:
// along a Hilbert curve through the nodes' positions; the others: in node order).
struct Partition {
  std::vector<int> index;      // per node: its number among the free or among the fixed nodes
  std::vector<int> conductor;  // per node, -1 when free
  int n_free = 0, n_fixed = 0;
  bool is_free(int node) const { return conductor[static_cast<size_t>(node)] < 0; }
};

// The conductor of every node from the mesh's electrode and ground-plane boundaries. A node where
// two conductors meet (a box corner) belongs to the one whose boundary comes first in the mesh.
// Free and fixed nodes are each numbered in the order a Hilbert curve visits them, so that the rows of
// K_ff that couple lie near each other in memory (the iterative solve reads them row by row).
// Throws RunError when no node is fixed or none is free.
Partition partition_nodes(const Mesh& mesh, int n_conductors);

// Every node free: the blocks then hold the whole matrix in K_ff.
Partition all_nodes_free(const Mesh& mesh);

// The partition of nodes 0..conductor.size()-1 given each node's conductor (-1: free), numbering
// free and fixed nodes each in node order.
Partition partition_by_conductor(std::vector<int> conductor);

// The same, numbering in the order of `sequence` (every node once).
Partition partition_in_sequence(std::vector<int> conductor, const std::vector<int>& sequence);

struct BlockSystem {
  // Symmetric with both triangles stored, so column j also reads as row j (CSC = CSR).
  Eigen::SparseMatrix<double> K_ff;
  Eigen::SparseMatrix<double, Eigen::RowMajor> K_fd;  // free rows, fixed columns
  Eigen::SparseMatrix<double, Eigen::RowMajor> K_d;   // fixed rows, columns over all nodes
};

// The blocks of K_ij = integral of eps_r grad(N_i) . grad(N_j) 2 pi r dr dz
//                     + integral over the Open boundaries of eps_r (c / R) N_i N_j 2 pi r ds
// (without eps0), with c = far_field_c and R the distance from mesh.open_center.
BlockSystem assemble_blocks(const Mesh& mesh, double far_field_c, const Partition& partition);

// Elements of any kind over nodes 0..n_nodes-1: `per_element` node numbers each (`nodes` holds
// n_elements x per_element of them) and each element's symmetric matrix, its upper triangle packed
// row by row (`matrices`, (per_element + 1) per_element / 2 values each).
struct ElementSet {
  int n_nodes = 0;
  int n_elements = 0;
  int per_element = 0;
  std::vector<int> nodes;
  std::vector<double> matrices;
};

// The blocks of the sum of the element matrices, summed row by row in element order. Elements listed
// in the order of triangles_in_row_order make the assembly read memory locally.
BlockSystem assemble_element_set(const ElementSet& elements, const Partition& partition);

// The mesh's triangles ordered by the first matrix row (free rows, then fixed rows, as numbered by
// `partition`) among their nodes.
std::vector<int> triangles_in_row_order(const Mesh& mesh, const Partition& partition);

// The open-boundary matrix of one Open edge: eps_r (c / R) integral of N_i N_j 2 pi r ds over its
// nodes (BoundaryEdge order: end nodes, then inner nodes).
struct EdgeMatrix {
  std::array<int, kMaxEdgeNodes> nodes{};
  int n = 0;
  double M[kMaxEdgeNodes][kMaxEdgeNodes] = {};
};
std::vector<EdgeMatrix> open_boundary_matrices(const Mesh& mesh, double far_field_c);

// Adds `value` at (node i, node j) to the block that holds it; the entry must lie in the pattern.
void add_to_blocks(const Partition& partition, int i, int j, double value, BlockSystem& system);

}  // namespace hv
