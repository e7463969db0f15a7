// report.md: the run told for a high-voltage engineer. Engineering units here (kV, kV/mm, mm, pF);
// the machine-readable files keep SI.
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "postproc/text_format.h"
#include "postproc/writers.h"

namespace hv {

namespace {

// Four significant digits: enough to compare designs, few enough to read.
constexpr int kReportDigits = 4;

std::string fixed_unit(double value_si, double unit_in_si) {
  return significant(value_si / unit_in_si, kReportDigits);
}
std::string kV(double volts) { return fixed_unit(volts, 1e3); }
std::string kV_per_mm(double volts_per_metre) { return fixed_unit(volts_per_metre, 1e6); }
std::string mm(double metres) { return fixed_unit(metres, 1e-3); }
std::string pF(double farads) { return fixed_unit(farads, 1e-12); }
std::string r_z_mm(const Point& at) { return mm(at.r) + ", " + mm(at.z); }

// The value with the SI prefix that puts it in [1, 1000): 3.3e-9 C -> "3.3 nC".
std::string with_prefix(double value, const std::string& unit) {
  static const struct {
    double scale;
    const char* prefix;
  } prefixes[] = {{1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"},
                  {1e-12, "p"}, {1e-15, "f"}};
  const double magnitude = std::abs(value);
  if (!std::isfinite(value) || magnitude == 0.0) return significant(value, kReportDigits) + " " + unit;
  for (const auto& [scale, prefix] : prefixes)
    if (magnitude >= scale) return significant(value / scale, kReportDigits) + " " + prefix + unit;
  return significant(value, kReportDigits) + " " + unit;
}

// Text for one table cell: a '|' would end the cell and a line break the row.
std::string cell(const std::string& text) {
  std::string out;
  for (const char c : text) {
    if (c == '|') out += "\\|";
    else if (c == '\n' || c == '\r') out += ' ';
    else out += c;
  }
  return out;
}

std::string table_row(const std::vector<std::string>& cells) {
  std::string out = "|";
  for (const std::string& text : cells) out += " " + text + " |";
  return out + "\n";
}

std::string table_header(const std::vector<std::string>& headings) {
  return table_row(headings) + table_row(std::vector<std::string>(headings.size(), "---"));
}

std::string one_line(const std::string& text) {
  std::string out = text;
  std::replace(out.begin(), out.end(), '\n', ' ');
  std::replace(out.begin(), out.end(), '\r', ' ');
  return out;
}

// ---- sections ----

std::string title_and_caution(const RunResults& results) {
  const std::string title = results.title.empty() ? "hvstress results" : one_line(results.title);
  return "# " + title + "\n\n" +
         "> **Caution.** High voltage can kill. These results are a design aid, not proof of safety: "
         "verify every design by test, and follow the local codes, standards and licensed practice.\n\n" +
         "Case `" + results.case_file + "`, hvstress " + results.version + ".\n\n";
}

std::string headline(const RunResults& results) {
  return "## Headline\n\nHighest surface field: **" + kV_per_mm(results.max_field_V_per_m) +
         " kV/mm** on electrode **" + one_line(results.max_field_electrode) + "** at r = " +
         mm(results.max_field_at.r) + " mm, z = " + mm(results.max_field_at.z) + " mm.\n\n";
}

std::string electrodes_table(const RunResults& results) {
  std::string out = "## Electrodes\n\n";
  out += table_header({"electrode", "potential (kV)", "floating", "charge", "max field (kV/mm)",
                       "at r, z (mm)", "max in gas (kV/mm)", "at r, z (mm)"});
  for (const ElectrodeResult& electrode : results.electrodes)
    out += table_row({cell(electrode.name), kV(electrode.potential_V), electrode.floating ? "yes" : "no",
                      with_prefix(electrode.charge_C, "C"), kV_per_mm(electrode.max_field_V_per_m),
                      r_z_mm(electrode.max_field_at), kV_per_mm(electrode.max_gas_field_V_per_m),
                      r_z_mm(electrode.max_gas_field_at)});
  out += "\nThe field in the gas decides corona; the field on a solid side stresses the insulation.\n";
  const bool any_floating = std::any_of(results.electrodes.begin(), results.electrodes.end(),
                                        [](const ElectrodeResult& electrode) { return electrode.floating; });
  if (any_floating) out += "Floating electrodes show the potential at which their net charge is zero.\n";
  if (results.has_ground_plane)
    out += "Charge on the ground plane: " + with_prefix(results.ground_plane_charge_C, "C") + ".\n";
  return out + "\n";
}

// Maxwell capacitance matrix: the charge on row electrode per volt on column electrode, the
// others at 0 V (diagonal positive, off-diagonal negative).
std::string capacitance_section(const RunResults& results) {
  const Eigen::MatrixXd& matrix = results.capacitance_F;
  std::string out = "## Capacitance matrix (pF)\n\n"
                    "Charge on the row electrode per volt on the column electrode, the others at 0 V.\n\n";
  std::vector<std::string> headings{"pF"};
  for (const ElectrodeResult& electrode : results.electrodes) headings.push_back(cell(electrode.name));
  out += table_header(headings);
  for (Eigen::Index i = 0; i < matrix.rows(); ++i) {
    std::vector<std::string> row{i < static_cast<Eigen::Index>(results.electrodes.size())
                                     ? cell(results.electrodes[static_cast<size_t>(i)].name)
                                     : std::to_string(i)};
    for (Eigen::Index j = 0; j < matrix.cols(); ++j) row.push_back(pF(matrix(i, j)));
    out += table_row(row);
  }
  return out + "\nStored energy: " + with_prefix(results.energy_J, "J") + ".\n\n";
}

// ---- discharge onset ----

std::string kPa(double pascals) { return fixed_unit(pascals, 1e3); }
std::string degC(double kelvin) { return significant(kelvin - 273.15, kReportDigits); }

// An inception voltage in kV, or the words for kNoInception.
std::string inception_kV(double volts) { return std::isfinite(volts) ? kV(volts) : "none found"; }
std::string margin_text(double margin) { return std::isfinite(margin) ? significant(margin, kReportDigits) : "none found"; }

std::string onset_headline(const OnsetResult& onset) {
  const OnsetSettings& settings = onset.settings;
  std::string out;
  if (std::isfinite(onset.inception_V))
    out += "Lowest inception voltage: **" + kV(onset.inception_V) + " kV** on electrode **" +
           one_line(onset.electrode) + "** at r = " + mm(onset.at.r) + " mm, z = " + mm(onset.at.z) + " mm.\n\n";
  else
    out += "No inception found: the criterion is not met at any start point within the voltage range "
           "searched.\n\n";
  out += "Margin against the operating voltage of " + kV(settings.operating_V) + " kV: **" +
         margin_text(onset.margin) + "**";
  if (std::isnan(settings.required_margin)) return out + " (no margin required).\n\n";
  return out + " (required " + significant(settings.required_margin, kReportDigits) + ": " +
         (onset.meets_required_margin() ? "met" : "**NOT met**") + ").\n\n";
}

std::string onset_electrodes_table(const OnsetResult& onset) {
  std::string out = table_header({"electrode", "inception (kV)", "margin", "at r, z (mm)"});
  for (const ElectrodeOnset& electrode : onset.electrodes) {
    const bool found = std::isfinite(electrode.inception_V);
    out += table_row({cell(electrode.electrode), inception_kV(electrode.inception_V), margin_text(electrode.margin),
                      found ? r_z_mm(electrode.at) : "-"});
  }
  return out + "\n";
}

// The stretches of electrode surface whose local inception voltage is below the threshold.
std::string onset_regions_list(const OnsetResult& onset) {
  const OnsetSettings& settings = onset.settings;
  const std::string threshold = std::isnan(settings.required_margin)
                                    ? "the operating voltage"
                                    : "operating x required margin (" +
                                          kV(settings.operating_V * settings.required_margin) + " kV)";
  std::string out = "Onset regions, where the local inception voltage lies below " + threshold + ":";
  if (onset.regions.empty()) return out + " none.\n\n";
  out += "\n\n" + table_header({"electrode", "from r, z (mm)", "to r, z (mm)", "s (mm)", "lowest margin"});
  for (const OnsetRegion& region : onset.regions)
    out += table_row({cell(region.electrode), r_z_mm(region.from), r_z_mm(region.to),
                      mm(region.s_from) + " to " + mm(region.s_to), significant(region.lowest_margin, kReportDigits)});
  return out + "\n";
}

std::string onset_criterion(const OnsetSettings& settings) {
  std::string out = settings.criterion == "townsend"
                        ? "- criterion: Townsend generation, gamma x integral of alpha exp(integral of alpha_eff) "
                          "from the cathode = 1, with gamma = " + significant(settings.gamma, kReportDigits) + "\n"
                        : "- criterion: streamer, the integral of alpha_eff over the ionization zone reaches K = " +
                              significant(settings.K, kReportDigits) + "\n";
  out += "- polarity: " + settings.polarity +
         (settings.polarity == "both" ? " (the lower inception voltage of the two is shown)" : "") + "\n";
  out += "- all fixed potentials are scaled together: a voltage here is the largest |fixed potential| of the "
         "case, and the field at voltage U is U / " + kV(settings.solved_V) + " kV times the solved field\n";
  return out;
}

// The altitude factor of IEC 60071-2, K_a = exp(m H / 8150 m), for context only. The altitude of
// the site is not an input, so H is the altitude whose air has this relative density under the
// exponential atmosphere with the same 8150 m scale height, delta = exp(-H / 8150 m); then
// K_a = 1 / delta for m = 1 (power frequency and lightning impulse).
std::string altitude_context(double delta) {
  const std::string prefix = "- altitude factor K_a = exp(m H / 8150 m) of IEC 60071-2, for context only, not part of "
                             "the criterion (which uses delta directly): ";
  if (!(delta < 1.0))
    return prefix + "this air is at least as dense as the reference atmosphere, so no altitude "
                    "correction applies (K_a = 1)\n";
  const double altitude_m = 8150.0 * std::log(1.0 / delta);
  return prefix + "this delta matches an altitude of about " + std::to_string(std::lround(altitude_m)) +
         " m by delta = exp(-H / 8150 m), where K_a = 1 / delta = " + significant(1.0 / delta, kReportDigits) +
         " (m = 1); the site's own altitude is not an input\n";
}

std::string onset_gas(const OnsetResult& onset) {
  std::string out = "- gas: " + one_line(onset.gas.title) + " (`" + onset.gas.key + "`)\n";
  out += "- state: p = " + kPa(onset.pressure_Pa) + " kPa, T = " + degC(onset.temperature_K) +
         " degC, relative density delta = " + significant(onset.relative_density, kReportDigits) +
         " (IEC 60060-1: 101.3 kPa, 293 K); critical field (alpha_eff = 0) " +
         kV_per_mm(onset.critical_field_V_per_m) + " kV/mm\n";
  return out + altitude_context(onset.relative_density);
}

std::string onset_section(const OnsetResult& onset) {
  std::string out = "## Discharge onset\n\n" + onset_headline(onset) + onset_electrodes_table(onset) +
                    onset_regions_list(onset) + onset_criterion(onset.settings) + onset_gas(onset);
  out += "- " + std::to_string(onset.starts.size()) + " start points, " + significant(onset.seconds, 3) + " s\n\n";
  out += "Onset warnings:";
  if (onset.warnings.empty()) out += " none.\n";
  else {
    out += "\n\n";
    for (const std::string& warning : onset.warnings) out += "- " + one_line(warning) + "\n";
  }
  return out + "\n> **Caution.** Computed inception voltages are engineering estimates. Inception must be "
               "confirmed by test to the applicable standards (e.g. IEC 60060-1 for high-voltage test "
               "techniques, IEC 60270 for partial-discharge measurement), and work must follow local codes "
               "and licensed practice.\n\n";
}

std::string mesh_section(const RunResults& results) {
  const MeshStats& stats = results.mesh_stats;
  std::string out = "## Mesh\n\n";
  if (results.mesh)
    out += results.mesh->order == 3   ? "- curved third-order triangles (10 nodes)\n"
           : results.mesh->order == 2 ? "- curved second-order triangles (6 nodes)\n"
                                      : "- straight first-order triangles (3 nodes)\n";
  out += "- " + std::to_string(stats.nodes) + " nodes, " + std::to_string(stats.triangles) +
         " triangles, " + std::to_string(stats.boundary_edges) + " boundary edges\n";
  out += "- element edges from " + mm(stats.min_size) + " mm to " + mm(stats.max_size) + " mm\n";
  out += "- degenerate triangles removed: " + std::to_string(stats.dropped_degenerate) + "\n\n";
  return out;
}

std::string solver_section(const RunResults& results) {
  const SolveReport& report = results.solve_report;
  std::string out = "## Solver\n\n";
  out += "- method: " + report.method + (report.ok ? "" : " (failed: " + one_line(report.message) + ")") + "\n";
  out += "- unknowns: " + std::to_string(report.dofs) + "\n";
  out += "- nonzeros of the factor: " + std::to_string(report.factor_nonzeros) + "\n";
  if (report.iterations > 0) out += "- conjugate-gradient iterations: " + std::to_string(report.iterations) + "\n";
  out += "- worst relative residual: " + significant(report.relative_residual, 3) + "\n\n";
  return out;
}

// A relative error as a percentage with two significant digits; "-" where there is none, "unbounded"
// where a result was not comparable (an inception voltage found on one mesh only).
std::string percent(double fraction) {
  if (std::isnan(fraction)) return "-";
  return std::isfinite(fraction) ? significant(100 * fraction, 2) + " %" : "unbounded";
}

std::string accuracy_history(const RunResults& results) {
  std::string out = table_header({"mesh", "order", "triangles", "unknowns", "energy-norm error", "highest field (kV/mm)",
                                  "inception (kV)", "seconds"});
  for (size_t k = 0; k < results.accuracy.steps.size(); ++k) {
    const AccuracyStep& step = results.accuracy.steps[k];
    const double highest = step.max_field_V_per_m.empty()
                               ? NAN
                               : *std::max_element(step.max_field_V_per_m.begin(), step.max_field_V_per_m.end());
    out += table_row({std::to_string(k + 1), std::to_string(step.order), std::to_string(step.triangles),
                      std::to_string(step.dofs), percent(step.energy_error), kV_per_mm(highest),
                      std::isnan(step.inception_V) ? "-" : inception_kV(step.inception_V),
                      significant(step.seconds, 3)});
  }
  return out;
}

// How far to trust the figures: the adaptive loop's verdict and estimated errors, or for a fixed mesh
// the energy-norm estimate alone.
std::string accuracy_section(const RunResults& results) {
  const Accuracy& accuracy = results.accuracy;
  std::string out = "## Accuracy\n\n";
  if (!accuracy.adaptive) {
    return out + "Fixed mesh (the case gives its sizes): the maximum fields were computed on one mesh only, so no "
                 "error is estimated for them. The Zienkiewicz-Zhu estimate of the relative error in the energy "
                 "norm is " + percent(accuracy.energy_error) + ". Leave the sizes out, or set "
                 "`mesh.adapt: {enabled: true}`, for estimated errors of every result.\n\n";
  }
  out += accuracy.converged
             ? "Adaptive refinement (Zienkiewicz-Zhu error estimate) reached the tolerance of " +
                   percent(accuracy.tolerance) + " after " + std::to_string(accuracy.steps.size()) + " meshes. "
             : "**Not converged:** adaptive refinement stopped after " + std::to_string(accuracy.steps.size()) +
                   " meshes (" + one_line(accuracy.stop_reason) + ") before every result changed by less than " +
                   percent(accuracy.tolerance) + ". ";
  out += "The estimated error of a result is its change from the mesh before the last.\n\n";
  out += table_header({"result", "value", "estimated error"});
  for (size_t e = 0; e < results.electrodes.size() && e < accuracy.max_field_error.size(); ++e)
    out += table_row({"maximum field on " + cell(results.electrodes[e].name) + " (kV/mm)",
                      kV_per_mm(results.electrodes[e].max_field_V_per_m), percent(accuracy.max_field_error[e])});
  if (results.onset.evaluated)
    out += table_row({"inception voltage (kV)", inception_kV(results.onset.inception_V), percent(accuracy.inception_error)});
  out += table_row({"energy norm (whole field)", "-", percent(accuracy.energy_error)});
  return out + "\n" + accuracy_history(results) + "\n";
}

std::string timings_section(const Timings& timings) {
  std::string out = "## Timings\n\n" + table_header({"stage", "seconds"});
  const std::pair<const char*, double> stages[] = {{"mesh", timings.mesh},
                                                   {"assemble", timings.assemble},
                                                   {"solve", timings.solve},
                                                   {"post-processing", timings.post},
                                                   {"total", timings.total}};
  for (const auto& [stage, seconds] : stages) out += table_row({stage, significant(seconds, 3)});
  return out + "\n";
}

std::string warnings_section(const RunResults& results) {
  std::string out = "## Warnings\n\n";
  if (results.warnings.empty()) return out + "None.\n\n";
  for (const std::string& warning : results.warnings) out += "- " + one_line(warning) + "\n";
  return out + "\n";
}

std::string parameters_section(const RunResults& results) {
  std::string out = "## Parameters (resolved, SI)\n\n" + table_header({"name", "value", "unit"});
  for (size_t i = 0; i < results.parameters.size(); ++i) {
    const std::string unit = i < results.parameter_units.size() ? results.parameter_units[i] : "";
    out += table_row({cell(results.parameters[i].first), significant(results.parameters[i].second, 10),
                      cell(unit)});
  }
  return out + "\n";
}

// The case file verbatim, in a code fence longer than any run of backticks inside it
// (CommonMark 0.30, section 4.5: a fence closes only with at least as many backticks).
std::string case_echo(const RunResults& results) {
  size_t longest_run = 0, run = 0;
  for (const char c : results.case_text) {
    run = c == '`' ? run + 1 : 0;
    longest_run = std::max(longest_run, run);
  }
  const std::string fence(std::max<size_t>(3, longest_run + 1), '`');
  std::string text = results.case_text;
  if (!text.empty() && text.back() != '\n') text += '\n';
  return "## Case\n\n" + fence + "yaml\n" + text + fence + "\n";
}

}  // namespace

std::string report_markdown(const RunResults& results) {
  return title_and_caution(results) + headline(results) + electrodes_table(results) +
         capacitance_section(results) + (results.onset.evaluated ? onset_section(results.onset) : "") +
         accuracy_section(results) + mesh_section(results) + solver_section(results) +
         timings_section(results.timings) + warnings_section(results) + parameters_section(results) +
         case_echo(results);
}

}  // namespace hv
