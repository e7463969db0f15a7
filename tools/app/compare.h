// Side-by-side comparison of finished runs: sweep.csv (one row per run), sweep.pvd (a ParaView
// collection of their field.vtu files) and a self-contained report.html with the ranking table and
// SVG charts. Used by `hvstress sweep` after its variants and by `hvstress compare DIR...`.
#pragma once

#include <string>
#include <utility>
#include <vector>

namespace hv {

// One run to compare: its folder (holding summary.json when it finished), and for a sweep variant the
// varied parameter settings and how the variant ended.
struct ComparedRun {
  std::string folder;
  std::string label;                                       // how the run is named in tables and legends
  std::vector<std::pair<std::string, std::string>> varied; // NAME=VALUE settings (sweep variants)
  bool finished = true;                                    // false: the variant failed
  std::string message;                                     // why it failed
};

// The runs found under `folders`: a run folder (summary.json) is one run; a sweep folder (sweep.json)
// contributes its variants. Throws InputError naming a folder that is neither.
std::vector<ComparedRun> find_runs(const std::vector<std::string>& folders);

// Writes sweep.csv, sweep.pvd and report.html into `output_dir` (which exists), atomically each.
// `varied_names` are the parameters that differ between the runs (plotted on the x axes); empty for
// `compare`, which then finds them from the runs' parameters.
void write_comparison(const std::vector<ComparedRun>& runs, const std::vector<std::string>& varied_names,
                      const std::string& output_dir);

// `hvstress compare DIR... [-o DIR]`: finds the runs, writes the comparison into the output folder
// (default "comparison"; replaced only if it holds an earlier comparison), prints where it is.
int compare_command(const std::vector<std::string>& folders, const std::string& output_dir, bool quiet);

}  // namespace hv
