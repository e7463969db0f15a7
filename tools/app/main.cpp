// hvstress: the command line (spec/cli.md). Parses options with CLI11 and hands over to the
// subcommands in commands.cpp; maps errors to exit codes: 2 bad input or usage, 1 other failures.
#include <cstdio>
#include <exception>

#include <CLI/CLI.hpp>

#include "mesh/base.h"
#include "tools/app/commands.h"

namespace {

constexpr const char* kCaution =
    "CAUTION: high voltage can kill. hvstress computes fields of an idealised model; its results are a\n"
    "design aid, not proof of safety. Verify designs by test, and follow local codes, standards and\n"
    "licensed practice for every high-voltage installation and test.";

void add_case_options(CLI::App& command, hv::CommandOptions& options) {
  command.add_option("CASE", options.case_path, "the case file (YAML)")->required()->check(CLI::ExistingFile);
  command.add_option("--set", options.overrides,
                     "override a parameter, NAME=VALUE in the case file's syntax (repeatable)");
}

void add_output_options(CLI::App& command, hv::CommandOptions& options) {
  command.add_option("-o,--output", options.output_dir, "output folder (default: the case's output.dir)");
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"hvstress: electric fields of axisymmetric high-voltage designs", "hvstress"};
  app.footer(kCaution);
  app.set_version_flag("--version", std::string("hvstress ") + HV_VERSION);
  app.require_subcommand(1);
  app.fallthrough();  // --quiet may follow the subcommand

  hv::CommandOptions options;
  app.add_flag("-q,--quiet", options.quiet, "no progress lines on stderr");

  CLI::App* run = app.add_subcommand("run", "mesh, solve and write the field results of a case");
  add_case_options(*run, options);
  add_output_options(*run, options);
  run->add_flag("--json", options.json, "print summary.json to stdout instead of the table");
  run->footer("example: hvstress run cases/hv-terminal.yaml -o terminal-results --set \"ring_R=300 mm\"");

  CLI::App* check = app.add_subcommand("check", "validate a case and build its geometry; writes nothing");
  add_case_options(*check, options);
  check->footer("example: hvstress check cases/hv-terminal.yaml");

  CLI::App* mesh = app.add_subcommand("mesh", "mesh a case only; writes mesh.vtu");
  add_case_options(*mesh, options);
  add_output_options(*mesh, options);
  mesh->footer("example: hvstress mesh cases/hv-terminal.yaml -o terminal-mesh");

  CLI::App* gases = app.add_subcommand("gases", "list the built-in gas models: formula, range of validity, source");
  gases->footer("example: hvstress gases");

  CLI::App* demo = app.add_subcommand("demo", "run the bundled demo case and say where the results are");
  add_output_options(*demo, options);
  demo->add_flag("--json", options.json, "print summary.json to stdout instead of the table");
  demo->footer("example: hvstress demo -o demo-results");

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    const int code = app.exit(error);
    return code == 0 ? 0 : 2;
  }

  try {
    if (*run) return hv::run_command(options);
    if (*check) return hv::check_command(options);
    if (*mesh) return hv::mesh_command(options);
    if (*gases) return hv::gases_command();
    return hv::demo_command(options);
  } catch (const hv::InputError& error) {
    std::fprintf(stderr, "error: %s\n", error.what());
    return 2;
  } catch (const std::exception& error) {
    std::fprintf(stderr, "error: %s\n", error.what());
    return 1;
  }
}
