#include "solver/pcg_multigrid.h"

#include <algorithm>
#include <array>
#include <vector>

#include <Eigen/CholmodSupport>

#include "solver/elements.h"

namespace hv {

using SparseMatrix = Eigen::SparseMatrix<double>;

struct PMultigridSolver::Coarse {
  SparseMatrix P;  // free fine nodes x free vertices
  Eigen::CholmodSupernodalLLT<SparseMatrix> factor;
};

namespace {

using Block = PMultigridSolver::Block;

// The coarse number of every free vertex node (-1 for other nodes), and how many there are.
std::vector<int> coarse_numbers(const Mesh& mesh, const Partition& p, int& n_coarse) {
  std::vector<int> coarse(static_cast<size_t>(mesh.n_nodes()), -1);
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (int a = 0; a < 3; ++a) {
      const int node = mesh.triangle(t)[a];
      if (p.is_free(node)) coarse[static_cast<size_t>(node)] = 0;
    }
  n_coarse = 0;
  for (int& number : coarse)
    if (number == 0) number = n_coarse++;
  return coarse;
}

// The P1 shape functions of the reference triangle at local node a of an element of `order`: the
// element's block of the prolongation, the same for every triangle.
std::array<double, 3> p1_weights(int order, int a) {
  double xi = 0, eta = 0;
  triangle_node_reference(order, a, &xi, &eta);
  return {1 - xi - eta, xi, eta};
}

// The open-boundary term of the coarse level, P_e^T M_e P_e per Open edge: along an edge the P1
// function is linear in t, so its inner node k (of order - 1) takes the end values with weights
// 1 - k / order and k / order.
void add_open_boundary(const Mesh& mesh, double far_field_c, const std::vector<int>& vertex, const Partition& coarse,
                       BlockSystem& system) {
  for (const EdgeMatrix& edge : open_boundary_matrices(mesh, far_field_c)) {
    std::vector<std::array<double, 2>> W(static_cast<size_t>(edge.n));
    for (int a = 0; a < edge.n; ++a) {
      const double t = a == 0 ? 0.0 : a == 1 ? 1.0 : static_cast<double>(a - 1) / mesh.order;
      W[static_cast<size_t>(a)] = {1 - t, t};
    }
    for (int u = 0; u < 2; ++u)
      for (int v = 0; v < 2; ++v) {
        double sum = 0.0;
        for (int a = 0; a < edge.n; ++a)
          for (int b = 0; b < edge.n; ++b) sum += W[static_cast<size_t>(a)][static_cast<size_t>(u)] * edge.M[a][b] * W[static_cast<size_t>(b)][static_cast<size_t>(v)];
        add_to_blocks(coarse, vertex[static_cast<size_t>(edge.nodes[static_cast<size_t>(u)])],
                      vertex[static_cast<size_t>(edge.nodes[static_cast<size_t>(v)])], sum, system);
      }
  }
}

// The Galerkin coarse matrix P^T K_ff P, assembled element by element as P_e^T K_e P_e over the
// vertices: the rows of P at conductor nodes vanish on the free vertices (a conductor edge's inner
// nodes lie between conductor vertices), so the product over all nodes restricted to the free
// vertices equals the product over the free nodes.
SparseMatrix galerkin_coarse_matrix(const Mesh& mesh, const Partition& p, double far_field_c) {
  std::vector<int> vertex(static_cast<size_t>(mesh.n_nodes()), -1);
  std::vector<int> vertex_conductor;
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (int a = 0; a < 3; ++a) {
      const int node = mesh.triangle(t)[a];
      if (vertex[static_cast<size_t>(node)] < 0) vertex[static_cast<size_t>(node)] = 0;
    }
  int n_vertices = 0;
  for (size_t node = 0; node < vertex.size(); ++node)
    if (vertex[node] == 0) {
      vertex[node] = n_vertices++;
      vertex_conductor.push_back(p.conductor[node]);
    }
  std::vector<int> corners(static_cast<size_t>(mesh.n_triangles()) * 3);
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (int a = 0; a < 3; ++a) corners[static_cast<size_t>(t) * 3 + static_cast<size_t>(a)] = vertex[static_cast<size_t>(mesh.triangle(t)[a])];

  const int n = mesh.nodes_per_triangle();
  std::vector<std::array<double, 3>> weights(static_cast<size_t>(n));
  for (int a = 0; a < n; ++a) weights[static_cast<size_t>(a)] = p1_weights(mesh.order, a);
  ElementSet set;
  set.n_nodes = n_vertices;
  set.n_elements = mesh.n_triangles();
  set.per_element = 3;
  set.nodes = corners.data();
  set.matrices.resize(static_cast<size_t>(mesh.n_triangles()) * 6);
#pragma omp parallel for schedule(static)
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    double K[kMaxTriangleNodes * kMaxTriangleNodes];
    triangle_stiffness(mesh, t, K);
    double* out = &set.matrices[static_cast<size_t>(t) * 6];
    for (int u = 0, slot = 0; u < 3; ++u)
      for (int v = u; v < 3; ++v, ++slot) {
        double sum = 0.0;
        for (int a = 0; a < n; ++a)
          for (int b = 0; b < n; ++b) sum += weights[static_cast<size_t>(a)][static_cast<size_t>(u)] * K[a * n + b] * weights[static_cast<size_t>(b)][static_cast<size_t>(v)];
        out[slot] = sum;
      }
  }
  const Partition coarse = partition_by_conductor(std::move(vertex_conductor));
  BlockSystem system = assemble_element_set(set, coarse);
  if (far_field_c != 0.0) add_open_boundary(mesh, far_field_c, vertex, coarse, system);
  return std::move(system.K_ff);
}

// The diagonal of a symmetric matrix with sorted columns.
Eigen::VectorXd diagonal_of(const SparseMatrix& A) {
  Eigen::VectorXd d(A.rows());
  for (Eigen::Index i = 0; i < A.outerSize(); ++i) d(i) = A.coeff(i, i);
  return d;
}

// Y = A X for the m columns of a row-major block: rows in parallel, each a sequential sum.
void multiply_rows(const SparseMatrix& A, const double* X, Eigen::Index m, double* Y) {
  const int* outer = A.outerIndexPtr();
  const int* inner = A.innerIndexPtr();
  const double* value = A.valuePtr();
#pragma omp parallel for schedule(static)
  for (Eigen::Index i = 0; i < A.rows(); ++i) {
    double* y = Y + i * m;
    std::fill(y, y + m, 0.0);
    for (int k = outer[i]; k < outer[i + 1]; ++k)
      for (Eigen::Index j = 0; j < m; ++j) y[j] += value[k] * X[inner[k] * m + j];
  }
}

}  // namespace

