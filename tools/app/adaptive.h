// Adaptive mesh refinement driven by the Zienkiewicz-Zhu error estimate (solver/error_estimate.h):
// solve on a coarse mesh, turn the element error indicators into new element sizes, remesh and solve
// again until every quantity of interest (each electrode's maximum surface field, and the lowest
// inception voltage when the case evaluates onset) changes by less than mesh.adapt.tolerance from one
// mesh to the next, or mesh.adapt.max_steps meshes have been solved. Onset (field lines and
// ionization integrals) is evaluated only on the last meshes, once the fields are close to settled.
#pragma once

#include <functional>
#include <memory>

#include "mesh/meshing.h"
#include "solver/error_estimate.h"
#include "tools/app/run_case.h"

namespace hv {

// Computes the field and the surface fields on a mesh.
using StepSolver = std::function<std::unique_ptr<RunOutcome>(MeshResult meshed)>;
// Evaluates discharge onset on a solved step (fills results.onset).
using OnsetEvaluator = std::function<void(RunOutcome& outcome)>;

// The adaptive loop over `the_case` (whose mesh spec gives order, growth, tolerance and step limit).
// `evaluate_onset` is empty when the case has no onset section. Returns the last mesh's outcome
// (with its onset when there is one), its results.accuracy filled in: the history of every step,
// the estimated error of every quantity and whether the tolerance was reached (when not, a warning
// in results.warnings says so plainly).
std::unique_ptr<RunOutcome> run_adaptive(const Case& the_case, const StepSolver& solve_step,
                                         const OnsetEvaluator& evaluate_onset, const StepListener& on_step);

// From this tolerance down, an adaptive run whose case does not give mesh.order uses cubic elements.
// Measured (benchmark sphere in a grounded box, and sphere above a plane; one run each, loaded
// machine): at tolerance 1e-4 P2 took 1.4 s against 2.0 s for P3, at 3e-5 1.4 s against 2.6 s and
// 4.0 s against 4.0 s; at 1e-5 P2 took 4.3 s against 1.7 s and 20.9 s against 5.3 s. Above it the
// coarse steps both orders take cost P3 more per unknown than its faster convergence repays.
constexpr double kCubicFromTolerance = 1e-5;

// The element order of an adaptive run: the case's, when it gives one; else 3 at tolerances of
// kCubicFromTolerance and below, 2 above.
int adaptive_order(const MeshSpec& spec);

// The element sizes for the next mesh (exposed for tests): equidistribution of the indicators, which
// are weighted up beside electrode surfaces, so that the predicted energy-norm error falls by
// `reduction`; each size changes by at most the factors kept in adaptive.cpp, and neighbouring sizes
// differ by at most `growth` per element length. A triangle's indicator is multiplied by the largest
// `node_weight` of its vertices (1 in the bulk, more at the electrode surfaces that matter).
SizeMap refined_sizes(const Mesh& mesh, const ErrorEstimate& estimate, const std::vector<double>& node_weight,
                      double reduction, double growth);

}  // namespace hv
