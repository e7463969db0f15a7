// Everything a run produced, gathered for the writers (JSON, VTK, CSV, report). SI units throughout,
// coordinates (r, z) in metres.
#pragma once

#include <array>
#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include <Eigen/Core>

#include "mesh/mesh.h"
#include "postproc/onset.h"
#include "solver/field_solver.h"

namespace hv {

// The recovered field at one node of a surface contour.
struct SurfaceSample {
  double s = 0.0;      // arc length along the contour from its start, m
  Point at;            // m
  double E_abs = 0.0;  // |E|, V/m
  double E_n = 0.0;    // normal component, V/m, positive pointing out of the conductor / into region
  double E_t = 0.0;    // tangential component along the direction of travel, V/m
  double sigma = 0.0;  // surface charge density, C/m^2 (conductors; free charge); 0 on interfaces
  double inception_V = NAN;  // local inception voltage (onset evaluation; NaN where not evaluated)
  double margin = NAN;       // inception_V / operating voltage
};

// The field along one boundary, seen from one region: an electrode surface (seen from the region
// beside it), or one side of a dielectric interface.
struct SurfaceField {
  std::string name;          // electrode name, "ground_plane", or "<region>|<other region>"
  BoundaryKind kind = BoundaryKind::Electrode;
  int conductor = -1;        // conductor index for electrode surfaces, else -1
  int region = -1;           // the region the field is evaluated in
  std::vector<std::vector<SurfaceSample>> contours;
};

struct ElectrodeResult {
  std::string name;
  bool floating = false;
  double potential_V = 0.0;
  double charge_C = 0.0;
  double max_field_V_per_m = 0.0;      // highest |E| on the surface, on any side (gas or solid)
  Point max_field_at;
  double max_gas_field_V_per_m = 0.0;  // highest |E| on the gas side: what decides corona
  Point max_gas_field_at;
};

struct Timings {
  double mesh = 0, assemble = 0, solve = 0, post = 0, total = 0;
};

// One mesh of an adaptive run, with the quantities of interest it gave.
struct AccuracyStep {
  int order = 2;
  int triangles = 0;
  int dofs = 0;
  double energy_error = 0.0;            // relative Zienkiewicz-Zhu estimate in the energy norm
  std::vector<double> max_field_V_per_m;  // per electrode, in case order
  double inception_V = NAN;             // lowest inception voltage (NaN without an onset evaluation)
  double seconds = 0.0;                 // mesh, solve, fields, onset and estimate of this step
};

// How accurate the results are: the adaptive loop's record (tools/app/adaptive.h), or for a fixed
// mesh only the energy-norm estimate. Estimated errors are relative; NaN where there is none.
struct Accuracy {
  bool adaptive = false;
  bool converged = false;                // every quantity changed by less than the tolerance
  double tolerance = NAN;
  int max_steps = 0;
  double energy_error = NAN;             // relative Zienkiewicz-Zhu estimate on the final mesh
  std::vector<double> max_field_error;   // per electrode: estimated relative error of its maximum field
  double inception_error = NAN;          // of the lowest inception voltage
  std::vector<AccuracyStep> steps;       // adaptive: every mesh solved, in order
  std::string stop_reason;               // adaptive: why the loop ended, in words
};

struct RunResults {
  std::string title;
  std::string case_file;
  std::string case_text;                                   // echo for the report
  std::vector<std::pair<std::string, double>> parameters;  // resolved, SI
  std::vector<std::string> parameter_units;                // SI unit text per parameter
  const Mesh* mesh = nullptr;
  MeshStats mesh_stats;
  SolveReport solve_report;
  Eigen::VectorXd potential;                   // V per mesh node
  std::vector<std::array<double, 2>> node_field;  // E (E_r, E_z) per mesh node, V/m (averaged)
  std::vector<ElectrodeResult> electrodes;     // in case order (ground plane not included)
  std::string max_field_electrode;
  double max_field_V_per_m = 0.0;
  Point max_field_at;
  Eigen::MatrixXd capacitance_F;               // over the case's electrodes, in case order
  double energy_J = 0.0;
  double ground_plane_charge_C = 0.0;
  bool has_ground_plane = false;
  std::vector<SurfaceField> surfaces;
  OnsetResult onset;                           // evaluated when the case has an `onset` section
  std::vector<std::string> warnings;
  Timings timings;                             // the final mesh's stages; total over all steps
  Accuracy accuracy;
  std::string version;
};

}  // namespace hv
