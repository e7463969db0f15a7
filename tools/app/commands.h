// The subcommands of the command line (spec/cli.md), as functions the CLI calls after parsing.
// Each returns the process exit code on success (0, or 3 when a required margin is missed) and
// throws InputError (exit 2) or RunError (exit 1); main() maps the exceptions.
#pragma once

#include <string>
#include <vector>

namespace hv {

struct CommandOptions {
  std::string case_path;
  std::string output_dir;               // empty: the case's output.dir
  std::vector<std::string> overrides;   // --set NAME=VALUE
  bool quiet = false;                   // no progress on stderr
  bool json = false;                    // print summary.json to stdout instead of the table
};

// Mesh, solve, recover surface fields, evaluate onset when asked, write the outputs, print a short
// table. Returns 3 when the design misses its required onset margin.
int run_command(const CommandOptions& options);

// Parse and validate the case and build its geometry; writes nothing.
int check_command(const CommandOptions& options);

// Mesh only; writes mesh.vtu and a summary.json of the mesh figures.
int mesh_command(const CommandOptions& options);

// Lists the built-in gas models: formula, range of validity, defaults and source.
int gases_command();

// The bundled demo case (cases/hv-terminal.yaml), run as `run` would.
int demo_command(const CommandOptions& options);

// Where the bundled cases are: $HVSTRESS_CASES if set, else the source tree's cases/.
std::string bundled_cases_folder();

}  // namespace hv
