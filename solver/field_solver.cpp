#include "solver/field_solver.h"

#include <algorithm>
#include <chrono>
#include <cmath>

#include <Eigen/Dense>

#include "solver/assembly.h"
#include "solver/elements.h"
#include "solver/pcg_multigrid.h"

namespace hv {

namespace {

using SparseMatrix = Eigen::SparseMatrix<double>;

// A direct solve of an SPD system leaves a relative residual near round-off (~1e-14); a larger one
// means the factorization was inaccurate (an ill-conditioned, e.g. badly distorted, mesh).
constexpr double kResidualLimit = 1e-8;

double seconds_since(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

// Column j: the nodal potentials with conductor j at 1 V and every other conductor at 0 V.
Eigen::MatrixXd unit_solutions(const FieldProblem& problem, const BlockSystem& system, const Partition& p,
                               SolveReport& report) {
  const int n_conductors = static_cast<int>(problem.conductors.size());
  // Fixed values G (fixed x conductors) and right-hand sides -K_fd G.
  Eigen::MatrixXd G = Eigen::MatrixXd::Zero(p.n_fixed, n_conductors);
  for (size_t node = 0; node < p.conductor.size(); ++node)
    if (p.conductor[node] >= 0) G(p.index[node], p.conductor[node]) = 1.0;
  const Eigen::MatrixXd free_values = solve_free_system(*problem.mesh, problem.far_field_c, p, system.K_ff, -(system.K_fd * G),
                                                        problem.linear_solver, problem.factorization_cache, report);
  Eigen::MatrixXd phi(static_cast<Eigen::Index>(p.conductor.size()), n_conductors);
  for (size_t node = 0; node < p.conductor.size(); ++node) {
    if (p.conductor[node] < 0) phi.row(static_cast<Eigen::Index>(node)) = free_values.row(p.index[node]);
    else phi.row(static_cast<Eigen::Index>(node)) = G.row(p.index[node]);
  }
  return phi;
}

// Maxwell capacitance matrix C_ij = eps0 x (sum over the nodes of conductor i of (K phi_j)): the
// finite-element residual at a conductor's nodes is its charge, the consistent flux of Carey, Chow &
// Seager (Comput. Methods Appl. Mech. Eng. 50, 1985). C is symmetric up to round-off; it is averaged
// with its transpose.
Eigen::MatrixXd capacitance_matrix(const BlockSystem& system, const Eigen::MatrixXd& phi, const Partition& p) {
  const Eigen::MatrixXd flux = system.K_d * phi;  // rows: the fixed nodes
  Eigen::MatrixXd C = Eigen::MatrixXd::Zero(phi.cols(), phi.cols());
  for (size_t node = 0; node < p.conductor.size(); ++node)
    if (p.conductor[node] >= 0) C.row(p.conductor[node]) += flux.row(p.index[node]);
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
  return assemble_blocks(mesh, far_field_c, all_nodes_free(mesh)).K_ff;
}

namespace {

// W = 1/2 u^T (eps0 K) u, the discrete form of 1/2 integral D . E dV, from the blocks: the free rows
// give K_ff u_f + K_fd u_d, the fixed rows K_d u.
double field_energy(const BlockSystem& system, const Partition& p, const Eigen::VectorXd& u) {
  Eigen::VectorXd u_free(p.n_free), u_fixed(p.n_fixed);
  for (size_t node = 0; node < p.conductor.size(); ++node)
    (p.conductor[node] < 0 ? u_free : u_fixed)(p.index[node]) = u(static_cast<Eigen::Index>(node));
  Eigen::VectorXd Ku_free;
  symmetric_multiply(system.K_ff, u_free, Ku_free);
  Ku_free += system.K_fd * u_fixed;
  return 0.5 * kEpsilon0 * (u_free.dot(Ku_free) + u_fixed.dot(system.K_d * u));
}

}  // namespace

FieldSolution solve_field(const FieldProblem& problem) {
  const Mesh& mesh = *problem.mesh;
  const int n_conductors = static_cast<int>(problem.conductors.size());
  FieldSolution solution;
  SolveReport& report = solution.report;

  const auto start = std::chrono::steady_clock::now();
  const Partition partition = partition_nodes(mesh, n_conductors);
  const BlockSystem system = assemble_blocks(mesh, problem.far_field_c, partition);
  report.seconds_assemble = seconds_since(start);

  const Eigen::MatrixXd phi = unit_solutions(problem, system, partition, report);
  solution.capacitance_F = capacitance_matrix(system, phi, partition);
  solution.conductor_potential_V = conductor_potentials(problem.conductors, solution.capacitance_F);

  const Eigen::VectorXd V = Eigen::Map<const Eigen::VectorXd>(solution.conductor_potential_V.data(), n_conductors);
  solution.potential = phi * V;
  const Eigen::VectorXd Q = solution.capacitance_F * V;
  solution.conductor_charge_C.assign(Q.data(), Q.data() + Q.size());
  solution.energy_J = field_energy(system, partition, solution.potential);
  report.ok = report.relative_residual <= kResidualLimit;
  if (!report.ok && report.message.empty())
    report.message = "relative residual " + std::to_string(report.relative_residual) + " of the linear solve is above 1e-8";
  return solution;
}

}  // namespace hv
