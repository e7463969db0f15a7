#include "solver/pcg_multigrid.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <numeric>
#include <type_traits>
#include <vector>

#include <Eigen/CholmodSupport>

#include "solver/elements.h"

namespace hv {

using SparseMatrix = Eigen::SparseMatrix<double>;
using RowSparse = Eigen::SparseMatrix<double, Eigen::RowMajor>;
using Block = PMultigridSolver::Block;

struct PMultigridSolver::Coarse {
  RowSparse P;    // free fine nodes x free vertices
  RowSparse P_t;  // its transpose, so that the restriction too runs row by row
  Eigen::CholmodSupernodalLLT<SparseMatrix> factor;
};

namespace {

// ---- The coarse level ------------------------------------------------------------------------

// The vertex nodes of the mesh (the P1 space's nodes): per node its vertex number (-1 for other
// nodes), in node order, and their partition into free and conductor vertices. The free vertices,
// the coarse unknowns, are numbered in the order of their fine free numbers, so that the coarse
// vectors keep the fine level's memory locality.
struct Vertices {
  std::vector<int> number;
  Partition partition;
};

Vertices mesh_vertices(const Mesh& mesh, const Partition& p) {
  Vertices v;
  v.number.assign(static_cast<size_t>(mesh.n_nodes()), -1);
  for (int t = 0; t < mesh.n_triangles(); ++t)
    for (int a = 0; a < 3; ++a) v.number[static_cast<size_t>(mesh.triangle(t)[a])] = 0;
  std::vector<int> conductor, fine_key;
  for (size_t node = 0; node < v.number.size(); ++node) {
    if (v.number[node] < 0) continue;
    v.number[node] = static_cast<int>(conductor.size());
    conductor.push_back(p.conductor[node]);
    fine_key.push_back(p.is_free(static_cast<int>(node)) ? p.index[node] : p.n_free + p.index[node]);
  }
  std::vector<int> sequence(conductor.size());
  std::iota(sequence.begin(), sequence.end(), 0);
  std::sort(sequence.begin(), sequence.end(),
            [&](int a, int b) { return fine_key[static_cast<size_t>(a)] < fine_key[static_cast<size_t>(b)]; });
  v.partition = partition_in_sequence(std::move(conductor), sequence);
  return v;
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
void add_open_boundary(const Mesh& mesh, double far_field_c, const Vertices& vertices, BlockSystem& system) {
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
        add_to_blocks(vertices.partition, vertices.number[static_cast<size_t>(edge.nodes[static_cast<size_t>(u)])],
                      vertices.number[static_cast<size_t>(edge.nodes[static_cast<size_t>(v)])], sum, system);
      }
  }
}

// The stiffness matrix of the three P1 (vertex) functions of curved triangle t, i.e. the block
// P_e^T K_e P_e of the Galerkin product, packed as in ElementSet: each P1 function is the combination
// sum over a of weights[a][u] N_a of the element's shape functions, so its gradient is the same
// combination of theirs, integrated with triangle_stiffness's rule and weight (elements.h).
void p1_stiffness(const Mesh& mesh, int t, const std::vector<std::array<double, 3>>& weights, double* out) {
  const double eps_r = mesh.regions[static_cast<size_t>(mesh.triangle_region[static_cast<size_t>(t)])].permittivity;
  std::fill(out, out + 6, 0.0);
  for (const TrianglePoint& q : triangle_rule(mesh.order)) {
    const TriangleSample s = sample_triangle(mesh, t, q.xi, q.eta);
    double dr[3] = {0, 0, 0}, dz[3] = {0, 0, 0};
    for (int a = 0; a < s.n; ++a)
      for (int u = 0; u < 3; ++u) {
        dr[u] += weights[static_cast<size_t>(a)][static_cast<size_t>(u)] * s.dN_dr[a];
        dz[u] += weights[static_cast<size_t>(a)][static_cast<size_t>(u)] * s.dN_dz[a];
      }
    // eps_r x (axisymmetric volume element 2 pi r |J| dxi deta).
    const double weight = eps_r * 2 * kPi * s.at.r * s.detJ * q.weight;
    for (int u = 0, slot = 0; u < 3; ++u)
      for (int v = u; v < 3; ++v, ++slot) out[slot] += weight * (dr[u] * dr[v] + dz[u] * dz[v]);
  }
}

// The Galerkin coarse matrix P^T K_ff P, assembled element by element as P_e^T K_e P_e over the
// vertices: the rows of P at conductor nodes vanish on the free vertices (a conductor edge's inner
// nodes lie between conductor vertices), so the product over all nodes restricted to the free
// vertices equals the product over the free nodes. Triangles go in the fine rows' order.
SparseMatrix galerkin_coarse_matrix(const Mesh& mesh, const Partition& fine, const Vertices& vertices, double far_field_c) {
  const std::vector<int> order = triangles_in_row_order(mesh, fine);
  std::vector<std::array<double, 3>> weights(static_cast<size_t>(mesh.nodes_per_triangle()));
  for (int a = 0; a < mesh.nodes_per_triangle(); ++a) weights[static_cast<size_t>(a)] = p1_weights(mesh.order, a);
  ElementSet set;
  set.n_nodes = static_cast<int>(vertices.partition.conductor.size());
  set.n_elements = mesh.n_triangles();
  set.per_element = 3;
  set.nodes.resize(static_cast<size_t>(mesh.n_triangles()) * 3);
  set.matrices.resize(static_cast<size_t>(mesh.n_triangles()) * 6);
#pragma omp parallel for schedule(static)
  for (int e = 0; e < mesh.n_triangles(); ++e) {
    const int t = order[static_cast<size_t>(e)];
    for (int a = 0; a < 3; ++a) set.nodes[static_cast<size_t>(e) * 3 + static_cast<size_t>(a)] = vertices.number[static_cast<size_t>(mesh.triangle(t)[a])];
    p1_stiffness(mesh, t, weights, &set.matrices[static_cast<size_t>(e) * 6]);
  }
  BlockSystem system = assemble_element_set(set, vertices.partition);
  if (far_field_c != 0.0) add_open_boundary(mesh, far_field_c, vertices, system);
  return std::move(system.K_ff);
}

// ---- Kernels on row-major blocks ---------------------------------------------------------------
// Each kernel is written once for a block of W columns; W = 0 means "as many as the block has". The
// dispatch below instantiates W = 1..4 (the usual count of conductors), where the compiler unrolls the
// loop over the columns, which the inner loops of every product otherwise pay at each nonzero.

// Calls kernel(std::integral_constant<int, W>) for W = m when 1 <= m <= 4, else for W = 0.
template <class Kernel>
void with_width(Eigen::Index m, Kernel&& kernel) {
  switch (m) {
    case 1: kernel(std::integral_constant<int, 1>()); break;
    case 2: kernel(std::integral_constant<int, 2>()); break;
    case 3: kernel(std::integral_constant<int, 3>()); break;
    case 4: kernel(std::integral_constant<int, 4>()); break;
    default: kernel(std::integral_constant<int, 0>()); break;
  }
}

// A compressed row-wise matrix (CSR; for a symmetric CSC matrix its columns read as rows).
struct Rows {
  const int* outer;
  const int* inner;
  const double* value;
  Eigen::Index n;
};

template <class Matrix>
Rows rows_of(const Matrix& A) {
  return {A.outerIndexPtr(), A.innerIndexPtr(), A.valuePtr(), A.outerSize()};
}

// Y = Y0 - A X for the m columns of row-major blocks (Y0 = nullptr: Y = A X); rows in parallel, each
// one sequential sum, so Y does not depend on the thread count.
template <int W>
void multiply(const Rows& A, const double* X, Eigen::Index m_in, const double* Y0, double* Y) {
  const Eigen::Index m = W > 0 ? W : m_in;
#pragma omp parallel for schedule(static)
  for (Eigen::Index i = 0; i < A.n; ++i) {
    double sum[W > 0 ? W : 64];
    for (Eigen::Index j = 0; j < m; ++j) sum[j] = 0.0;
    for (int k = A.outer[i]; k < A.outer[i + 1]; ++k) {
      const double a = A.value[k];
      const double* x = X + static_cast<Eigen::Index>(A.inner[k]) * m;
      for (Eigen::Index j = 0; j < m; ++j) sum[j] += a * x[j];
    }
    double* y = Y + i * m;
    if (Y0) {
      for (Eigen::Index j = 0; j < m; ++j) y[j] = Y0[i * m + j] - sum[j];
    } else {
      for (Eigen::Index j = 0; j < m; ++j) y[j] = sum[j];
    }
  }
}

void multiply_block(const Rows& A, const double* X, Eigen::Index m, const double* Y0, double* Y) {
  with_width(m, [&](auto width) { multiply<decltype(width)::value>(A, X, m, Y0, Y); });
}

// One Gauss-Seidel sweep on every column, row i: x_i += (b_i - sum over j of a_ij x_j) / a_ii, rows in
// `step` order (+1 forward, -1 backward: the adjoint sweep). Sequential: each row reads the rows
// updated before it.
template <int W>
void gauss_seidel(const Rows& A, const double* inverse_diagonal, const double* B, Eigen::Index m_in, int step, double* X) {
  const Eigen::Index m = W > 0 ? W : m_in;
  for (Eigen::Index r = 0; r < A.n; ++r) {
    const Eigen::Index i = step > 0 ? r : A.n - 1 - r;
    double sum[W > 0 ? W : 64];
    for (Eigen::Index j = 0; j < m; ++j) sum[j] = B[i * m + j];
    for (int k = A.outer[i]; k < A.outer[i + 1]; ++k) {
      const double a = A.value[k];
      const double* x = X + static_cast<Eigen::Index>(A.inner[k]) * m;
      for (Eigen::Index j = 0; j < m; ++j) sum[j] -= a * x[j];
    }
    for (Eigen::Index j = 0; j < m; ++j) X[i * m + j] += sum[j] * inverse_diagonal[i];
  }
}

// The kernels keep a row's partial sums on the stack; beyond this many columns the solve runs in
// groups of columns (see PMultigridSolver::solve).
constexpr Eigen::Index kMaxColumns = 64;

// ---- Deterministic column reductions -------------------------------------------------------------

// Rows per chunk of a reduction: every chunk is summed sequentially, and the chunks' sums are added in
// chunk order, so the result is the same for any number of threads.
constexpr Eigen::Index kChunkRows = 4096;

// Per column j of the blocks: the sum over the rows i of term(i, j).
template <class Term>
std::vector<double> column_sums(Eigen::Index n, Eigen::Index m, Term term) {
  const Eigen::Index chunks = (n + kChunkRows - 1) / kChunkRows;
  std::vector<double> partial(static_cast<size_t>(chunks * m), 0.0);
#pragma omp parallel for schedule(static)
  for (Eigen::Index c = 0; c < chunks; ++c) {
    double* sum = &partial[static_cast<size_t>(c * m)];
    for (Eigen::Index i = c * kChunkRows; i < std::min(n, (c + 1) * kChunkRows); ++i)
      for (Eigen::Index j = 0; j < m; ++j) sum[j] += term(i, j);
  }
  std::vector<double> total(static_cast<size_t>(m), 0.0);
  for (Eigen::Index c = 0; c < chunks; ++c)
    for (Eigen::Index j = 0; j < m; ++j) total[static_cast<size_t>(j)] += partial[static_cast<size_t>(c * m + j)];
  return total;
}

// Per column: sum over the rows of X_ij Y_ij.
std::vector<double> column_dots(const Block& X, const Block& Y) {
  const double* x = X.data();
  const double* y = Y.data();
  const Eigen::Index m = X.cols();
  return column_sums(X.rows(), m, [=](Eigen::Index i, Eigen::Index j) { return x[i * m + j] * y[i * m + j]; });
}

}  // namespace

