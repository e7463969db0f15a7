// The output files of a run (contract: spec/case-format.md, "What run writes"). Every writer writes
// atomically (a temporary name, then a rename) and throws RunError when it cannot.
#pragma once

#include <string>

#include "mesh/mesh.h"
#include "postproc/results.h"

namespace hv {

// summary.json (format "hvstress-summary/1"): the machine-readable results, SI units.
std::string summary_json(const RunResults& results);

// summary.json of the `mesh` command (format "hvstress-mesh/1"): order, node and triangle counts,
// boundary edges, element sizes (m), dropped degenerate triangles, seconds.
std::string mesh_summary_json(const Mesh& mesh, const MeshStats& stats);

// field.vtu: the mesh (second-order cells for order 2), double precision, zlib-compressed appended
// data, with point data potential (V), E (V/m, 3 components with 0 for phi), |E| (V/m) and cell data
// relative permittivity and region id. With `results == nullptr` only the mesh, region id and
// permittivity are written (the `mesh` command's mesh.vtu).
void write_field_vtu(const std::string& path, const Mesh& mesh, const RunResults* results);

// surfaces.vtp: every electrode contour and interface side as a polyline with |E|, E_n, E_t, sigma
// and the arc length s as point data, and the surface name index as cell data; after an onset
// evaluation also inception_V, margin (NaN where not evaluated) and onset_flag.
void write_surfaces_vtp(const std::string& path, const RunResults& results);

// surface-field.csv: one row per surface point: surface, region (the field is evaluated in), contour,
// s_m, r_m, z_m, E_abs_V_per_m,
// E_n_V_per_m, E_t_V_per_m, sigma_C_per_m2.
std::string surface_field_csv(const RunResults& results);

// onset.csv: one row per onset start point: electrode, s_m, r_m, z_m, E at operating (V/m), criterion
// integral at operating, inception voltage (V), margin, polarity, line end reason. Only when
// results.onset.evaluated.
std::string onset_csv(const RunResults& results);

// fieldlines.vtp: every traced line as a polyline with point data |E|, alpha_eff and the running
// criterion integral, all at the line's own inception voltage (at operating when it has none), and
// cell data start index, end reason and the voltage the line is shown at (voltage_V). Long lines are
// thinned for drawing (their ends and the steep part near the electrode stay).
void write_fieldlines_vtp(const std::string& path, const RunResults& results, const GasModel& gas);

// report.md: a readable account of the run: the safety caution, a table per electrode (potential,
// charge, maximum field and where), the capacitance matrix, energy, mesh statistics, solver figures,
// timings, warnings, and the case echo with the resolved parameters.
std::string report_markdown(const RunResults& results);

}  // namespace hv
