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
  std::string binary;                   // the hvstress executable to run the variants with, used when
                                        // /proc/self/exe cannot be read (that is preferred: call
                                        // sweep_command from the hvstress program itself)
};

// The sweep folder holds variants/v<index>-<key>/ (each an ordinary run folder), their console output
// variants/v<index>-<key>.log, and, written when the sweep has run every variant, sweep.json
// (format "hvstress-sweep/1"; read back by find_runs in compare.h):
//   {"format": "hvstress-sweep/1", "version": "0.1.0", "case": "<case path as given>",
//    "overrides": ["NAME=VALUE", ...], "varied": ["NAME", ...],
//    "variants": [{"index": 1, "label": "R=30mm", "settings": {"R": "30mm"}, "key": "<16 hex digits>",
//                  "folder": "variants/v1-<key>", "status": "finished" | "failed",
//                  "reused": true | false, "message": "<why it failed, else empty>"}, ...]}
// `folder` is relative to the sweep folder; `index` counts from 1 in the full study (before --shard).
// A sweep stopped by Ctrl-C leaves its finished variants and no new sweep.json.
//
// Returns 0 when every variant ran (a variant that misses its margin still ran), 1 when some failed,
// 130 after Ctrl-C. Throws InputError for bad options or a bad case.
int sweep_command(const SweepOptions& options);

}  // namespace hv
