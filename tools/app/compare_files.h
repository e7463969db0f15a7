// The machine-readable files of a comparison: sweep.csv (one row per run, SI values written so they
// read back exactly as in the runs' summary.json) and sweep.pvd (a ParaView collection of field.vtu).
#pragma once

#include <string>
#include <vector>

#include "tools/app/compare_runs.h"

namespace hv {

// sweep.csv: label, each varied parameter (SI, heading NAME_unit), status, maximum field (V/m) with
// its electrode and (r, z) in m, the maximum field of each electrode, inception voltage (V), margin,
// whether the required margin is met, the capacitance diagonal per electrode (F), message. Rows in
// the runs' order; a value a run does not have is an empty cell.
std::string sweep_csv(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied);

// sweep.pvd: a VTK XML collection with one DataSet per run that has a field.vtu, timestep = the
// run's index, part 0, name = its label, file = the path relative to `output_dir`.
std::string sweep_pvd(const std::vector<LoadedRun>& runs, const std::string& output_dir);

}  // namespace hv
