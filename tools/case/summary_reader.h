// Reading back our own result files: a run's summary.json (format "hvstress-summary/1",
// spec/case-format.md) and a sweep folder's sweep.json. JSON is a subset of YAML 1.2, so yaml-cpp
// reads both; this keeps yaml-cpp inside tools/case. Values stay SI, exactly as written
// (round-trip decimal text reads back to the same double).
#pragma once

#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include "mesh/base.h"
#include "tools/case/case.h"

namespace hv {

struct SummaryElectrode {
  std::string name;
  double max_field_V_per_m = NAN;      // highest |E| on the electrode (any side)
  Point max_field_at;                  // (r, z), m
  double max_gas_field_V_per_m = NAN;  // highest |E| on its gas side (NaN: no gas beside it)
  Point max_gas_field_at;
};

// The onset section; `evaluated` is false when the run had none.
struct SummaryOnset {
  bool evaluated = false;
  std::string electrode;           // where the lowest inception voltage is
  bool inception_found = false;    // false: no inception within the searched range
  double inception_V = NAN;        // NaN when not found
  double margin = NAN;             // inception / operating voltage
  double required_margin = NAN;    // NaN when the case sets none
  bool meets_required_margin = true;
};

struct RunSummary {
  std::string file;                           // the summary.json read
  std::string title;
  std::vector<Parameter> parameters;          // in the case's order, SI, with their SI units
  std::vector<SummaryElectrode> electrodes;   // in the case's order (capacitance_order)
  double max_field_V_per_m = NAN;
  std::string max_field_electrode;
  Point max_field_at;
  std::vector<std::vector<double>> capacitance_F;  // Maxwell matrix, rows and columns as `electrodes`
  SummaryOnset onset;

  // The parameter's value, NaN when the run has no such parameter.
  double parameter(const std::string& name) const;
};

// Reads `path`. Throws InputError naming the file (and the key) when it cannot be read or is not an
// hvstress summary.
RunSummary read_summary(const std::string& path);

// The same from text in memory; `file_label` names it in error messages.
RunSummary parse_summary(const std::string& text, const std::string& file_label);

// One variant of a sweep as sweep.json lists it.
struct SweepVariant {
  int index = 0;
  std::vector<std::pair<std::string, std::string>> settings;  // NAME, VALUE text, in `varied` order
  std::string folder;                                          // relative to the sweep folder
  bool finished = false;                                       // status "finished" (else "failed")
  std::string message;
};

struct SweepIndex {
  std::string file;
  std::string case_file;
  std::vector<std::string> varied;
  std::vector<SweepVariant> variants;
};

// Reads a sweep folder's sweep.json (its "format", when present, must be "hvstress-sweep/1"; keys
// not listed here are ignored). Throws InputError naming the file and key when it is not one.
SweepIndex read_sweep_index(const std::string& path);

}  // namespace hv