// ---- The solver -----------------------------------------------------------------------------------

namespace {

SparseMatrix prolongation(const Mesh& mesh, const Partition& p, const Vertices& vertices) {
  const Partition& coarse = vertices.partition;
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
        const int vertex = vertices.number[static_cast<size_t>(nodes[v])];
        if (N[static_cast<size_t>(v)] != 0.0 && coarse.is_free(vertex))
          weights.emplace_back(p.index[static_cast<size_t>(node)], coarse.index[static_cast<size_t>(vertex)], N[static_cast<size_t>(v)]);
      }
    }
  }
  SparseMatrix P(p.n_free, coarse.n_free);
  P.setFromTriplets(weights.begin(), weights.end());
  return P;
}

}  // namespace

SparseMatrix p1_prolongation(const Mesh& mesh, const Partition& p) { return prolongation(mesh, p, mesh_vertices(mesh, p)); }

void symmetric_multiply(const SparseMatrix& A, const Eigen::VectorXd& x, Eigen::VectorXd& y) {
  y.resize(A.rows());
  multiply_block(rows_of(A), x.data(), 1, nullptr, y.data());
}

PMultigridSolver::PMultigridSolver(const Mesh& mesh, const Partition& partition, const SparseMatrix& A, double far_field_c)
    : A_(A), inverse_diagonal_(A.rows()), coarse_(std::make_unique<Coarse>()) {
  for (Eigen::Index i = 0; i < A.outerSize(); ++i) inverse_diagonal_(i) = 1.0 / A.coeff(i, i);
  const Vertices vertices = mesh_vertices(mesh, partition);
  coarse_->P = prolongation(mesh, partition, vertices);
  coarse_->P_t = coarse_->P.transpose();
  // Nested dissection (George, SIAM J. Numer. Anal. 10, 1973; METIS: Karypis & Kumar, SIAM J. Sci.
  // Comput. 20, 1998) keeps a 2D mesh's factor at O(n log n) fill. Measured on the 2e6-unknown
  // benchmark (5e5 coarse unknowns, one thread): nnz(L) 2.4e7, analysis + factorization 5.7 s, against
  // 3.6e7 and 6.4 s with CHOLMOD's default minimum degree (AMD) and 8.7 s with its NESDIS.
  cholmod_common& common = coarse_->factor.cholmod();
  common.nmethods = 1;
  common.method[0].ordering = CHOLMOD_METIS;
  coarse_->factor.compute(galerkin_coarse_matrix(mesh, partition, vertices, far_field_c));
  if (coarse_->factor.info() != Eigen::Success) throw RunError("the coarse (P1) system of the multigrid could not be factorized");
}

