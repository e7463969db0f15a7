// The run pipeline as a library function: case -> mesh -> field solution -> surface fields ->
// results, and the writing of the output folder. The command line (main.cpp) is a thin layer over
// this, and the tests call it directly.
#pragma once

#include <functional>
#include <memory>
#include <optional>
#include <string>

#include "mesh/meshing.h"
#include "postproc/results.h"
#include "solver/field_solver.h"
#include "tools/case/case.h"

namespace hv {

// Reports the steps of a run ("meshing", "solving", ...) as they start; may be empty.
using StepListener = std::function<void(const std::string& step)>;

// Everything one run computed. `results.mesh` points into `meshed`, so a RunOutcome stays where it
// was made (it is handed out by unique_ptr).
struct RunOutcome {
  MeshResult meshed;
  FieldSolution solution;
  RunResults results;
  std::optional<GasModel> gas;  // when the case evaluates discharge onset
  RunOutcome() = default;
  RunOutcome(const RunOutcome&) = delete;
  RunOutcome& operator=(const RunOutcome&) = delete;
};

// The conductors of the field problem: the case's electrodes in order, then the ground plane (0 V)
// when the case has one. The far-field coefficient is 2 above a ground plane (the far field of
// charges and their images is a dipole), else 1 (monopole).
FieldProblem field_problem(const Case& the_case, const Mesh& mesh);

// Meshes, solves, recovers the surface fields and, when the case has an `onset` section, evaluates
// discharge onset. Throws InputError for bad input (exit 2) and
// RunError for other failures (exit 1). Writes nothing.
std::unique_ptr<RunOutcome> compute_case(const Case& the_case, const StepListener& on_step = {});

// Writes the outputs the case asks for (summary.json always; field.vtu and surfaces.vtp when
// output.vtk, surface-field.csv when output.csv, report.md when output.report; with an onset
// evaluation also onset.csv and fieldlines.vtp) into the folder
// `dir`, which must exist. Throws RunError, writing nothing, when a number that must be finite is not
// (finite_results.h).
void write_run_outputs(const RunOutcome& outcome, const Case& the_case, const std::string& dir);

}  // namespace hv
