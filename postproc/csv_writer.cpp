// surface-field.csv and onset.csv: one row per surface sample or onset start point, SI units,
// comma-separated as in RFC 4180 (Shafranov, IETF, 2005).
#include <cmath>
#include <string>
#include <vector>

#include "postproc/text_format.h"
#include "postproc/writers.h"

namespace hv {

namespace {

// Ten significant digits: far below the discretization error, still short to read.
constexpr int kCsvDigits = 10;


std::string csv_row(const std::string& surface, const std::string& region, size_t contour, const SurfaceSample& sample) {
  std::string row = csv_field(surface) + ',' + csv_field(region) + ',' + std::to_string(contour);
  for (const double value : {sample.s, sample.at.r, sample.at.z, sample.E_abs, sample.E_n, sample.E_t,
                             sample.sigma})
    row += ',' + significant(value, kCsvDigits);
  return row + '\n';
}

// An inception voltage or margin; empty when no inception was found (kNoInception).
std::string csv_inception(double value) { return std::isfinite(value) ? significant(value, kCsvDigits) : ""; }

// One start point; line_end is the reason its field line ended.
std::string onset_row(const OnsetStart& start, const std::vector<FieldLine>& lines) {
  const bool has_line = start.line >= 0 && start.line < static_cast<int>(lines.size());
  std::string row = csv_field(start.electrode);
  for (const double value : {start.s, start.at.r, start.at.z, start.E_operating, start.integral_operating})
    row += ',' + significant(value, kCsvDigits);
  row += ',' + csv_inception(start.inception_V) + ',' + csv_inception(start.margin);
  row += ',' + csv_field(start.polarity);
  row += ',' + (has_line ? to_string(lines[static_cast<size_t>(start.line)].end) : std::string());
  return row + '\n';
}

}  // namespace

std::string surface_field_csv(const RunResults& results) {
  std::string out = "surface,region,contour,s_m,r_m,z_m,E_abs_V_per_m,E_n_V_per_m,E_t_V_per_m,sigma_C_per_m2\n";
  for (const SurfaceField& surface : results.surfaces) {
    // The region the field is evaluated in: an electrode touching gas and a solid has a row for each.
    const bool known = results.mesh && surface.region >= 0 && surface.region < static_cast<int>(results.mesh->regions.size());
    const std::string region = known ? results.mesh->regions[static_cast<size_t>(surface.region)].name : "";
    for (size_t contour = 0; contour < surface.contours.size(); ++contour)
      for (const SurfaceSample& sample : surface.contours[contour])
        out += csv_row(surface.name, region, contour, sample);
  }
  return out;
}

std::string onset_csv(const RunResults& results) {
  std::string out =
      "electrode,s_m,r_m,z_m,E_operating_V_per_m,integral_operating,inception_V,margin,polarity,line_end\n";
  for (const OnsetStart& start : results.onset.starts) out += onset_row(start, results.onset.lines);
  return out;
}

}  // namespace hv
