// The case file (YAML, format 1; see docs/case-file.md and the contract in spec/case-format.md):
// reading, units, expressions over parameters, `--set` overrides, and errors that name the file,
// line, column and key path. The only code that includes yaml-cpp lives behind this header.
#pragma once

#include <cmath>
#include <string>
#include <vector>

#include "mesh/base.h"
#include "mesh/geometry.h"
#include "postproc/gas.h"
#include "postproc/onset.h"

namespace hv {

// A named parameter after evaluation, in SI units.
struct Parameter {
  std::string name;
  double value = 0.0;  // SI
  std::string unit;    // SI unit of the value, e.g. "m", "V", "V/m", "" for a pure number
};

struct OutputSpec {
  std::string dir = "out";  // relative to the current folder
  bool vtk = true;
  bool csv = true;
  bool report = true;
};

struct Case {
  std::string file;   // path as given
  std::string text;   // the file's text, for the report's echo
  int format = 1;
  std::string title;
  std::vector<Parameter> parameters;  // in the order of the file, after --set overrides
  GeometrySpec geometry;
  GasSpec gas;
  OnsetSpec onset;
  OutputSpec output;
};

// Reads and validates a case file into SI values. `overrides` are "NAME=VALUE" strings from --set,
// each replacing the value of an existing parameter before later parameters are evaluated; VALUE
// uses the case file's value syntax. Throws InputError on bad input, placed at file:line:col and
// key path (a --set error names "--set NAME" instead). Geometry that needs the mesher to judge
// (touching or overlapping shapes, open paths) is left to the mesher.
Case read_case(const std::string& path, const std::vector<std::string>& overrides = {});

// The same from text in memory; `file_label` names it in error messages.
Case parse_case(const std::string& text, const std::string& file_label,
                const std::vector<std::string>& overrides = {});

}  // namespace hv