SparseMatrix p1_prolongation(const Mesh& mesh, const Partition& p) {
  int n_coarse = 0;
  const std::vector<int> coarse = coarse_numbers(mesh, p, n_coarse);
  std::vector<Eigen::Triplet<double>> weights;
  std::vector<char> done(static_cast<size_t>(mesh.n_nodes()), 0);
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* nodes = mesh.triangle(t);
    for (int a = 0; a < mesh.nodes_per_triangle(); ++a) {
      const int node = nodes[a];
      if (!p.is_free(node) || done[static_cast<size_t>(node)]) continue;
      done[static_cast<size_t>(node)] = 1;
      const std::array<double, 3> N = p1_weights(mesh.order, a);
      for (int v = 0; v < 3; ++v) {
        const int vertex = nodes[v];
        if (N[static_cast<size_t>(v)] != 0.0 && coarse[static_cast<size_t>(vertex)] >= 0)
          weights.emplace_back(p.index[static_cast<size_t>(node)], coarse[static_cast<size_t>(vertex)], N[static_cast<size_t>(v)]);
      }
    }
  }
  SparseMatrix P(p.n_free, n_coarse);
  P.setFromTriplets(weights.begin(), weights.end());
  return P;
}

void symmetric_multiply(const SparseMatrix& A, const Eigen::VectorXd& x, Eigen::VectorXd& y) {
  y.resize(A.rows());
  multiply_rows(A, x.data(), 1, y.data());
}

PMultigridSolver::PMultigridSolver(const Mesh& mesh, const Partition& partition, const SparseMatrix& A, double far_field_c)
    : A_(A), diagonal_(diagonal_of(A)), coarse_(std::make_unique<Coarse>()) {
  coarse_->P = p1_prolongation(mesh, partition);
  coarse_->factor.compute(galerkin_coarse_matrix(mesh, partition, far_field_c));
  if (coarse_->factor.info() != Eigen::Success) throw RunError("the coarse (P1) system of the multigrid could not be factorized");
}

