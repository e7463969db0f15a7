// `hvstress sweep`: runs every variant of a case as its own `hvstress run` process (Gmsh is not
// thread-safe), several at a time, each in its own folder under the sweep folder; reuses variants that
// finished before with the same resolved case (so an interrupted sweep resumes); stops cleanly on
// Ctrl-C; then compares the variants (compare.h).
#pragma once

#include <string>
#include <vector>

#include "tools/app/variants.h"

namespace hv {

struct SweepOptions {
  std::string case_path;
  std::string output_dir;               // empty: "<case output.dir>-sweep"
  std::vector<std::string> overrides;   // --set for every variant
  std::vector<std::string> varies;      // --vary NAME=SPEC
  bool zip = false;
  int jobs = 0;                         // 0: the number of cores
  std::string shard;                    // "K/N" or empty
  bool quiet = false;
  std::string binary;                   // the hvstress executable to run the variants with
};

// Returns 0 when every variant ran (a variant that misses its margin still ran), 1 when some failed,
// 130 after Ctrl-C. Throws InputError for bad options or a bad case.
int sweep_command(const SweepOptions& options);

}  // namespace hv
