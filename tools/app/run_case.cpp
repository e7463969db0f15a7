#include "tools/app/run_case.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <filesystem>

#include "postproc/surface_fields.h"
#include "postproc/writers.h"
#include "tools/app/adaptive.h"
#include "tools/app/finite_results.h"

namespace hv {

namespace {

double seconds_since(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

void announce(const StepListener& on_step, const std::string& step) {
  if (on_step) on_step(step);
}

// The highest recovered |E| on each conductor's surfaces, with its place, on any side and on the
// gas side.
void fill_electrode_maxima(RunResults& results) {
  auto raise = [](double& highest, Point& at, const SurfaceSample& sample) {
    if (sample.E_abs <= highest) return;
    highest = sample.E_abs;
    at = sample.at;
  };
  for (const SurfaceField& surface : results.surfaces) {
    if (surface.conductor < 0 || surface.conductor >= static_cast<int>(results.electrodes.size())) continue;
    ElectrodeResult& electrode = results.electrodes[static_cast<size_t>(surface.conductor)];
    const bool in_gas = results.mesh->regions[static_cast<size_t>(surface.region)].is_gas;
    for (const auto& contour : surface.contours) {
      for (const SurfaceSample& sample : contour) {
        raise(electrode.max_field_V_per_m, electrode.max_field_at, sample);
        if (in_gas) raise(electrode.max_gas_field_V_per_m, electrode.max_gas_field_at, sample);
      }
    }
  }
  for (const ElectrodeResult& electrode : results.electrodes) {
    if (electrode.max_field_V_per_m > results.max_field_V_per_m) {
      results.max_field_V_per_m = electrode.max_field_V_per_m;
      results.max_field_at = electrode.max_field_at;
      results.max_field_electrode = electrode.name;
    }
  }
}

void fill_case_echo(const Case& the_case, RunResults& results) {
  results.title = the_case.title;
  results.case_file = the_case.file;
  results.case_text = the_case.text;
  for (const Parameter& parameter : the_case.parameters) {
    results.parameters.emplace_back(parameter.name, parameter.value);
    results.parameter_units.push_back(parameter.unit);
  }
  results.version = HV_VERSION;
}

// The voltage that drives the field: the largest |fixed potential|. Onset scales all fixed
// potentials together, so inception voltages are values of this one.
double driving_voltage(const Case& the_case) {
  double largest = 0.0;
  for (const ElectrodeSpec& electrode : the_case.geometry.electrodes)
    if (!electrode.floating) largest = std::max(largest, std::abs(electrode.potential_V));
  return largest;
}

// Computes the field and the surface fields on `meshed`. Timings are this mesh's; total is filled
// later.
std::unique_ptr<RunOutcome> solve_one_mesh(const Case& the_case, MeshResult meshed, const StepListener& on_step) {
  auto outcome = std::make_unique<RunOutcome>();
  RunResults& results = outcome->results;
  outcome->meshed = std::move(meshed);
  const Mesh& mesh = outcome->meshed.mesh;
  results.mesh = &mesh;
  results.mesh_stats = outcome->meshed.stats;
  results.warnings = outcome->meshed.warnings;
  results.timings.mesh = outcome->meshed.stats.seconds;

  announce(on_step, "solving");
  outcome->solution = solve_field(field_problem(the_case, mesh));
  const FieldSolution& solution = outcome->solution;
  results.solve_report = solution.report;
  results.timings.assemble = solution.report.seconds_assemble;
  results.timings.solve = solution.report.seconds_factorize + solution.report.seconds_solve;

  announce(on_step, "recovering surface fields");
  const auto post_start = std::chrono::steady_clock::now();
  results.potential = solution.potential;
  results.node_field = nodal_field(mesh, solution.potential);
  results.surfaces = surface_fields(mesh, solution.potential);
  const auto& electrodes = the_case.geometry.electrodes;
  const Eigen::Index n_case = static_cast<Eigen::Index>(electrodes.size());
  for (size_t i = 0; i < electrodes.size(); ++i) {
    ElectrodeResult electrode;
    electrode.name = electrodes[i].name;
    electrode.floating = electrodes[i].floating;
    electrode.potential_V = solution.conductor_potential_V[i];
    electrode.charge_C = solution.conductor_charge_C[i];
    results.electrodes.push_back(electrode);
  }
  fill_electrode_maxima(results);
  results.capacitance_F = solution.capacitance_F.topLeftCorner(n_case, n_case);
  results.energy_J = solution.energy_J;
  results.has_ground_plane = the_case.geometry.ground_plane.present;
  if (results.has_ground_plane) results.ground_plane_charge_C = solution.conductor_charge_C.back();
  results.timings.post = seconds_since(post_start);
  return outcome;
}

}  // namespace

FieldProblem field_problem(const Case& the_case, const Mesh& mesh) {
  FieldProblem problem;
  problem.mesh = &mesh;
  for (const ElectrodeSpec& electrode : the_case.geometry.electrodes) {
    problem.conductors.push_back({electrode.name, electrode.floating, electrode.potential_V});
  }
  if (the_case.geometry.ground_plane.present) {
    problem.conductors.push_back({"ground_plane", false, 0.0});
    problem.far_field_c = 2.0;
  }
  return problem;
}

std::unique_ptr<RunOutcome> compute_case(const Case& the_case, const StepListener& on_step) {
  const auto start = std::chrono::steady_clock::now();
  // The gas first: a bad table or setting is bad input, and should cost no meshing.
  std::optional<GasModel> gas;
  std::optional<OnsetSettings> onset_settings;
  if (the_case.onset.present) {
    gas = GasModel::from_spec(the_case.gas);
    onset_settings = resolve_onset_settings(the_case.onset, *gas, driving_voltage(the_case));
  }
  auto solve_step = [&](MeshResult meshed) { return solve_one_mesh(the_case, std::move(meshed), on_step); };
  OnsetEvaluator onset;
  if (onset_settings) {
    onset = [&](RunOutcome& step) {
      announce(on_step, "evaluating discharge onset");
      step.results.onset = evaluate_onset(step.meshed.mesh, step.solution.potential, step.results.surfaces, *gas,
                                          *onset_settings);
    };
  }

  std::unique_ptr<RunOutcome> outcome;
  if (the_case.geometry.mesh.adaptive()) {
    outcome = run_adaptive(the_case, solve_step, onset, on_step);
  } else {
    announce(on_step, "meshing");
    outcome = solve_step(build_mesh(the_case.geometry));
    if (onset) onset(*outcome);
    // A fixed mesh still gets the global estimate; its maxima have no second mesh to compare with.
    Accuracy& accuracy = outcome->results.accuracy;
    accuracy.energy_error = zz_error_estimate(outcome->meshed.mesh, outcome->solution.potential).relative();
    accuracy.max_field_error.assign(outcome->results.electrodes.size(), NAN);
  }
  outcome->gas = std::move(gas);
  fill_case_echo(the_case, outcome->results);
  outcome->results.timings.total = seconds_since(start);
  return outcome;
}

void write_run_outputs(const RunOutcome& outcome, const Case& the_case, const std::string& dir) {
  const RunResults& results = outcome.results;
  const std::filesystem::path folder(dir);
  const OutputSpec& wanted = the_case.output;
  require_finite_results(results);  // before the first file: no NaN reaches any of them
  if (wanted.vtk) {
    write_field_vtu((folder / "field.vtu").string(), *results.mesh, &results);
    write_surfaces_vtp((folder / "surfaces.vtp").string(), results);
  }
  if (wanted.csv) write_file_atomically((folder / "surface-field.csv").string(), surface_field_csv(results));
  if (results.onset.evaluated) {
    if (wanted.csv) write_file_atomically((folder / "onset.csv").string(), onset_csv(results));
    if (wanted.vtk) write_fieldlines_vtp((folder / "fieldlines.vtp").string(), results, *outcome.gas);
  }
  if (wanted.report) write_file_atomically((folder / "report.md").string(), report_markdown(results));
  // summary.json last: its presence marks a complete result.
  write_file_atomically((folder / "summary.json").string(), summary_json(results));
}

}  // namespace hv
