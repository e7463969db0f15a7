#include "solver/field_solver.h"

#include <algorithm>
#include <chrono>
#include <cmath>

#include <Eigen/CholmodSupport>
#include <Eigen/Dense>
#include <Eigen/SparseCholesky>

#include "solver/elements.h"
#include "solver/mesh_edges.h"

namespace hv {

namespace {

using SparseMatrix = Eigen::SparseMatrix<double>;
using Triplet = Eigen::Triplet<double>;

// A direct solve of an SPD system leaves a relative residual near round-off (~1e-14); a larger one
// means the factorization was inaccurate (an ill-conditioned, e.g. badly distorted, mesh).
constexpr double kResidualLimit = 1e-8;

double seconds_since(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

// The volume term of every triangle, as triplets in element order. Elements are independent, so
// the loop runs in parallel; each writes its own slots, which keeps the sum order (and the result)
// independent of the thread count.
std::vector<Triplet> volume_triplets(const Mesh& mesh) {
  const int n = mesh.nodes_per_triangle();
  std::vector<Triplet> triplets(static_cast<size_t>(mesh.n_triangles()) * static_cast<size_t>(n * n));
#pragma omp parallel for schedule(static)
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    double K[36];
    triangle_stiffness(mesh, t, K);
    const int* node = mesh.triangle(t);
    Triplet* out = &triplets[static_cast<size_t>(t) * static_cast<size_t>(n * n)];
    for (int i = 0; i < n; ++i)
      for (int j = 0; j < n; ++j) out[i * n + j] = Triplet(node[i], node[j], K[i * n + j]);
  }
  return triplets;
}

// The open-boundary term eps_r (c / R) integral of N_i N_j 2 pi r ds on every Open edge: the weak
// form of the asymptotic condition du/dn + c u / R = 0 (Bayliss, Gunzburger & Turkel, SIAM J. Appl.
// Math. 42, 1982), with eps_r of the region beside the edge.
void append_open_boundary_triplets(const Mesh& mesh, double far_field_c, std::vector<Triplet>& triplets) {
  const MeshEdges edges(mesh);
  for (const Boundary& boundary : mesh.boundaries) {
    if (boundary.kind != BoundaryKind::Open) continue;
    for (const auto& contour : boundary.contours) {
      for (const BoundaryEdge& edge : contour) {
        const int found = edges.find(edge.nodes[0], edge.nodes[1]);
        if (found < 0) throw RunError("open boundary edge is not a side of any triangle of the mesh");
        const int triangle = edges.all()[static_cast<size_t>(found)].triangles[0];
        const double eps_r = mesh.regions[static_cast<size_t>(mesh.triangle_region[static_cast<size_t>(triangle)])].permittivity;
        double M[3][3] = {};
        int n = 0;
        for (const EdgePoint& q : edge_rule()) {
          const EdgeSample s = sample_edge(mesh, edge, q.t);
          n = s.n;
          const double R = std::hypot(s.at.r - mesh.open_center.r, s.at.z - mesh.open_center.z);
          // eps_r (c / R) x (axisymmetric surface element 2 pi r ds).
          const double weight = eps_r * far_field_c / R * 2 * kPi * s.at.r * s.ds_dt * q.weight;
          for (int i = 0; i < n; ++i)
            for (int j = 0; j < n; ++j) M[i][j] += weight * s.N[i] * s.N[j];
        }
        for (int i = 0; i < n; ++i)
          for (int j = 0; j < n; ++j)
            triplets.emplace_back(edge.nodes[static_cast<size_t>(i)], edge.nodes[static_cast<size_t>(j)], M[i][j]);
      }
    }
  }
}

// The conductor each node lies on, or -1 for a free node. A node where two conductors meet (a box
// corner) belongs to the one whose boundary comes first in the mesh.
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

// Nodes split into free unknowns and fixed (conductor) values, each numbered from 0.
struct Partition {
  std::vector<int> index;  // per node: its number among the free or among the fixed nodes
  std::vector<int> conductor;  // per node, -1 when free
  int n_free = 0, n_fixed = 0;
  bool is_free(int node) const { return conductor[static_cast<size_t>(node)] < 0; }
};

Partition partition_nodes(const Mesh& mesh, int n_conductors) {
  Partition p;
  p.conductor = conductor_of_nodes(mesh, n_conductors);
  p.index.resize(p.conductor.size());
  for (size_t node = 0; node < p.conductor.size(); ++node) p.index[node] = p.conductor[node] < 0 ? p.n_free++ : p.n_fixed++;
  if (p.n_fixed == 0) throw RunError("the mesh has no conductor surface: nothing fixes the potential");
  if (p.n_free == 0) throw RunError("the mesh has no free node: every node lies on a conductor");
  return p;
}

// The blocks K_ff (free x free) and K_fd (free x fixed) of the full matrix.
void split_matrix(const SparseMatrix& K, const Partition& p, SparseMatrix& K_ff, SparseMatrix& K_fd) {
  std::vector<Triplet> ff, fd;
  ff.reserve(static_cast<size_t>(K.nonZeros()));
  for (int col = 0; col < K.outerSize(); ++col) {
    for (SparseMatrix::InnerIterator it(K, col); it; ++it) {
      const int row = static_cast<int>(it.row());
      if (!p.is_free(row)) continue;
      const int i = p.index[static_cast<size_t>(row)], j = p.index[static_cast<size_t>(col)];
      (p.is_free(col) ? ff : fd).emplace_back(i, j, it.value());
    }
  }
  K_ff.resize(p.n_free, p.n_free);
  K_ff.setFromTriplets(ff.begin(), ff.end());
  K_fd.resize(p.n_free, p.n_fixed);
  K_fd.setFromTriplets(fd.begin(), fd.end());
}

// K_ff factorized once: CHOLMOD's supernodal Cholesky (Chen, Davis, Hager & Rajamanickam, ACM TOMS
// 35, 2008), or Eigen's simplicial LDLT if CHOLMOD reports a failure.
class FreeSystem {
 public:
  FreeSystem(const SparseMatrix& K_ff, SolveReport& report) {
    cholmod_.compute(K_ff);
    if (cholmod_.info() == Eigen::Success) {
      report.method = "cholmod-supernodal";
      report.factor_nonzeros = static_cast<long long>(cholmod_.cholmod().lnz);
      return;
    }
    use_cholmod_ = false;
    report.method = "eigen-simplicial-ldlt";
    report.message = "CHOLMOD supernodal Cholesky failed; used Eigen's simplicial LDLT instead";
    ldlt_.compute(K_ff);
    if (ldlt_.info() != Eigen::Success) throw RunError("the finite-element system could not be factorized");
    report.factor_nonzeros = static_cast<long long>(ldlt_.matrixL().nestedExpression().nonZeros()) + K_ff.rows();
  }

