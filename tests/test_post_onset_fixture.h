// Test helper for the onset tests: solve a structured design, recover its surface fields, and run
// the onset evaluation on it with a gas of a given relative density.
#pragma once

#include <algorithm>
#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include "postproc/gas.h"
#include "postproc/onset.h"
#include "postproc/surface_fields.h"
#include "solver/field_solver.h"
#include "structured_mesh.h"

namespace hv::test {

struct SolvedDesign {
  Mesh mesh;
  std::vector<Conductor> conductors;
  Eigen::VectorXd potential;
  std::vector<SurfaceField> surfaces;
};

inline SolvedDesign solve_design(Mesh mesh, std::vector<Conductor> conductors) {
  SolvedDesign design{std::move(mesh), std::move(conductors), {}, {}};
  FieldProblem problem;
  problem.mesh = &design.mesh;
  problem.conductors = design.conductors;
  design.potential = solve_field(problem).potential;
  design.surfaces = surface_fields(design.mesh, design.potential);
  return design;
}

// Parallel plates at z = 0 ("plate", conductor 0) and z = d ("earth", conductor 1), r from the axis
// to `radius` (a symmetry side): a uniform field.
inline Mesh plate_gap_mesh(double d, double radius, int nr, int nz) {
  GridSpec spec;
  spec.u = lines(0, radius, nr);
  spec.v = lines(0, d, nz);
  return grid_mesh(spec, {
      {BoundaryKind::Electrode, "plate", 0, 0, -1, {{{0, 0}, {nr, 0}}}},
      {BoundaryKind::Electrode, "earth", 1, 0, -1, {{{0, nz}, {nr, nz}}}},
      {BoundaryKind::Axis, "axis", -1, -1, -1, {{{0, 0}, {0, nz}}}},
      {BoundaryKind::Symmetry, "right", -1, -1, -1, {{{nr, 0}, {nr, nz}}}},
  });
}

// A gas at 20 degC (293 K, the reference temperature of the relative density) and relative density
// delta: p = delta x 101.3 kPa (IEC 60060-1 reference atmosphere).
inline GasModel gas_at_density(const std::string& name, double delta) {
  GasSpec spec;
  spec.name = name;
  spec.temperature_K = 293.0;
  spec.pressure_Pa = delta * 101.3e3;
  return GasModel::from_spec(spec);
}

// The onset evaluation of a solved design with the spec's other settings at their defaults; the
// solved voltage is the highest |fixed potential|.
inline OnsetResult evaluate(SolvedDesign& design, const GasModel& gas, OnsetSpec spec = {}) {
  double solved_V = 0.0;
  for (const Conductor& c : design.conductors) solved_V = std::max(solved_V, std::abs(c.potential_V));
  spec.present = true;
  return evaluate_onset(design.mesh, design.potential, design.surfaces, gas, resolve_onset_settings(spec, gas, solved_V));
}

}  // namespace hv::test
