#include "tools/app/compare_files.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>

#include "postproc/svg_chart.h"
#include "postproc/text_format.h"

namespace hv {

namespace fs = std::filesystem;

namespace {

// Up to 17 significant digits, the shortest text that reads back to the same double, as summary.json
// writes it; empty when the value is not finite (summary.json's null).
std::string csv_number(double value) { return std::isfinite(value) ? round_trip_number(value) : ""; }

// "V/m" -> "V_per_m", so a heading reads NAME_unit like the other CSV files' headings.
std::string unit_suffix(const std::string& unit) {
  std::string out;
  for (const char c : unit) out += c == '/' ? std::string("_per_") : std::string(1, std::isalnum(static_cast<unsigned char>(c)) ? c : '_');
  return out.empty() ? out : "_" + out;
}

// Every electrode name of the runs, in order of first appearance.
std::vector<std::string> electrode_names(const std::vector<LoadedRun>& runs) {
  std::vector<std::string> names;
  for (const LoadedRun& run : runs)
    for (const SummaryElectrode& electrode : run.summary.electrodes)
      if (std::find(names.begin(), names.end(), electrode.name) == names.end()) names.push_back(electrode.name);
  return names;
}

// The value of a varied parameter: the run's exact SI value, else (a failed variant) its setting text.
std::string parameter_cell(const LoadedRun& run, const std::string& name) {
  if (run.has_summary) return csv_number(run.summary.parameter(name));
  for (const auto& [setting, value] : run.run.varied)
    if (setting == name) return value;
  return "";
}

std::string run_row(const LoadedRun& run, const std::vector<std::string>& varied, const std::vector<std::string>& electrodes) {
  const RunSummary& summary = run.summary;
  std::vector<std::string> cells{run.run.label};
  for (const std::string& name : varied) cells.push_back(parameter_cell(run, name));
  cells.push_back(run.has_summary ? "finished" : "failed");
  if (run.has_summary) {
    cells.insert(cells.end(), {csv_number(summary.max_field_V_per_m), summary.max_field_electrode,
                               csv_number(summary.max_field_at.r), csv_number(summary.max_field_at.z)});
  } else {
    cells.insert(cells.end(), 4, "");
  }
  std::vector<std::string> capacitances;
  for (const std::string& name : electrodes) {
    std::string field, capacitance;
    for (size_t i = 0; i < summary.electrodes.size(); ++i)
      if (summary.electrodes[i].name == name) {
        field = csv_number(summary.electrodes[i].max_field_V_per_m);
        capacitance = i < summary.capacitance_F.size() ? csv_number(summary.capacitance_F[i][i]) : "";
      }
    cells.push_back(field);
    capacitances.push_back(capacitance);
  }
  const SummaryOnset& onset = summary.onset;
  cells.push_back(onset.evaluated ? csv_number(onset.inception_V) : "");
  cells.push_back(onset.evaluated ? csv_number(onset.margin) : "");
  cells.push_back(onset.evaluated && std::isfinite(onset.required_margin) ? (onset.meets_required_margin ? "true" : "false") : "");
  cells.insert(cells.end(), capacitances.begin(), capacitances.end());
  cells.push_back(run.run.message);

  std::string line;
  for (size_t i = 0; i < cells.size(); ++i) line += (i ? "," : "") + csv_field(cells[i]);
  return line + "\n";
}

}  // namespace

std::string sweep_csv(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied) {
  const std::vector<std::string> electrodes = electrode_names(runs);
  std::vector<std::string> headings{"label"};
  for (const std::string& name : varied) headings.push_back(name + unit_suffix(parameter_unit(runs, name)));
  headings.insert(headings.end(), {"status", "max_field_V_per_m", "max_field_electrode", "max_field_r_m", "max_field_z_m"});
  for (const std::string& name : electrodes) headings.push_back(name + "_max_field_V_per_m");
  headings.insert(headings.end(), {"inception_voltage_V", "margin", "meets_required_margin"});
  for (const std::string& name : electrodes) headings.push_back(name + "_capacitance_F");
  headings.push_back("message");

  std::string out;
  for (size_t i = 0; i < headings.size(); ++i) out += (i ? "," : "") + csv_field(headings[i]);
  out += "\n";
  for (const LoadedRun& run : runs) out += run_row(run, varied, electrodes);
  return out;
}

std::string sweep_pvd(const std::vector<LoadedRun>& runs, const std::string& output_dir) {
  const fs::path base = fs::absolute(output_dir);
  std::string out = "<?xml version=\"1.0\"?>\n"
                    "<VTKFile type=\"Collection\" version=\"0.1\" byte_order=\"LittleEndian\">\n  <Collection>\n";
  for (const LoadedRun& run : runs) {
    const fs::path field = fs::absolute(run.run.folder) / "field.vtu";
    if (!run.has_summary || !fs::exists(field)) continue;
    out += "    <DataSet timestep=\"" + std::to_string(run.index) + "\" part=\"0\" name=\"" + xml_escape(run.run.label) +
           "\" file=\"" + xml_escape(fs::relative(field, base).generic_string()) + "\"/>\n";
  }
  return out + "  </Collection>\n</VTKFile>\n";
}

}  // namespace hv