  Eigen::MatrixXd solve(const Eigen::MatrixXd& rhs) const {
    return use_cholmod_ ? Eigen::MatrixXd(cholmod_.solve(rhs)) : Eigen::MatrixXd(ldlt_.solve(rhs));
  }

 private:
  Eigen::CholmodSupernodalLLT<SparseMatrix> cholmod_;
  Eigen::SimplicialLDLT<SparseMatrix> ldlt_;
  bool use_cholmod_ = true;
};

// Column j: the nodal potentials with conductor j at 1 V and every other conductor at 0 V.
Eigen::MatrixXd unit_solutions(const SparseMatrix& K, const Partition& p, int n_conductors, SolveReport& report) {
  auto start = std::chrono::steady_clock::now();
  SparseMatrix K_ff, K_fd;
  split_matrix(K, p, K_ff, K_fd);
  const FreeSystem system(K_ff, report);
  report.seconds_factorize = seconds_since(start);

  start = std::chrono::steady_clock::now();
  // Fixed values G (fixed x conductors) and right-hand sides -K_fd G.
  Eigen::MatrixXd G = Eigen::MatrixXd::Zero(p.n_fixed, n_conductors);
  for (size_t node = 0; node < p.conductor.size(); ++node)
    if (p.conductor[node] >= 0) G(p.index[node], p.conductor[node]) = 1.0;
  const Eigen::MatrixXd rhs = -(K_fd * G);
  const Eigen::MatrixXd free_values = system.solve(rhs);
  const Eigen::MatrixXd residual = K_ff * free_values - rhs;
  for (int j = 0; j < n_conductors; ++j) {
    const double norm = rhs.col(j).norm();
    if (norm > 0) report.relative_residual = std::max(report.relative_residual, residual.col(j).norm() / norm);
  }

  Eigen::MatrixXd phi(static_cast<Eigen::Index>(p.conductor.size()), n_conductors);
  for (size_t node = 0; node < p.conductor.size(); ++node) {
    if (p.conductor[node] < 0) phi.row(static_cast<Eigen::Index>(node)) = free_values.row(p.index[node]);
    else phi.row(static_cast<Eigen::Index>(node)) = G.row(p.index[node]);
  }
  report.seconds_solve = seconds_since(start);
  report.dofs = p.n_free;
  return phi;
}

// Maxwell capacitance matrix C_ij = eps0 x (sum over the nodes of conductor i of (K phi_j)): the
// finite-element residual at a conductor's nodes is its charge, the consistent flux of Carey, Chow &
// Seager (Comput. Methods Appl. Mech. Eng. 50, 1985). C is symmetric up to round-off; it is averaged
// with its transpose.
Eigen::MatrixXd capacitance_matrix(const SparseMatrix& K, const Eigen::MatrixXd& phi, const Partition& p) {
  const Eigen::MatrixXd flux = K * phi;
  Eigen::MatrixXd C = Eigen::MatrixXd::Zero(phi.cols(), phi.cols());
  for (size_t node = 0; node < p.conductor.size(); ++node)
    if (p.conductor[node] >= 0) C.row(p.conductor[node]) += flux.row(static_cast<Eigen::Index>(node));
  C *= kEpsilon0;
  return 0.5 * (C + C.transpose());
}

// Conductor potentials: fixed ones as given; floating ones carry zero net charge,
//   C_ff V_f = -C_fd V_d.
std::vector<double> conductor_potentials(const std::vector<Conductor>& conductors, const Eigen::MatrixXd& C) {
  std::vector<int> fixed, floating;
  for (int i = 0; i < static_cast<int>(conductors.size()); ++i) (conductors[static_cast<size_t>(i)].floating ? floating : fixed).push_back(i);
  if (fixed.empty())
    throw InputError({"", 0, 0, "electrodes"}, "every electrode is floating, so nothing sets the potential",
                     "give at least one electrode a fixed potential (e.g. potential: 0)");
  const double scale = C.diagonal().cwiseAbs().maxCoeff();
  for (int f : floating)
    if (C(f, f) <= 1e-12 * scale)
      throw InputError({"", 0, 0, "electrodes." + conductors[static_cast<size_t>(f)].name},
                       "the floating electrode has no capacitance to anything: no field reaches it",
                       "check that its shapes lie inside the domain, or give it a fixed potential");

  std::vector<double> V(conductors.size());
  Eigen::VectorXd V_d(static_cast<Eigen::Index>(fixed.size()));
  for (size_t k = 0; k < fixed.size(); ++k) V[static_cast<size_t>(fixed[k])] = V_d(static_cast<Eigen::Index>(k)) = conductors[static_cast<size_t>(fixed[k])].potential_V;
  if (floating.empty()) return V;
  const Eigen::MatrixXd C_ff = C(floating, floating), C_fd = C(floating, fixed);
  const Eigen::VectorXd V_f = C_ff.ldlt().solve(-C_fd * V_d);
  for (size_t k = 0; k < floating.size(); ++k) V[static_cast<size_t>(floating[k])] = V_f(static_cast<Eigen::Index>(k));
  return V;
}

}  // namespace

SparseMatrix stiffness_matrix(const Mesh& mesh, double far_field_c) {
  std::vector<Triplet> triplets = volume_triplets(mesh);
  if (far_field_c != 0.0) append_open_boundary_triplets(mesh, far_field_c, triplets);
  SparseMatrix K(mesh.n_nodes(), mesh.n_nodes());
  K.setFromTriplets(triplets.begin(), triplets.end());
  return K;
}

FieldSolution solve_field(const FieldProblem& problem) {
  const Mesh& mesh = *problem.mesh;
  const int n_conductors = static_cast<int>(problem.conductors.size());
  FieldSolution solution;
  SolveReport& report = solution.report;

  auto start = std::chrono::steady_clock::now();
  const SparseMatrix K = stiffness_matrix(mesh, problem.far_field_c);
  const Partition partition = partition_nodes(mesh, n_conductors);
  report.seconds_assemble = seconds_since(start);

  const Eigen::MatrixXd phi = unit_solutions(K, partition, n_conductors, report);
  solution.capacitance_F = capacitance_matrix(K, phi, partition);
  solution.conductor_potential_V = conductor_potentials(problem.conductors, solution.capacitance_F);

  const Eigen::VectorXd V = Eigen::Map<const Eigen::VectorXd>(solution.conductor_potential_V.data(), n_conductors);
  solution.potential = phi * V;
  const Eigen::VectorXd Q = solution.capacitance_F * V;
  solution.conductor_charge_C.assign(Q.data(), Q.data() + Q.size());
  // W = 1/2 u^T (eps0 K) u, the discrete form of 1/2 integral D . E dV.
  solution.energy_J = 0.5 * kEpsilon0 * solution.potential.dot(K * solution.potential);
  report.ok = report.relative_residual <= kResidualLimit;
  if (!report.ok) report.message = "relative residual " + std::to_string(report.relative_residual) + " of the linear solve is above 1e-8";
  return solution;
}

}  // namespace hv
