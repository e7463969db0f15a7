// A posteriori error estimate of a field solution: the Zienkiewicz-Zhu estimator with
// superconvergent patch recovery (Zienkiewicz & Zhu, "The superconvergent patch recovery and a
// posteriori error estimates", Int. J. Numer. Methods Eng. 33, 1992, part 1: the recovery, part 2:
// error estimates and adaptivity).
//
// Recovery: around every vertex, the triangles of one region that share it form a patch; a complete
// polynomial of the element's degree p in (r, z) is fitted by least squares to grad(u_h) at the
// sampling points of the patch's triangles, and its values at the patch's nodes give a continuous
// recovered gradient G*(u) (per region, so that it may jump across dielectric interfaces as D_n
// continuity demands). Estimate: on each triangle T,
//   eta_T^2 = integral over T of eps0 eps_r |G*(u) - grad(u_h)|^2 2 pi r dr dz,
// the axisymmetric energy norm of the difference, which estimates the energy norm of the true error.
// Works for any element order the mesh has (through solver/elements.h).
#pragma once

#include <vector>

#include <Eigen/Core>

#include "mesh/mesh.h"

namespace hv {

struct ErrorEstimate {
  std::vector<double> element;  // eta_T per triangle, sqrt(J) (the energy norm: integral of D . E)
  double global = 0.0;          // sqrt(sum of eta_T^2)
  double energy_norm = 0.0;     // ||u_h||: sqrt(integral of eps |grad u_h|^2 2 pi r dr dz), sqrt(J)
  // eta / sqrt(eta^2 + ||u_h||^2): the relative energy-norm error of Zienkiewicz & Zhu (part 2).
  double relative() const;
};

// The recovered gradient G*(u) at every node slot of every triangle, (dG/dr, dG/dz) in V/m, as
// nodes_per_triangle() consecutive pairs per triangle: a node on an interface has one value per side.
std::vector<Eigen::Vector2d> recovered_gradient(const Mesh& mesh, const Eigen::VectorXd& potential);

// The Zienkiewicz-Zhu estimate of the solution `potential` (V per mesh node) on `mesh`.
ErrorEstimate zz_error_estimate(const Mesh& mesh, const Eigen::VectorXd& potential);

}  // namespace hv
