// The guard before any result is written: every number the output files carry must be finite,
// except where a file documents another value (NaN or null: "not evaluated" or "none"). A NaN or an
// infinity anywhere else means a computation went wrong; writing it would hand the user a file that
// looks like a result, so it is a RunError (exit 1) that names the quantity instead.
#pragma once

#include "mesh/mesh.h"
#include "postproc/results.h"

namespace hv {

// Throws RunError naming the first non-finite node coordinate, element size or permittivity of the
// mesh (field.vtu, mesh.vtu, the mesh figures of summary.json).
void require_finite_mesh(const Mesh& mesh, const MeshStats& stats);

// Throws RunError naming the first non-finite number among everything summary.json, the CSV files,
// the VTK files and report.md are written from. Allowed, as documented in results.h and onset.h:
// NaN inception voltage and margin of a surface sample without a start point, kNoInception (+inf)
// where no inception was found, and a NaN required margin (none required).
void require_finite_results(const RunResults& results);

}  // namespace hv