PMultigridSolver::~PMultigridSolver() = default;

long long PMultigridSolver::coarse_factor_nonzeros() const {
  return static_cast<long long>(coarse_->factor.cholmod().lnz);
}

void PMultigridSolver::sweep(const Block& B, Block& X, int step) const {
  with_width(X.cols(), [&](auto width) {
    gauss_seidel<decltype(width)::value>(rows_of(A_), inverse_diagonal_.data(), B.data(), X.cols(), step, X.data());
  });
}

// Z = M^-1 R by one V-cycle from Z = 0: pre-smoothing, coarse correction of the residual W = R - A Z,
// post-smoothing.
void PMultigridSolver::precondition(const Block& R, Block& Z, Block& W) const {
  const Eigen::Index m = R.cols();
  Z.setZero(R.rows(), m);
  sweep(R, Z, +1);
  W.resize(R.rows(), m);
  multiply_block(rows_of(A_), Z.data(), m, R.data(), W.data());
  Block coarse_residual(coarse_->P_t.rows(), m);
  multiply_block(rows_of(coarse_->P_t), W.data(), m, nullptr, coarse_residual.data());
  const Block coarse_correction = coarse_->factor.solve(Eigen::MatrixXd(coarse_residual));
  multiply_block(rows_of(coarse_->P), coarse_correction.data(), m, nullptr, W.data());
  Z += W;
  sweep(R, Z, -1);
}

