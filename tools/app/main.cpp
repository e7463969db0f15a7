// hvstress: the command line (spec/cli.md). Parses options with CLI11 and hands over to the
// subcommands in commands.cpp; maps errors to exit codes: 2 bad input or usage, 1 other failures.
#include <algorithm>
#include <cstdio>
#include <exception>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

#include "mesh/base.h"
#include "tools/app/blas_threads.h"
#include "tools/app/commands.h"
#include "tools/app/compare.h"
#include "tools/app/optimize.h"
#include "tools/app/sweep.h"
#include "tools/case/suggest.h"

namespace {

// More parallel runs than this is a typo, not a machine.
constexpr int kMostJobs = 1024;

constexpr const char* kCaution =
    "CAUTION: high voltage can kill. hvstress computes fields of an idealised model; its results are a\n"
    "design aid, not proof of safety. Verify designs by test, and follow local codes, standards and\n"
    "licensed practice for every high-voltage installation and test.";

void add_case_options(CLI::App& command, hv::CommandOptions& options) {
  command.add_option("CASE", options.case_path, "the case file (YAML)")->required()->check(CLI::ExistingFile);
  command.add_option("--set", options.overrides,
                     "override a parameter, NAME=VALUE in the case file's syntax (repeatable)");
}

// A number between 0 and 1, both excluded (CLI11's own range check prints its bounds to 300 digits).
const CLI::Validator kFraction(
    [](std::string& text) {
      double value = 0.0;
      if (CLI::detail::lexical_cast(text, value) && value > 0.0 && value < 1.0) return std::string();
      return "must lie between 0 and 1, got " + text;
    },
    "FRACTION");

// CLI11 answers a misspelt command with "A subcommand is required"; this names the word instead,
// with the nearest command. Empty when the first word that is no option is a command (or there
// is none). The top-level options take no values, so that word is the command.
std::string unknown_command(CLI::App& app, int argc, char** argv) {
  for (int i = 1; i < argc; ++i) {
    const std::string word = argv[i];
    if (word.rfind('-', 0) == 0) continue;
    std::vector<std::string> names;
    for (const CLI::App* command : app.get_subcommands([](const CLI::App*) { return true; }))
      names.push_back(command->get_name());
    if (std::find(names.begin(), names.end(), word) != names.end()) return "";
    const std::string suggestion = hv::did_you_mean(word, names);
    return "unknown command `" + word + "`. " + (suggestion.empty() ? "Commands: " + hv::quoted_list(names) : suggestion);
  }
  return "";
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

  CLI::App* run = app.add_subcommand("run", "mesh, solve, evaluate discharge onset and write the results of a case");
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

  hv::SweepOptions sweep_options;
  CLI::App* sweep = app.add_subcommand("sweep", "run every variant of a case and compare them");
  sweep->add_option("CASE", sweep_options.case_path, "the case file (YAML)")->required()->check(CLI::ExistingFile);
  sweep->add_option("--vary", sweep_options.varies,
                    "NAME=SPEC: a list 30mm,40mm,50mm or a range LO:HI:COUNT (repeatable: a full grid)")
      ->required();
  sweep->add_flag("--zip", sweep_options.zip, "pair the k-th values of every --vary instead of a full grid");
  sweep->add_option("--set", sweep_options.overrides, "override a parameter for every variant, NAME=VALUE");
  sweep->add_option("-o,--output", sweep_options.output_dir, "sweep folder (default: <case output.dir>-sweep)");
  sweep->add_option("--jobs", sweep_options.jobs, "variants run at once (default: the number of cores)")
      ->check(CLI::Range(0, kMostJobs));
  sweep->add_option("--shard", sweep_options.shard, "K/N: run only every N-th variant starting at the K-th");
  sweep->footer("example: hvstress sweep cases/ring-study.yaml --vary ring_R=200mm:400mm:5 --vary tube_r=30mm,50mm");

  std::vector<std::string> compare_folders;
  std::string compare_output;
  CLI::App* compare = app.add_subcommand("compare", "put finished runs or sweeps side by side");
  compare->add_option("RESULT_DIR", compare_folders, "run or sweep folders")->required()->check(CLI::ExistingDirectory);
  compare->add_option("-o,--output", compare_output, "comparison folder (default: comparison)");
  compare->footer("example: hvstress compare ring-a ring-b ring-sweep -o ring-comparison");

  hv::OptimizeOptions optimize_options;
  CLI::App* optimize = app.add_subcommand("optimize", "search the parameters of a case for the best design");
  optimize->add_option("CASE", optimize_options.case_path, "the case file (YAML)")->required()->check(CLI::ExistingFile);
  optimize->add_option("--vary", optimize_options.varies, "NAME=LO:HI (repeatable)")->required();
  optimize->add_option("--goal", optimize_options.goal, "max-inception, min-field or min-size-with-margin")
      ->required()
      ->check(CLI::IsMember({"max-inception", "min-field", "min-size-with-margin"}));
  optimize->add_option("--set", optimize_options.overrides, "override a parameter, NAME=VALUE");
  optimize->add_option("--tolerance", optimize_options.tolerance, "stop when the parameters are known to this "
                       "fraction of their ranges (default 1e-3)")->check(kFraction);
  optimize->add_option("-o,--output", optimize_options.output_dir, "folder (default: <case output.dir>-optimize)");
  optimize->footer("example: hvstress optimize cases/ring-study.yaml --vary tube_r=20mm:80mm --goal min-size-with-margin");

  CLI::App* gases = app.add_subcommand("gases", "list the built-in gas models: formula, range of validity, source");
  gases->footer("example: hvstress gases");

  CLI::App* demo = app.add_subcommand("demo", "run the bundled demo case and say where the results are");
  add_output_options(*demo, options);
  demo->add_flag("--json", options.json, "print summary.json to stdout instead of the table");
  demo->footer("example: hvstress demo -o demo-results");

  if (const std::string problem = unknown_command(app, argc, argv); !problem.empty()) {
    std::fprintf(stderr, "error: %s\nRun with --help for more information.\n", problem.c_str());
    return 2;
  }
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    const int code = app.exit(error);
    return code == 0 ? 0 : 2;
  }

  hv::use_one_blas_thread();  // bit-identical results whatever the thread settings
  try {
    if (*run) return hv::run_command(options);
    if (*check) return hv::check_command(options);
    if (*mesh) return hv::mesh_command(options);
    if (*gases) return hv::gases_command();
    if (*sweep) {
      sweep_options.quiet = options.quiet;
      sweep_options.binary = argv[0];
      return hv::sweep_command(sweep_options);
    }
    if (*compare) return hv::compare_command(compare_folders, compare_output, options.quiet);
    if (*optimize) {
      optimize_options.quiet = options.quiet;
      return hv::optimize_command(optimize_options);
    }
    return hv::demo_command(options);
  } catch (const hv::InputError& error) {
    std::fprintf(stderr, "error: %s\n", error.what());
    return 2;
  } catch (const std::exception& error) {
    std::fprintf(stderr, "error: %s\n", error.what());
    return 1;
  }
}