PMultigridSolver::~PMultigridSolver() = default;

long long PMultigridSolver::coarse_factor_nonzeros() const {
  return static_cast<long long>(coarse_->factor.cholmod().lnz);
}

// Gauss-Seidel on every column, row i: x_i += (b_i - sum over j of a_ij x_j) / a_ii, rows in `step`
// order (+1 forward, -1 backward: the adjoint sweep).
void PMultigridSolver::sweep(const Block& B, Block& X, int step) const {
  const int* outer = A_.outerIndexPtr();
  const int* inner = A_.innerIndexPtr();
  const double* value = A_.valuePtr();
  const Eigen::Index m = X.cols(), n = A_.rows();
  std::vector<double> sum(static_cast<size_t>(m));
  for (Eigen::Index r = 0; r < n; ++r) {
    const Eigen::Index i = step > 0 ? r : n - 1 - r;
    for (Eigen::Index j = 0; j < m; ++j) sum[static_cast<size_t>(j)] = B(i, j);
    for (int k = outer[i]; k < outer[i + 1]; ++k) {
      const double* x = X.data() + inner[k] * m;
      for (Eigen::Index j = 0; j < m; ++j) sum[static_cast<size_t>(j)] -= value[k] * x[j];
    }
    for (Eigen::Index j = 0; j < m; ++j) X(i, j) += sum[static_cast<size_t>(j)] / diagonal_(i);
  }
}

// Z = M^-1 R by one V-cycle from Z = 0: pre-smoothing, coarse correction, post-smoothing.
void PMultigridSolver::precondition(const Block& R, Block& Z) const {
  Z.setZero(R.rows(), R.cols());
  sweep(R, Z, +1);
  Block AZ(R.rows(), R.cols());
  multiply_rows(A_, Z.data(), Z.cols(), AZ.data());
  const Eigen::MatrixXd coarse_residual = coarse_->P.transpose() * (R - AZ);
  Z += coarse_->P * coarse_->factor.solve(coarse_residual);
  sweep(R, Z, -1);
}

// One CG per column (Hestenes & Stiefel), run in lockstep so that the sweeps, products and coarse
// solves read the matrices once for all columns; each column's arithmetic is its own.
bool PMultigridSolver::solve(const Eigen::MatrixXd& B_in, double tolerance, int max_iterations, Eigen::MatrixXd& X_out) {
  const Eigen::Index n = B_in.rows(), m = B_in.cols();
  const Block B = B_in;
  Block X = Block::Zero(n, m), R = B, Z, P, AP(n, m);
  std::vector<double> target(static_cast<size_t>(m)), rz(static_cast<size_t>(m));
  std::vector<char> active(static_cast<size_t>(m));
  for (Eigen::Index j = 0; j < m; ++j) {
    target[static_cast<size_t>(j)] = tolerance * B.col(j).norm();
    active[static_cast<size_t>(j)] = target[static_cast<size_t>(j)] > 0.0;
  }
  precondition(R, Z);
  P = Z;
  for (Eigen::Index j = 0; j < m; ++j) rz[static_cast<size_t>(j)] = R.col(j).dot(Z.col(j));
  iterations_ = 0;
  for (int k = 1; k <= max_iterations && std::count(active.begin(), active.end(), 1) > 0; ++k) {
    iterations_ = k;
    multiply_rows(A_, P.data(), m, AP.data());
    for (Eigen::Index j = 0; j < m; ++j) {
      if (!active[static_cast<size_t>(j)]) continue;
      const double alpha = rz[static_cast<size_t>(j)] / P.col(j).dot(AP.col(j));
      X.col(j) += alpha * P.col(j);
      R.col(j) -= alpha * AP.col(j);
      if (R.col(j).norm() <= target[static_cast<size_t>(j)]) active[static_cast<size_t>(j)] = 0;
    }
    if (std::count(active.begin(), active.end(), 1) == 0) break;
    precondition(R, Z);
    for (Eigen::Index j = 0; j < m; ++j) {
      if (!active[static_cast<size_t>(j)]) continue;
      const double rz_next = R.col(j).dot(Z.col(j));
      P.col(j) = Z.col(j) + (rz_next / rz[static_cast<size_t>(j)]) * P.col(j);
      rz[static_cast<size_t>(j)] = rz_next;
    }
  }
  X_out = X;
  return std::count(active.begin(), active.end(), 1) == 0;
}

}  // namespace hv
