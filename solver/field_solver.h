// The electrostatic field of an axisymmetric design by the finite-element method.
//
// Unknown: the potential u(r, z). Weak form, for every test function v that vanishes on conductors:
//   integral over the meshed r-z regions of  eps_r grad(u) . grad(v)  2 pi r dr dz
//   + integral over the open boundary of  eps_r (c / R) u v  2 pi r ds  = 0
// The axis and symmetry sides are natural boundaries (nothing to impose). The open-boundary term is
// the first-order asymptotic (Robin) condition du/dn + c u / R = 0 of Bayliss, Gunzburger & Turkel
// (SIAM J. Appl. Math. 42, 1982): c = 1 for a monopole far field (potential ~ 1/R), c = 2 for the
// dipole far field of charges above a grounded plane.
//
// Conductors are Dirichlet boundaries. One solve per conductor at unit potential (others at zero),
// all with one sparse Cholesky factorization (or, for large systems, one multigrid preconditioner;
// solver/linear_system.h); those unit solutions give the Maxwell capacitance matrix, and floating
// conductors take the potentials at which their net charge is zero.
#pragma once

#include <string>
#include <vector>

#include <Eigen/Core>
#include <Eigen/SparseCore>

#include "mesh/mesh.h"
#include "solver/linear_system.h"

namespace hv {

struct Conductor {
  std::string name;
  bool floating = false;
  double potential_V = 0.0;  // fixed potential (ignored when floating)
};

struct FieldProblem {
  const Mesh* mesh = nullptr;
  // Indexed like Boundary::conductor: the case's electrodes, then the ground plane if any.
  std::vector<Conductor> conductors;
  double far_field_c = 1.0;  // c of the open-boundary condition: 1 monopole, 2 dipole
  LinearSolverKind linear_solver = LinearSolverKind::Automatic;
  // Optional: keeps the symbolic analysis of the direct solve for the next solve of the same pattern.
  FactorizationCache* factorization_cache = nullptr;
};

struct FieldSolution {
  Eigen::VectorXd potential;                  // V, at every mesh node
  std::vector<double> conductor_potential_V;  // floating ones solved
  std::vector<double> conductor_charge_C;     // net charge on each conductor
  Eigen::MatrixXd capacitance_F;              // Maxwell capacitance matrix over all conductors
  double energy_J = 0.0;                      // 1/2 integral of D.E over the domain
  SolveReport report;
};

// The assembled system matrix over all mesh nodes, without eps0 (multiply by eps0 for F):
//   K_ij = integral of eps_r grad(N_i) . grad(N_j) 2 pi r dr dz
//        + integral over the Open boundaries of eps_r (c / R) N_i N_j 2 pi r ds,
// with c = far_field_c and R the distance from mesh.open_center. No conductor condition is applied, so
// with far_field_c = 0 (or no Open boundary) a constant lies in its null space. Symmetric, n x n.
Eigen::SparseMatrix<double> stiffness_matrix(const Mesh& mesh, double far_field_c);

// Solves the problem. Throws InputError when the problem is ill-posed (no fixed potential, a floating
// conductor that no field reaches), RunError when the linear algebra fails.
FieldSolution solve_field(const FieldProblem& problem);

}  // namespace hv
