// The runs of a comparison read back from their folders: summary.json values (SI, exact) and the |E|
// profile along each run's critical electrode (surface-field.csv), plus the choices every comparison
// output shares: which parameters vary, the ranking, and the engineering units to show values in.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "tools/app/compare.h"
#include "tools/case/summary_reader.h"

namespace hv {

struct LoadedRun {
  ComparedRun run;
  int index = 0;              // position in the comparison (the timestep in sweep.pvd)
  bool has_summary = false;   // false: failed, or its summary could not be read (see run.message)
  RunSummary summary;
  std::string critical_electrode;                      // where the onset starts, else the highest field
  std::vector<std::pair<double, double>> profile;      // (s in m, |E| in V/m) along its worst contour
};

// Reads every finished run's summary.json and surface-field.csv. A finished run whose summary cannot
// be read is kept as failed with the reason as its message; a missing surface-field.csv leaves the
// profile empty.
std::vector<LoadedRun> load_runs(const std::vector<ComparedRun>& runs);

// The names of the parameters whose values differ between the runs that have a summary, in the order
// the first run lists them.
std::vector<std::string> varying_parameters(const std::vector<LoadedRun>& runs);

// The SI unit of a parameter as the runs give it ("" when none says).
std::string parameter_unit(const std::vector<LoadedRun>& runs, const std::string& name);

// Best first: by inception voltage (highest first; "no inception in the searched range" above all)
// when every run with a summary has one evaluated, else by the lowest maximum field; runs without a
// summary last, in their order. Returns indices into `runs`.
std::vector<size_t> ranking(const std::vector<LoadedRun>& runs);

// True when ranking() orders by inception voltage (every run with a summary had its onset evaluated).
bool ranked_by_inception(const std::vector<LoadedRun>& runs);

// How to show a value of an SI unit to an engineer: metres in mm, volts in kV, V/m in kV/mm,
// farads in pF; other units as they are.
struct DisplayUnit {
  double per_si = 1.0;  // displayed = SI value x per_si
  std::string text;
};
DisplayUnit display_unit(const std::string& si_unit);

// |E| along one electrode read from surface-field.csv: the (region, contour) stretch holding the
// highest |E| of that electrode, as (s, |E|) in file order. Empty when the file or electrode is absent.
std::vector<std::pair<double, double>> read_surface_profile(const std::string& csv_path, const std::string& electrode);

}  // namespace hv
