// `hvstress optimize`: searches the varied parameters of a case for the best design, by a published
// derivative-free method: golden-section search for one parameter (Kiefer, Proc. AMS 4, 1953), a
// bounded Nelder-Mead simplex for several (Nelder & Mead, Comput. J. 7, 1965), and for the goal
// min-size-with-margin a bisection on the first parameter. Deterministic.
#pragma once

#include <string>
#include <vector>

namespace hv {

struct OptimizeOptions {
  std::string case_path;
  std::string output_dir;               // empty: "<case output.dir>-optimize"
  std::vector<std::string> overrides;   // --set
  std::vector<std::string> varies;      // --vary NAME=LO:HI
  std::string goal;                     // max-inception | min-field | min-size-with-margin
  double tolerance = 1e-3;              // relative to each parameter's range
  int max_evaluations = 60;
  bool quiet = false;
};

// Writes history.csv (every evaluated design: parameters, objective, feasibility), best/ (the best
// design's full results, as `run` writes them) and prints the best design. Returns 0, or 3 when no
// evaluated design meets the required margin under min-size-with-margin. Throws InputError for bad
// options (unknown goal, a range that is not LO:HI, a goal needing an onset section the case lacks).
int optimize_command(const OptimizeOptions& options);

}  // namespace hv
