// Field recovery: the electric field at every node (for maps) and the accurate field on every
// electrode surface and on both sides of every dielectric interface (for hot spots).
//
// Surface field: consistent boundary flux (Carey, Chow & Seager, Comput. Methods Appl. Mech. Eng. 50,
// 1985). The residual of one region's element equations at the nodes of a boundary is the weak normal
// displacement there, the integral of D_n N_i 2 pi r ds; a quadratic in the arc length fitted to the
// residuals of the vertex hat functions nearby turns it into the pointwise D_n, hence
// E_n = D_n / (eps0 eps_r) and sigma = D_n (see surface_fields.cpp and docs/methods.md). Faces meeting
// at a corner or junction share a node's residual. Pointwise accuracy is that of the residual, which
// the fit also averages (coaxial cylinders, P2, h = a/16: 1e-6), not O(h^2) where the field varies
// along the surface (the error of dividing by a lumped mass). The tangential part comes from the derivative of the potential
// along the boundary.
#pragma once

#include <array>
#include <vector>

#include <Eigen/Core>

#include "mesh/mesh.h"
#include "postproc/results.h"

namespace hv {

// E = -grad(u) at every mesh node, V/m, as (E_r, E_z): the average over the triangles that share
// the node. For maps only; use surface_fields() for values on surfaces.
std::vector<std::array<double, 2>> nodal_field(const Mesh& mesh, const Eigen::VectorXd& potential);

// The recovered field along every electrode (seen from the region beside it, one SurfaceField per
// electrode name and per region it touches), along the ground plane, and along each side of every
// gas-dielectric or dielectric-dielectric interface (one SurfaceField per side). Contours follow the
// mesh boundaries' order, with arc length s from each contour's start. Normal E_n points away from
// the conductor (into the region it is seen from); on interfaces it points into the region seen from,
// so the two sides of an interface have D_n of opposite sign. E_t is -du/ds along the direction of
// travel. One sample per contour node (vertices and mid nodes in order); a closed contour (a torus)
// ends with its first node again, at s = its length. Where a boundary borders several regions, each
// stretch is a contour of the field seen from that region. Interface names are
// "<region seen from>|<other region>". Throws RunError if the mesh's boundaries are not triangle sides.
std::vector<SurfaceField> surface_fields(const Mesh& mesh, const Eigen::VectorXd& potential);

}  // namespace hv
