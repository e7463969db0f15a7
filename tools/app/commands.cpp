#include "tools/app/commands.h"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>

#include "postproc/writers.h"
#include "tools/app/finite_results.h"
#include "tools/app/output_folder.h"
#include "tools/app/progress.h"
#include "tools/app/run_case.h"
#include "tools/case/case.h"

namespace hv {

namespace {

std::string output_folder_for(const CommandOptions& options, const Case& the_case) {
  return options.output_dir.empty() ? the_case.output.dir : options.output_dir;
}

void print_warnings(const std::vector<std::string>& warnings) {
  for (const std::string& warning : warnings) std::fprintf(stderr, "warning: %s\n", warning.c_str());
}

// The short table on stdout: one row per electrode, then the headline and where the files are.
void print_run_table(const RunResults& results, const std::string& folder) {
  std::printf("%-16s %12s %9s %14s %14s %20s %14s %20s\n", "electrode", "potential kV", "floating", "charge nC",
              "max |E| kV/mm", "at (r, z) mm", "in gas kV/mm", "at (r, z) mm");
  for (const ElectrodeResult& electrode : results.electrodes) {
    std::printf("%-16s %12.3f %9s %14.4f %14.4f %9.2f, %9.2f %14.4f %9.2f, %9.2f\n", electrode.name.c_str(),
                electrode.potential_V / 1e3, electrode.floating ? "yes" : "no", electrode.charge_C * 1e9,
                electrode.max_field_V_per_m / 1e6, electrode.max_field_at.r * 1e3, electrode.max_field_at.z * 1e3,
                electrode.max_gas_field_V_per_m / 1e6, electrode.max_gas_field_at.r * 1e3,
                electrode.max_gas_field_at.z * 1e3);
  }
  std::printf("highest surface field %.4f kV/mm on %s at r = %.2f mm, z = %.2f mm\n",
              results.max_field_V_per_m / 1e6, results.max_field_electrode.c_str(),
              results.max_field_at.r * 1e3, results.max_field_at.z * 1e3);
  std::printf("%d unknowns, %.2f s; results in %s/\n", results.solve_report.dofs, results.timings.total,
              folder.c_str());
}

// One line on the onset: the lowest inception voltage, where, and the margin.
void print_onset_line(const OnsetResult& onset) {
  if (!onset.evaluated) return;
  if (onset.inception_V == kNoInception) {
    std::printf("discharge onset (%s): no inception found up to %.0f kV\n", onset.settings.criterion.c_str(),
                5.0 * onset.settings.operating_V / 1e3);
    return;
  }
  std::printf("discharge onset (%s): inception at %.1f kV on %s at r = %.2f mm, z = %.2f mm; margin %.3f at %.1f kV",
              onset.settings.criterion.c_str(), onset.inception_V / 1e3, onset.electrode.c_str(), onset.at.r * 1e3,
              onset.at.z * 1e3, onset.margin, onset.settings.operating_V / 1e3);
  if (!std::isnan(onset.settings.required_margin))
    std::printf(" (required %.3f: %s)", onset.settings.required_margin,
                onset.meets_required_margin() ? "met" : "NOT MET");
  std::printf("\n");
}

}  // namespace

int run_command(const CommandOptions& options) {
  const Case the_case = read_case(options.case_path, options.overrides);
  const std::string destination = output_folder_for(options, the_case);
  OutputFolder folder(destination);  // refuses before the long work, not after

  Progress progress(options.quiet);
  const auto outcome = compute_case(the_case, [&](const std::string& step) { progress.start(step); });
  progress.start("writing results");
  write_run_outputs(*outcome, the_case, folder.staging());
  folder.commit();
  progress.finish();

  print_warnings(outcome->results.warnings);
  print_warnings(outcome->results.onset.warnings);
  if (options.json) {
    std::fputs(summary_json(outcome->results).c_str(), stdout);
  } else {
    print_run_table(outcome->results, destination);
    print_onset_line(outcome->results.onset);
  }
  constexpr int kMarginMissed = 3;  // spec/cli.md
  return outcome->results.onset.meets_required_margin() ? 0 : kMarginMissed;
}

int gases_command() {
  for (const GasModelInfo& gas : gas_model_catalogue()) {
    std::printf("%s\n  in a case: %s\n  formula:  %s\n  valid:    %s\n  defaults: K = %g (streamer), "
                "gamma = %g (townsend)\n  source:   %s\n\n",
                gas.title.c_str(), gas.key.c_str(), gas.formula.c_str(), gas.valid_range.c_str(), gas.default_K,
                gas.default_gamma, gas.source.c_str());
  }
  return 0;
}

int check_command(const CommandOptions& options) {
  const Case the_case = read_case(options.case_path, options.overrides);
  if (the_case.onset.present) GasModel::from_spec(the_case.gas);  // reads and checks a gas table
  const std::vector<std::string> warnings = check_geometry(the_case.geometry);
  print_warnings(warnings);
  std::printf("%s: valid (%zu shapes, %zu electrodes, %zu materials, %zu parameters)\n",
              options.case_path.c_str(), the_case.geometry.shapes.size(), the_case.geometry.electrodes.size(),
              the_case.geometry.materials.size(), the_case.parameters.size());
  return 0;
}

int mesh_command(const CommandOptions& options) {
  const Case the_case = read_case(options.case_path, options.overrides);
  const std::string destination = output_folder_for(options, the_case);
  OutputFolder folder(destination);

  Progress progress(options.quiet);
  progress.start("meshing");
  const MeshResult meshed = build_mesh(the_case.geometry);
  progress.start("writing mesh");
  require_finite_mesh(meshed.mesh, meshed.stats);
  const std::filesystem::path staging(folder.staging());
  write_field_vtu((staging / "mesh.vtu").string(), meshed.mesh, nullptr);
  write_file_atomically((staging / "summary.json").string(), mesh_summary_json(meshed.mesh, meshed.stats));
  folder.commit();
  progress.finish();

  print_warnings(meshed.warnings);
  const MeshStats& stats = meshed.stats;
  std::printf("order %d: %d nodes, %d triangles, %d boundary edges, element size %.3g to %.3g mm, "
              "%d degenerate triangles dropped, %.2f s\nmesh in %s/mesh.vtu\n",
              meshed.mesh.order, stats.nodes, stats.triangles, stats.boundary_edges, stats.min_size * 1e3,
              stats.max_size * 1e3, stats.dropped_degenerate, stats.seconds, destination.c_str());
  return 0;
}

std::string bundled_cases_folder() {
  if (const char* from_environment = std::getenv("HVSTRESS_CASES")) return from_environment;
  return HV_CASES_DIR;
}

int demo_command(const CommandOptions& options) {
  CommandOptions demo = options;
  demo.case_path = (std::filesystem::path(bundled_cases_folder()) / "hv-terminal.yaml").string();
  if (demo.output_dir.empty()) demo.output_dir = "demo-results";
  if (!options.quiet) std::fprintf(stderr, "running the bundled demo case %s\n", demo.case_path.c_str());
  return run_command(demo);
}

}  // namespace hv
