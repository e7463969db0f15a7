// summary.json, written by hand: the schema is small and fixed, and a JSON library would be one
// more dependency for ~100 lines. Grammar and escaping follow RFC 8259 (Bray, IETF, 2017).
#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include "postproc/text_format.h"
#include "postproc/writers.h"

namespace hv {

namespace {

std::string json_integer(long long value) { return std::to_string(value); }

std::string json_bool(bool value) { return value ? "true" : "false"; }

// Already rendered values on one line: [a, b, c].
std::string json_array(const std::vector<std::string>& items) {
  std::string out = "[";
  for (size_t i = 0; i < items.size(); ++i) out += (i ? ", " : "") + items[i];
  return out + "]";
}

std::string json_point(const Point& at) { return json_array({json_number(at.r), json_number(at.z)}); }

std::string json_string_array(const std::vector<std::string>& texts) {
  std::vector<std::string> items;
  for (const std::string& text : texts) items.push_back(json_string(text));
  return json_array(items);
}

// (key, rendered value) pairs of one object, in writing order.
using Members = std::vector<std::pair<std::string, std::string>>;

// An object with one member per line, its members indented one level deeper than `depth`
// (two spaces per level), so that nested objects line up when rendered with depth + 1.
std::string json_object(const Members& members, int depth) {
  if (members.empty()) return "{}";
  const std::string inner(2 * static_cast<size_t>(depth + 1), ' ');
  std::string out = "{\n";
  for (size_t i = 0; i < members.size(); ++i) {
    out += inner + json_string(members[i].first) + ": " + members[i].second;
    out += i + 1 < members.size() ? ",\n" : "\n";
  }
  return out + std::string(2 * static_cast<size_t>(depth), ' ') + "}";
}

std::string parameters_object(const RunResults& results, int depth) {
  Members members;
  for (const auto& [name, value] : results.parameters) members.emplace_back(name, json_number(value));
  return json_object(members, depth);
}

// The SI unit text of every parameter that has one.
std::string parameter_units_object(const RunResults& results, int depth) {
  Members members;
  for (size_t i = 0; i < results.parameters.size() && i < results.parameter_units.size(); ++i)
    members.emplace_back(results.parameters[i].first, json_string(results.parameter_units[i]));
  return json_object(members, depth);
}

// The figures of a mesh; `order` is 0 when the mesh itself is not at hand (written as null).
Members mesh_members(int order, const MeshStats& stats) {
  return {{"order", order > 0 ? json_integer(order) : "null"},
          {"nodes", json_integer(stats.nodes)},
          {"triangles", json_integer(stats.triangles)},
          {"boundary_edges", json_integer(stats.boundary_edges)},
          {"dropped_degenerate", json_integer(stats.dropped_degenerate)},
          {"min_size_m", json_number(stats.min_size)},
          {"max_size_m", json_number(stats.max_size)}};
}

std::string mesh_object(const RunResults& results, int depth) {
  Members members = mesh_members(results.mesh ? results.mesh->order : 0, results.mesh_stats);
  members.emplace_back("dofs", json_integer(results.solve_report.dofs));
  return json_object(members, depth);
}

std::string solver_object(const RunResults& results, int depth) {
  const SolveReport& report = results.solve_report;
  Members members{{"ok", json_bool(report.ok)},
                  {"method", json_string(report.method)},
                  {"dofs", json_integer(report.dofs)},
                  {"factor_nonzeros", json_integer(report.factor_nonzeros)},
                  {"iterations", json_integer(report.iterations)},
                  {"relative_residual", json_number(report.relative_residual)},
                  {"seconds_assemble", json_number(report.seconds_assemble)},
                  {"seconds_factorize", json_number(report.seconds_factorize)},
                  {"seconds_solve", json_number(report.seconds_solve)}};
  if (!report.message.empty()) members.emplace_back("message", json_string(report.message));
  return json_object(members, depth);
}

std::string electrodes_object(const RunResults& results, int depth) {
  Members members;
  for (const ElectrodeResult& electrode : results.electrodes) {
    members.emplace_back(electrode.name,
                         json_object({{"potential_V", json_number(electrode.potential_V)},
                                      {"floating", json_bool(electrode.floating)},
                                      {"charge_C", json_number(electrode.charge_C)},
                                      {"max_field_V_per_m", json_number(electrode.max_field_V_per_m)},
                                      {"max_field_at_m", json_point(electrode.max_field_at)},
                                      {"max_gas_field_V_per_m", json_number(electrode.max_gas_field_V_per_m)},
                                      {"max_gas_field_at_m", json_point(electrode.max_gas_field_at)}},
                                     depth + 1));
  }
  return json_object(members, depth);
}

// Already rendered items, one per line, indented one level deeper than `depth` (objects among them
// rendered with depth + 1 line up).
std::string json_block_array(const std::vector<std::string>& items, int depth) {
  if (items.empty()) return "[]";
  const std::string inner(2 * static_cast<size_t>(depth + 1), ' ');
  std::string out = "[\n";
  for (size_t i = 0; i < items.size(); ++i) out += inner + items[i] + (i + 1 < items.size() ? ",\n" : "\n");
  return out + std::string(2 * static_cast<size_t>(depth), ' ') + "]";
}

// Rows on one line each, in the order of `electrodes` in the case.
std::string capacitance_matrix(const RunResults& results, int depth) {
  const Eigen::MatrixXd& matrix = results.capacitance_F;
  std::vector<std::string> rows;
  for (Eigen::Index i = 0; i < matrix.rows(); ++i) {
    std::vector<std::string> row;
    for (Eigen::Index j = 0; j < matrix.cols(); ++j) row.push_back(json_number(matrix(i, j)));
    rows.push_back(json_array(row));
  }
  return json_block_array(rows, depth);
}

std::string timings_object(const Timings& timings, int depth) {
  return json_object({{"mesh", json_number(timings.mesh)},
                      {"assemble", json_number(timings.assemble)},
                      {"solve", json_number(timings.solve)},
                      {"post", json_number(timings.post)},
                      {"total", json_number(timings.total)}},
                     depth);
}

// ---- onset ----

// Where an inception voltage lies, the voltage and its margin. kNoInception (not reached in the
// searched range) has no JSON form: it is written as null beside an explicit "inception_found": false.
Members inception_members(const std::string& electrode, double inception_V, double margin, const Point& at) {
  const bool found = std::isfinite(inception_V);
  return {{"electrode", electrode.empty() ? "null" : json_string(electrode)},
          {"inception_found", json_bool(found)},
          {"inception_voltage_V", json_number(inception_V)},
          {"margin", json_number(margin)},
          {"at_m", found ? json_point(at) : "null"}};
}

std::string onset_electrodes(const OnsetResult& onset, int depth) {
  std::vector<std::string> items;
  for (const ElectrodeOnset& electrode : onset.electrodes)
    items.push_back(json_object(
        inception_members(electrode.electrode, electrode.inception_V, electrode.margin, electrode.at), depth + 1));
  return json_block_array(items, depth);
}

std::string onset_regions(const OnsetResult& onset, int depth) {
  std::vector<std::string> items;
  for (const OnsetRegion& region : onset.regions)
    items.push_back(json_object({{"electrode", json_string(region.electrode)},
                                 {"s_from_m", json_number(region.s_from)},
                                 {"s_to_m", json_number(region.s_to)},
                                 {"from_m", json_point(region.from)},
                                 {"to_m", json_point(region.to)},
                                 {"lowest_margin", json_number(region.lowest_margin)}},
                                depth + 1));
  return json_block_array(items, depth);
}

std::string gas_state_object(const OnsetResult& onset, int depth) {
  return json_object({{"pressure_Pa", json_number(onset.pressure_Pa)},
                      {"temperature_K", json_number(onset.temperature_K)},
                      {"relative_density", json_number(onset.relative_density)},
                      {"number_density_per_m3", json_number(onset.number_density)},
                      {"critical_field_V_per_m", json_number(onset.critical_field_V_per_m)}},
                     depth);
}

// The lowest inception voltage with the contract's keys (electrode, inception_voltage_V, margin, at_m,
// criterion, K, gas), then the resolved settings, the per-electrode results, the onset regions and the
// gas state.
std::string onset_object(const OnsetResult& onset, int depth) {
  const OnsetSettings& settings = onset.settings;
  Members members = inception_members(onset.electrode, onset.inception_V, onset.margin, onset.at);
  const Members more{{"criterion", json_string(settings.criterion)},
                     {"K", json_number(settings.K)},
                     {"gamma", json_number(settings.gamma)},
                     {"gas", json_string(onset.gas.key)},
                     {"gas_title", json_string(onset.gas.title)},
                     {"polarity", json_string(settings.polarity)},
                     {"operating_V", json_number(settings.operating_V)},
                     {"solved_V", json_number(settings.solved_V)},
                     {"required_margin", json_number(settings.required_margin)},
                     {"meets_required_margin", json_bool(onset.meets_required_margin())},
                     {"electrodes", onset_electrodes(onset, depth + 1)},
                     {"regions", onset_regions(onset, depth + 1)},
                     {"gas_state", gas_state_object(onset, depth + 1)},
                     {"start_points", json_integer(static_cast<long long>(onset.starts.size()))},
                     {"seconds", json_number(onset.seconds)},
                     {"warnings", json_string_array(onset.warnings)}};
  members.insert(members.end(), more.begin(), more.end());
  return json_object(members, depth);
}

// ---- accuracy ----

// One value per electrode, keyed by name.
std::string per_electrode(const RunResults& results, const std::vector<double>& values, int depth) {
  Members members;
  for (size_t e = 0; e < results.electrodes.size() && e < values.size(); ++e)
    members.emplace_back(results.electrodes[e].name, json_number(values[e]));
  return json_object(members, depth);
}

std::string accuracy_steps(const RunResults& results, int depth) {
  std::vector<std::string> items;
  for (const AccuracyStep& step : results.accuracy.steps)
    items.push_back(json_object({{"order", json_integer(step.order)},
                                 {"triangles", json_integer(step.triangles)},
                                 {"dofs", json_integer(step.dofs)},
                                 {"energy_error", json_number(step.energy_error)},
                                 {"max_field_V_per_m", per_electrode(results, step.max_field_V_per_m, depth + 2)},
                                 {"inception_voltage_V", json_number(step.inception_V)},
                                 {"seconds", json_number(step.seconds)}},
                                depth + 1));
  return json_block_array(items, depth);
}

// Estimated relative errors (null where there is no estimate) and, for an adaptive run, its record.
std::string accuracy_object(const RunResults& results, int depth) {
  const Accuracy& accuracy = results.accuracy;
  Members members{{"adaptive", json_bool(accuracy.adaptive)},
                  {"converged", json_bool(accuracy.converged)},
                  {"tolerance", json_number(accuracy.tolerance)},
                  {"steps", json_integer(static_cast<long long>(accuracy.steps.size()))},
                  {"max_steps", json_integer(accuracy.max_steps)},
                  {"energy_error", json_number(accuracy.energy_error)},
                  {"max_field_error", per_electrode(results, accuracy.max_field_error, depth + 1)},
                  {"inception_voltage_error", json_number(accuracy.inception_error)}};
  if (accuracy.adaptive) {
    members.emplace_back("stop_reason", json_string(accuracy.stop_reason));
    members.emplace_back("history", accuracy_steps(results, depth + 1));
  }
  return json_object(members, depth);
}

}  // namespace

std::string summary_json(const RunResults& results) {
  std::vector<std::string> electrode_names;
  for (const ElectrodeResult& electrode : results.electrodes) electrode_names.push_back(electrode.name);

  Members members{
      {"format", json_string("hvstress-summary/1")},
      {"version", json_string(results.version)},
      {"title", json_string(results.title)},
      {"case_file", json_string(results.case_file)},
      {"parameters", parameters_object(results, 1)},
      {"parameter_units", parameter_units_object(results, 1)},
      {"mesh", mesh_object(results, 1)},
      {"solver", solver_object(results, 1)},
      {"electrodes", electrodes_object(results, 1)},
      // JSON objects are unordered; this fixes the order of the capacitance rows and columns.
      {"capacitance_order", json_string_array(electrode_names)},
      {"max_field", json_object({{"V_per_m", json_number(results.max_field_V_per_m)},
                                 {"electrode", json_string(results.max_field_electrode)},
                                 {"at_m", json_point(results.max_field_at)}},
                                1)},
      {"capacitance_matrix_F", capacitance_matrix(results, 1)},
      {"energy_J", json_number(results.energy_J)},
  };
  if (results.has_ground_plane)
    members.emplace_back("ground_plane_charge_C", json_number(results.ground_plane_charge_C));
  if (results.onset.evaluated) members.emplace_back("onset", onset_object(results.onset, 1));
  members.emplace_back("accuracy", accuracy_object(results, 1));
  members.emplace_back("timings_s", timings_object(results.timings, 1));
  members.emplace_back("warnings", json_string_array(results.warnings));
  return json_object(members, 0) + "\n";
}

std::string mesh_summary_json(const Mesh& mesh, const MeshStats& stats) {
  Members members = mesh_members(mesh.order, stats);
  members.insert(members.begin(), {"format", json_string("hvstress-mesh/1")});
  members.emplace_back("seconds", json_number(stats.seconds));
  return json_object(members, 0) + "\n";
}

}  // namespace hv