// One CG per column (Hestenes & Stiefel), run in lockstep so that the sweeps, products and coarse
// solves read the matrices once for all columns; each column's arithmetic is its own, and a column
// stops changing once it has converged.
bool PMultigridSolver::solve(const Eigen::MatrixXd& B_in, double tolerance, int max_iterations, Eigen::MatrixXd& X_out) {
  const Eigen::Index n = B_in.rows(), m_all = B_in.cols();
  iterations_ = 0;
  if (m_all <= kMaxColumns) return solve_columns(B_in, tolerance, max_iterations, X_out);
  X_out.resize(n, m_all);
  bool converged = true;
  for (Eigen::Index first = 0; first < m_all; first += kMaxColumns) {
    const Eigen::Index m = std::min(kMaxColumns, m_all - first);
    Eigen::MatrixXd X;
    converged = solve_columns(B_in.middleCols(first, m), tolerance, max_iterations, X) && converged;
    X_out.middleCols(first, m) = X;
  }
  return converged;
}

bool PMultigridSolver::solve_columns(const Eigen::MatrixXd& B_in, double tolerance, int max_iterations, Eigen::MatrixXd& X_out) {
  const Eigen::Index n = B_in.rows(), m = B_in.cols();
  // W holds A P in a CG step and is the V-cycle's workspace in between: one block less in memory.
  Block X = Block::Zero(n, m), R = B_in, Z, W(n, m), P;
  std::vector<double> target(static_cast<size_t>(m));
  std::vector<char> active(static_cast<size_t>(m));
  const std::vector<double> bb = column_dots(R, R);
  for (size_t j = 0; j < target.size(); ++j) {
    target[j] = tolerance * std::sqrt(bb[j]);
    active[j] = target[j] > 0.0;
  }
  const auto n_active = [&] { return std::count(active.begin(), active.end(), 1); };
  precondition(R, Z, W);
  P = Z;
  std::vector<double> rz = column_dots(R, Z), alpha(static_cast<size_t>(m)), beta(static_cast<size_t>(m));
  int k = 0;
  while (n_active() > 0 && k < max_iterations) {
    iterations_ = std::max(iterations_, ++k);
    Block& AP = W;
    multiply_block(rows_of(A_), P.data(), m, nullptr, AP.data());
    const std::vector<double> pAp = column_dots(P, AP);
    for (size_t j = 0; j < alpha.size(); ++j) alpha[j] = active[j] ? rz[j] / pAp[j] : 0.0;
    // x += alpha p, r -= alpha Ap on the active columns, and |r|^2 of the updated residuals.
    const std::vector<double> rr = column_sums(n, m, [&](Eigen::Index i, Eigen::Index j) {
      if (!active[static_cast<size_t>(j)]) return 0.0;
      X(i, j) += alpha[static_cast<size_t>(j)] * P(i, j);
      R(i, j) -= alpha[static_cast<size_t>(j)] * AP(i, j);
      return R(i, j) * R(i, j);
    });
    for (size_t j = 0; j < active.size(); ++j)
      if (active[j] && std::sqrt(rr[j]) <= target[j]) active[j] = 0;
    if (n_active() == 0) break;
    precondition(R, Z, W);
    const std::vector<double> rz_next = column_dots(R, Z);
    for (size_t j = 0; j < beta.size(); ++j) beta[j] = active[j] ? rz_next[j] / rz[j] : 0.0;
#pragma omp parallel for schedule(static)
    for (Eigen::Index i = 0; i < n; ++i)
      for (Eigen::Index j = 0; j < m; ++j)
        if (active[static_cast<size_t>(j)]) P(i, j) = Z(i, j) + beta[static_cast<size_t>(j)] * P(i, j);
    rz = rz_next;
  }
  X_out = X;
  return n_active() == 0;
}

}  // namespace hv
