// Adaptive mesh refinement driven by the Zienkiewicz-Zhu error estimate (solver/error_estimate.h):
// solve on a coarse mesh, turn the element error indicators into new element sizes, remesh and solve
// again until every quantity of interest (each electrode's maximum surface field, and the lowest
// inception voltage when the case evaluates onset) changes by less than mesh.adapt.tolerance from one
// mesh to the next, or mesh.adapt.max_steps meshes have been solved.
#pragma once

#include <functional>
#include <memory>

#include "mesh/meshing.h"
#include "solver/error_estimate.h"
#include "tools/app/run_case.h"

namespace hv {

// Meshes `geometry` (with its own sizes, or following `sizes` when given) and computes everything a
// run computes on that mesh: the field, surface fields and, with an onset section, the onset.
using StepSolver = std::function<std::unique_ptr<RunOutcome>(const GeometrySpec& geometry, const SizeMap* sizes)>;

// The adaptive loop over `the_case` (whose mesh spec gives order, growth, tolerance and step limit).
// Returns the last mesh's outcome, its results.accuracy filled in: the history of every step, the
// estimated error of every quantity and whether the tolerance was reached (when not, a warning in
// results.warnings says so plainly).
std::unique_ptr<RunOutcome> run_adaptive(const Case& the_case, const StepSolver& solve_step,
                                         const StepListener& on_step);

// The element sizes for the next mesh (exposed for tests): equidistribution of the indicators, which
// are weighted up beside electrode surfaces, so that the predicted energy-norm error falls by
// `reduction`; each size changes by at most the factors kept in adaptive.cpp, and neighbouring sizes
// differ by at most `growth` per element length. `surface_nodes[i]` marks the electrode-surface nodes
// whose triangles weigh more.
SizeMap refined_sizes(const Mesh& mesh, const ErrorEstimate& estimate, const std::vector<bool>& surface_nodes,
                      double reduction, double growth);

}  // namespace hv
