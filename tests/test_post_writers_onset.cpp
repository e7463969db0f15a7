// The onset parts of the output writers (summary.json "onset", onset.csv, the onset arrays of
// surfaces.vtp, fieldlines.vtp and the report's "Discharge onset" section), on a hand-made onset
// result: two electrodes, one of them without inception, one onset region, four field lines. The
// files are read back by readers outside the project (Python's json module, VTK's XML readers, see
// writers_fixture.h); the values along the field lines are recomputed here from the gas model.
#include <algorithm>
#include <cmath>
#include <set>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "postproc/gas.h"
#include "postproc/writers.h"
#include "writers_fixture.h"

namespace hv {
namespace {

using namespace hv::testing;

constexpr double kSolved_V = 1e5;     // the sample run's highest fixed potential ("hv")
constexpr double kOperating_V = 90e3;
constexpr double kRequiredMargin = 1.2;
constexpr double kPressure_Pa = 80e3;
constexpr double kTemperature_K = 303.15;  // 30 degC

// Relative air density of IEC 60060-1: delta = (p / 101.3 kPa)(293 K / T).
double iec_relative_density(double pressure_Pa, double temperature_K) {
  return (pressure_Pa / 101.3e3) * (293.0 / temperature_K);
}

// A line of n points along z from `start`, spaced `step` m apart, with |E| (at the solved voltage)
// given by `field(s)`.
template <typename Field>
FieldLine straight_line(Point start, int n, double step, Field field, LineEnd end) {
  FieldLine line;
  for (int k = 0; k < n; ++k) {
    const double s = k * step;
    line.points.push_back({{start.r, start.z + s}, s, field(s)});
  }
  line.end = end;
  return line;
}

OnsetStart start_point(const std::string& electrode, double s, Point at, double inception_V, int line) {
  OnsetStart start;
  start.electrode = electrode;
  start.surface = 0;
  start.contour = 0;
  start.s = s;
  start.at = at;
  start.E_operating = 2.9e6 + line * 1e5 / 3.0;
  start.integral_operating = 4.5 + line / 7.0;
  start.zone_length_operating = 1e-4;
  start.inception_V = inception_V;
  start.margin = inception_V / kOperating_V;  // kNoInception stays infinite
  start.polarity = std::isfinite(inception_V) ? "positive" : "";
  start.line = line;
  return start;
}

// Onset on the sample run: "hv" incepts at 123.4 kV, the shield nowhere in the searched range.
OnsetResult sample_onset() {
  OnsetResult onset;
  onset.evaluated = true;
  onset.settings = {"streamer", 9.15, 1e-3, "positive", kOperating_V, kSolved_V, kRequiredMargin, 40};
  onset.gas.key = "air";
  onset.gas.title = "dry air, a test title";
  onset.pressure_Pa = kPressure_Pa;
  onset.temperature_K = kTemperature_K;
  onset.relative_density = iec_relative_density(kPressure_Pa, kTemperature_K);
  onset.number_density = kPressure_Pa / (kBoltzmann * kTemperature_K);
  onset.critical_field_V_per_m = 2.05e6;
  onset.inception_V = 123.4e3;
  onset.margin = 123.4e3 / kOperating_V;
  onset.electrode = "hv";
  onset.at = {0.0123, 0.0456};
  onset.electrodes = {{"hv", 123.4e3, 123.4e3 / kOperating_V, {0.0123, 0.0456}}, {kShield, kNoInception, kNoInception, {}}};
  onset.starts = {start_point("hv", 0.0, {0.0123, 0.0456}, 123.4e3, 0),
                  start_point("hv", 1e-4 / 3.0, {0.0125, 0.0452}, 150e3, 1),
                  start_point(kShield, 0.0, {0.002, 0.5}, kNoInception, 2)};
  // Line 0 falls off like 1/(1 + s/r0) and crosses the critical field; line 1 has a constant field;
  // line 2 (the shield's) is weak; line 3 belongs to no start point.
  onset.lines = {straight_line({0.0123, 0.0456}, 30, 2e-5, [](double s) { return 6e6 / (1.0 + s / 1e-4); },
                               LineEnd::Conductor),
                 straight_line({0.0125, 0.0452}, 41, 5e-6, [](double) { return 4e6 / 1.5; }, LineEnd::Length),
                 straight_line({0.002, 0.5}, 5, 1e-4, [](double s) { return 1e6 - 1e9 * s; }, LineEnd::WeakField),
                 straight_line({0.003, 0.4}, 4, 1e-4, [](double) { return 3.5e6; }, LineEnd::Boundary)};
  onset.lines[0].ended_on = kShield;
  onset.regions = {{"hv", 1e-4, 3e-4, {0.0124, 0.0454}, {0.0127, 0.0449}, 0.95}};
  onset.warnings = {"field 5.1e7 V/m at r = 1 mm is above the gas model's range \"E/N 50-1000 Td\""};
  onset.seconds = 0.25;
  return onset;
}

// Local inception voltages on the first contour of "hv" around the threshold operating x required
// margin = 108 kV (V, NaN where no start point lies).
void add_local_inception(RunResults& results) {
  const double inception[] = {100e3, 108e3, NAN};
  std::vector<SurfaceSample>& contour = results.surfaces[0].contours[0];
  for (size_t k = 0; k < contour.size(); ++k) {
    contour[k].inception_V = inception[k];
    contour[k].margin = inception[k] / kOperating_V;
  }
  results.surfaces[0].contours[1][4].inception_V = 200e3;
  results.surfaces[0].contours[1][4].margin = 200e3 / kOperating_V;
}

// Prints every member under "onset" of summary.json as "<path> <value>", parsing strictly (NaN and
// Infinity are not RFC 8259 JSON): objects as "object <keys>", lists as "list <length>", strings in
// hex, other values by repr (None, True, False, numbers).
const char* const kOnsetJsonDumpScript = R"(import json, sys
def reject(token):
    raise ValueError('not RFC 8259 JSON: ' + token)
with open(sys.argv[1], encoding='utf-8') as f:
    s = json.load(f, parse_constant=reject)
def walk(path, value):
    if isinstance(value, dict):
        print(path, 'object', *value.keys())
        for key, member in value.items():
            walk(path + '.' + key, member)
    elif isinstance(value, list):
        print(path, 'list', len(value))
        for i, item in enumerate(value):
            walk(path + '.' + str(i), item)
    elif isinstance(value, str):
        print(path, 'str', value.encode().hex())
    else:
        print(path, repr(value))
walk('onset', s.get('onset'))
)";

std::vector<std::string> json_text(const std::string& text) { return {"str", hex(text)}; }
const std::vector<std::string> kJsonNull{"None"};

// Equal element by element, NaN equal to NaN (VTK stores NaN as is).
void expect_same_values(const std::vector<double>& actual, const std::vector<double>& expected, const std::string& label) {
  ASSERT_EQ(actual.size(), expected.size()) << label;
  for (size_t i = 0; i < actual.size(); ++i) {
    if (std::isnan(expected[i])) EXPECT_TRUE(std::isnan(actual[i])) << label << " [" << i << "]";
    else EXPECT_EQ(actual[i], expected[i]) << label << " [" << i << "]";
  }
}

class OnsetWriters : public Writers {
 protected:
  void SetUp() override {
    Writers::SetUp();
    results_.onset = sample_onset();
    add_local_inception(results_);
  }

  Dump summary_dump() {
    const fs::path file = folder_ / "summary.json";
    write_file_atomically(file.string(), summary_json(results_));
    return run_python(kOnsetJsonDumpScript, file);
  }

  // fieldlines.vtp written with the default gas (dry air at 101.325 kPa, 20 degC) and read back.
  Dump fieldlines_dump() {
    const fs::path file = folder_ / "fieldlines.vtp";
    write_fieldlines_vtp(file.string(), results_, gas_);
    return run_python(kVtkDumpScript, file);
  }

  GasModel gas_ = GasModel::from_spec(GasSpec{});
};

// ---- summary.json ----

TEST_F(OnsetWriters, SummaryJsonHasTheContractKeysWithExactValues) {
  Dump dump = summary_dump();
  // Required keys: shared/spec/case-format.md, "summary.json".
  for (const char* key : {"inception_voltage_V", "margin", "electrode", "at_m", "criterion", "K", "gas"})
    EXPECT_EQ(dump.count(std::string("onset.") + key), 1u) << key;
  EXPECT_EQ(dump["onset.inception_found"], std::vector<std::string>{"True"});
  EXPECT_EQ(numbers(dump["onset.inception_voltage_V"]), std::vector<double>{123.4e3});
  EXPECT_EQ(numbers(dump["onset.margin"]), std::vector<double>{123.4e3 / kOperating_V});
  EXPECT_EQ(dump["onset.electrode"], json_text("hv"));
  EXPECT_EQ(numbers(dump["onset.at_m.0"]), std::vector<double>{0.0123});
  EXPECT_EQ(numbers(dump["onset.at_m.1"]), std::vector<double>{0.0456});
  EXPECT_EQ(dump["onset.criterion"], json_text("streamer"));
  EXPECT_EQ(numbers(dump["onset.K"]), std::vector<double>{9.15});
  EXPECT_EQ(numbers(dump["onset.gamma"]), std::vector<double>{1e-3});
  EXPECT_EQ(dump["onset.gas"], json_text("air"));
  EXPECT_EQ(dump["onset.polarity"], json_text("positive"));
  EXPECT_EQ(numbers(dump["onset.operating_V"]), std::vector<double>{kOperating_V});
  EXPECT_EQ(numbers(dump["onset.required_margin"]), std::vector<double>{kRequiredMargin});
  EXPECT_EQ(dump["onset.meets_required_margin"], std::vector<std::string>{"True"});  // 1.371 >= 1.2
  EXPECT_EQ(numbers(dump["onset.start_points"]), std::vector<double>{3});
  EXPECT_EQ(numbers(dump["onset.seconds"]), std::vector<double>{0.25});
  EXPECT_EQ(dump["onset.warnings.0"], json_text(results_.onset.warnings[0]));
}

TEST_F(OnsetWriters, SummaryJsonWritesNoInceptionAsNullWithAFlag) {
  Dump dump = summary_dump();
  // RFC 8259 section 6: no Infinity in JSON; the strict parse above rejects it.
  EXPECT_EQ(dump["onset.electrodes"], (std::vector<std::string>{"list", "2"}));
  EXPECT_EQ(dump["onset.electrodes.0.inception_found"], std::vector<std::string>{"True"});
  EXPECT_EQ(numbers(dump["onset.electrodes.0.inception_voltage_V"]), std::vector<double>{123.4e3});
  EXPECT_EQ(dump["onset.electrodes.1.electrode"], json_text(kShield));
  EXPECT_EQ(dump["onset.electrodes.1.inception_found"], std::vector<std::string>{"False"});
  EXPECT_EQ(dump["onset.electrodes.1.inception_voltage_V"], kJsonNull);
  EXPECT_EQ(dump["onset.electrodes.1.margin"], kJsonNull);
  EXPECT_EQ(dump["onset.electrodes.1.at_m"], kJsonNull);

  OnsetResult& onset = results_.onset;
  onset.inception_V = onset.margin = kNoInception;
  onset.electrode.clear();
  onset.settings.required_margin = NAN;
  dump = summary_dump();
  EXPECT_EQ(dump["onset.inception_found"], std::vector<std::string>{"False"});
  EXPECT_EQ(dump["onset.inception_voltage_V"], kJsonNull);
  EXPECT_EQ(dump["onset.margin"], kJsonNull);
  EXPECT_EQ(dump["onset.electrode"], kJsonNull);
  EXPECT_EQ(dump["onset.required_margin"], kJsonNull);
  EXPECT_EQ(dump["onset.meets_required_margin"], std::vector<std::string>{"True"});  // nothing required
}

TEST_F(OnsetWriters, SummaryJsonHasRegionsAndGasState) {
  Dump dump = summary_dump();
  EXPECT_EQ(dump["onset.regions"], (std::vector<std::string>{"list", "1"}));
  EXPECT_EQ(dump["onset.regions.0.electrode"], json_text("hv"));
  EXPECT_EQ(numbers(dump["onset.regions.0.s_from_m"]), std::vector<double>{1e-4});
  EXPECT_EQ(numbers(dump["onset.regions.0.s_to_m"]), std::vector<double>{3e-4});
  EXPECT_EQ(numbers(dump["onset.regions.0.to_m.1"]), std::vector<double>{0.0449});
  EXPECT_EQ(numbers(dump["onset.regions.0.lowest_margin"]), std::vector<double>{0.95});
  EXPECT_EQ(numbers(dump["onset.gas_state.pressure_Pa"]), std::vector<double>{kPressure_Pa});
  EXPECT_EQ(numbers(dump["onset.gas_state.temperature_K"]), std::vector<double>{kTemperature_K});
  EXPECT_EQ(numbers(dump["onset.gas_state.relative_density"]),
            std::vector<double>{iec_relative_density(kPressure_Pa, kTemperature_K)});
  EXPECT_EQ(numbers(dump["onset.gas_state.critical_field_V_per_m"]), std::vector<double>{2.05e6});
}

TEST_F(OnsetWriters, SummaryJsonReportsAShortfallAgainstTheRequiredMargin) {
  results_.onset.settings.required_margin = 1.5;  // 123.4 kV / 90 kV = 1.371 < 1.5
  EXPECT_EQ(summary_dump()["onset.meets_required_margin"], std::vector<std::string>{"False"});
}

TEST_F(OnsetWriters, SummaryJsonWithoutEvaluationHasNoOnset) {
  results_.onset.evaluated = false;
  EXPECT_EQ(summary_dump()["onset"], kJsonNull);  // s.get('onset') is None
}

// ---- onset.csv ----

TEST_F(OnsetWriters, OnsetCsvHasOneRowPerStartAndEmptyCellsWithoutInception) {
  const std::vector<std::string> lines = split(onset_csv(results_), '\n');
  ASSERT_EQ(lines.size(), 1u + 3u);
  EXPECT_EQ(lines[0],
            "electrode,s_m,r_m,z_m,E_operating_V_per_m,integral_operating,inception_V,margin,polarity,line_end");

  const std::vector<std::string> second = split(lines[2], ',');
  ASSERT_EQ(second.size(), 10u);
  const OnsetStart& start = results_.onset.starts[1];
  EXPECT_EQ(second[0], "hv");
  const std::vector<double> values = numbers(std::vector<std::string>(second.begin() + 1, second.begin() + 8));
  const double wanted[] = {start.s,       start.at.r, start.at.z, start.E_operating, start.integral_operating,
                           start.inception_V, start.margin};
  // Ten significant digits leave a relative error below 5e-10.
  for (size_t k = 0; k < 7; ++k) EXPECT_NEAR(values[k], wanted[k], 5e-10 * std::abs(wanted[k])) << k;
  EXPECT_EQ(second[8], "positive");
  EXPECT_EQ(second[9], to_string(LineEnd::Length));

  // The shield's name holds a quote and a comma: quoted as RFC 4180 section 2 rules 6 and 7.
  const std::string shield_row = lines[3];
  const std::string quoted = "\"shield \"\"B\"\", upper\",";
  ASSERT_EQ(shield_row.rfind(quoted, 0), 0u) << shield_row;
  const std::vector<std::string> rest = split(shield_row.substr(quoted.size()) + ",", ',');
  ASSERT_EQ(rest.size(), 9u) << shield_row;
  EXPECT_EQ(rest[5], "");  // inception_V: none
  EXPECT_EQ(rest[6], "");  // margin: none
  EXPECT_EQ(rest[8], to_string(LineEnd::WeakField));
}

// ---- surfaces.vtp ----

TEST_F(OnsetWriters, SurfacesVtpCarriesLocalInceptionMarginAndFlag) {
  const fs::path file = folder_ / "surfaces.vtp";
  write_surfaces_vtp(file.string(), results_);
  Dump dump = run_python(kVtkDumpScript, file);

  std::vector<double> inception, margin;
  for (const SurfaceField& surface : results_.surfaces)
    for (const auto& samples : surface.contours)
      for (const SurfaceSample& sample : samples) {
        inception.push_back(sample.inception_V);
        margin.push_back(sample.margin);
      }
  ASSERT_GE(dump["point:inception_V"].size(), 2u);
  EXPECT_EQ(dump["point:inception_V"][0], kVtkDouble);
  expect_same_values(numbers(dump["point:inception_V"], 2), inception, "inception_V");
  expect_same_values(numbers(dump["point:margin"], 2), margin, "margin");
  // Flagged where inception < 90 kV x 1.2 = 108 kV: only the 100 kV sample; 108 kV is not below.
  std::vector<double> flag(inception.size(), 0.0);
  flag[0] = 1.0;
  expect_array(dump, "point:onset_flag", kVtkInt, 1, flag);
}

TEST_F(OnsetWriters, SurfacesVtpWithoutEvaluationHasNoOnsetArrays) {
  results_.onset.evaluated = false;
  const fs::path file = folder_ / "surfaces.vtp";
  write_surfaces_vtp(file.string(), results_);
  Dump dump = run_python(kVtkDumpScript, file);
  EXPECT_EQ(dump.count("point:inception_V"), 0u);
  EXPECT_EQ(dump.count("point:margin"), 0u);
  EXPECT_EQ(dump.count("point:onset_flag"), 0u);
  EXPECT_EQ(dump.count("point:E_abs_V_per_m"), 1u);
}

// ---- fieldlines.vtp ----

// The voltage each sample line is shown at: its start's inception voltage, else operating.
std::vector<double> line_voltages() { return {123.4e3, 150e3, kOperating_V, kOperating_V}; }

TEST_F(OnsetWriters, FieldlinesVtpHasOnePolylinePerLineInTheRzPlane) {
  Dump dump = fieldlines_dump();
  // VTK_POLY_LINE = 4 (vtkCellType.h); x = r, y = z, z = 0.
  EXPECT_EQ(dump["cell_types"], (std::vector<std::string>{"4", "4", "4", "4"}));
  std::vector<double> points, cells;
  int id = 0;
  for (const FieldLine& line : results_.onset.lines) {
    cells.push_back(static_cast<double>(line.points.size()));
    for (const LinePoint& point : line.points) {
      points.insert(points.end(), {point.at.r, point.at.z, 0.0});
      cells.push_back(id++);
    }
  }
  EXPECT_EQ(dump["point_type"], std::vector<std::string>{kVtkDouble});
  EXPECT_EQ(numbers(dump["points"]), points);
  EXPECT_EQ(numbers(dump["cells"]), cells);
  expect_array(dump, "cell:start_index", kVtkInt, 1, {0, 1, 2, -1});
  // LineEnd in declaration order (field_lines.h): Conductor 1, Length 4, WeakField 0, Boundary 3.
  expect_array(dump, "cell:end_reason", kVtkInt, 1, {1, 4, 0, 3});
  expect_array(dump, "cell:voltage_V", kVtkDouble, 1, line_voltages());
  std::vector<std::string> names;
  for (const LineEnd end : {LineEnd::WeakField, LineEnd::Conductor, LineEnd::Dielectric, LineEnd::Boundary,
                            LineEnd::Length})
    names.push_back(hex(to_string(end)));
  EXPECT_EQ(dump["field:end_reason_names"], names);

  // Binary appended, zlib, 64-bit headers, as field.vtu (shared/deps.md section 6).
  const std::string text = read_text(folder_ / "fieldlines.vtp");
  EXPECT_NE(text.find("header_type=\"UInt64\""), std::string::npos);
  EXPECT_NE(text.find("compressor=\"vtkZLibDataCompressor\""), std::string::npos);
  EXPECT_NE(text.find("<AppendedData encoding=\"raw\">"), std::string::npos);
  EXPECT_EQ(folder_entries(), std::set<std::string>{"fieldlines.vtp"});  // no temporary left
}

// A long traced line is thinned for drawing: its ends stay, the rest keeps a point per 1/40 of its
// length or per 5 % change of |E|, so a steep start stays finely drawn (vtk_writer.cpp, drawn_points).
TEST_F(OnsetWriters, FieldlinesVtpThinsLongLinesButKeepsTheirEnds) {
  const int n = 2000;
  const double step = 1e-4, length = (n - 1) * step;
  results_.onset.lines[0] = straight_line({0.01, 0.02}, n, step, [](double s) { return 3e6 / (1 + 100 * s); },
                                          LineEnd::WeakField);
  Dump dump = fieldlines_dump();
  const std::vector<double> cells = numbers(dump["cells"]);
  const auto drawn = static_cast<size_t>(cells.at(0));
  EXPECT_GT(drawn, 40u);
  EXPECT_LT(drawn, 200u);
  const std::vector<double> points = numbers(dump["points"]);
  EXPECT_DOUBLE_EQ(points[1], 0.02);                               // first point kept
  EXPECT_DOUBLE_EQ(points[3 * (drawn - 1) + 1], 0.02 + length);  // last point kept
  for (size_t k = 1; k < drawn; ++k) {
    const double gap = points[3 * k + 1] - points[3 * (k - 1) + 1];
    EXPECT_GT(gap, 0.0);
    EXPECT_LE(gap, length / 40 + step * 1.0001);
  }
}

TEST_F(OnsetWriters, FieldlinesVtpValuesAreAtEachLinesOwnVoltage) {
  Dump dump = fieldlines_dump();
  // The Laplace field scales with the voltage: E(U) = U / U_solved x E(U_solved). The streamer
  // integral is that of max(alpha_eff, 0) (physics.md, "Onset criteria"), here by the trapezoidal
  // rule over the line's own samples.
  std::vector<double> s, E_abs, alpha_eff, integral;
  const std::vector<double> voltages = line_voltages();
  for (size_t l = 0; l < results_.onset.lines.size(); ++l) {
    const double scale = voltages[l] / kSolved_V;
    double running = 0.0;
    const std::vector<LinePoint>& points = results_.onset.lines[l].points;
    for (size_t k = 0; k < points.size(); ++k) {
      if (k > 0)
        running += 0.5 * (points[k].s - points[k - 1].s) *
                   (std::max(gas_.alpha_eff(scale * points[k - 1].E), 0.0) + std::max(gas_.alpha_eff(scale * points[k].E), 0.0));
      s.push_back(points[k].s);
      E_abs.push_back(scale * points[k].E);
      alpha_eff.push_back(gas_.alpha_eff(scale * points[k].E));
      integral.push_back(running);
    }
  }
  expect_array(dump, "point:s_m", kVtkDouble, 1, s);
  expect_array(dump, "point:E_abs_V_per_m", kVtkDouble, 1, E_abs);
  expect_array(dump, "point:alpha_eff_per_m", kVtkDouble, 1, alpha_eff);
  const std::vector<double> written = numbers(dump["point:running_integral"], 2);
  ASSERT_EQ(written.size(), integral.size());
  for (size_t i = 0; i < integral.size(); ++i) EXPECT_NEAR(written[i], integral[i], 1e-12 * (1.0 + integral[i])) << i;

  // Line 1 has a constant field, 4 MV/m at its 150 kV: the integral is exactly alpha_eff x s.
  const double alpha_eff_4MV = gas_.alpha_eff(4e6);
  ASSERT_GT(alpha_eff_4MV, 0.0);
  const size_t first = results_.onset.lines[0].points.size();
  for (size_t k = 0; k < results_.onset.lines[1].points.size(); ++k)
    EXPECT_NEAR(written[first + k], alpha_eff_4MV * s[first + k], 1e-12 * alpha_eff_4MV * s[first + k] + 1e-15) << k;
  // Line 0 crosses the critical field: beyond it the integral stays constant (ionization zone only).
  EXPECT_LT(alpha_eff[first - 1], 0.0);
  EXPECT_EQ(written[first - 1], written[first - 2]);
}

TEST_F(OnsetWriters, FieldlinesVtpTownsendIntegralMatchesTheClosedForm) {
  results_.onset.settings.criterion = "townsend";
  Dump dump = fieldlines_dump();
  // In a constant field alpha_eff is constant, so gamma x integral_0^s alpha exp(alpha_eff x) dx =
  // gamma alpha (exp(alpha_eff s) - 1) / alpha_eff (physics.md, "Onset criteria"). The composite
  // trapezoidal rule on exp(a x) with step h errs by (a h)^2 / 12 relative to leading order.
  const IonizationCoefficients c = gas_.coefficients(4e6);
  const double gamma = results_.onset.settings.gamma;
  const std::vector<LinePoint>& points = results_.onset.lines[1].points;
  const double h = points[1].s - points[0].s;
  const double trapezoid_error = std::pow(c.effective() * h, 2) / 12.0;
  const std::vector<double> written = numbers(dump["point:running_integral"], 2);
  const size_t first = results_.onset.lines[0].points.size();
  ASSERT_GE(written.size(), first + points.size());
  for (size_t k = 1; k < points.size(); ++k) {
    const double exact = gamma * c.alpha * std::expm1(c.effective() * points[k].s) / c.effective();
    EXPECT_NEAR(written[first + k], exact, 1.5 * trapezoid_error * exact) << points[k].s;
  }
}

// ---- report.md ----

TEST_F(OnsetWriters, ReportShowsTheLowestInceptionAndTheMarginInEngineeringUnits) {
  const std::string report = report_markdown(results_);
  EXPECT_NE(report.find("## Discharge onset\n"), std::string::npos);
  // 123.4e3 V = 123.4 kV; 0.0123 m = 12.3 mm (SI prefixes, BIPM SI Brochure, 9th ed., 2019).
  EXPECT_NE(report.find("Lowest inception voltage: **123.4 kV** on electrode **hv** at r = 12.3 mm, z = 45.6 mm."),
            std::string::npos);
  // 123.4 / 90 = 1.3711 -> 1.371 to four digits.
  EXPECT_NE(report.find("operating voltage of 90 kV: **1.371** (required 1.2: met)"), std::string::npos);
  EXPECT_NE(report.find("| hv | 123.4 | 1.371 | 12.3, 45.6 |\n"), std::string::npos);
  EXPECT_NE(report.find("| shield \"B\", upper | none found | none found | - |\n"), std::string::npos);
  // The region: 90 kV x 1.2 = 108 kV; from (12.4, 45.4) mm to (12.7, 44.9) mm, s 0.1 to 0.3 mm.
  EXPECT_NE(report.find("operating x required margin (108 kV)"), std::string::npos);
  EXPECT_NE(report.find("| hv | 12.4, 45.4 | 12.7, 44.9 | 0.1 to 0.3 | 0.95 |\n"), std::string::npos);
  EXPECT_NE(report.find("reaches K = 9.15"), std::string::npos);
  EXPECT_NE(report.find("polarity: positive"), std::string::npos);
  EXPECT_NE(report.find("all fixed potentials are scaled together"), std::string::npos);
  EXPECT_NE(report.find("- " + results_.onset.warnings[0] + "\n"), std::string::npos);
  EXPECT_NE(report.find("IEC 60060-1"), std::string::npos);
  EXPECT_NE(report.find("IEC 60270"), std::string::npos);
  EXPECT_NE(report.find("local codes and licensed practice"), std::string::npos);
  // The section sits between the capacitance matrix and the mesh.
  EXPECT_LT(report.find("## Capacitance matrix"), report.find("## Discharge onset"));
  EXPECT_LT(report.find("## Discharge onset"), report.find("## Mesh"));
}

TEST_F(OnsetWriters, ReportShowsTheGasStateAndTheAltitudeContext) {
  const std::string report = report_markdown(results_);
  // 80 kPa at 30 degC: delta = (80 / 101.3)(293 / 303.15) = 0.7633 (IEC 60060-1) [calc].
  EXPECT_NEAR(iec_relative_density(kPressure_Pa, kTemperature_K), 0.7633, 5e-5);
  EXPECT_NE(report.find("p = 80 kPa, T = 30 degC, relative density delta = 0.7633"), std::string::npos);
  EXPECT_NE(report.find("critical field (alpha_eff = 0) 2.05 kV/mm"), std::string::npos);
  // delta = exp(-H / 8150 m) gives H = 8150 m x ln(1 / 0.76331) = 2201 m, and the IEC 60071-2 factor
  // K_a = exp(H / 8150 m) = 1 / delta = 1.310 for m = 1 [calc].
  EXPECT_NEAR(8150.0 * std::log(1.0 / iec_relative_density(kPressure_Pa, kTemperature_K)), 2201.0, 0.5);
  EXPECT_NE(report.find("altitude of about 2201 m"), std::string::npos);
  EXPECT_NE(report.find("K_a = 1 / delta = 1.31 (m = 1)"), std::string::npos);
  EXPECT_NE(report.find("for context only, not part of the criterion"), std::string::npos);
}

TEST_F(OnsetWriters, ReportSaysWhenNothingIncepts) {
  OnsetResult& onset = results_.onset;
  onset.inception_V = onset.margin = kNoInception;
  onset.settings.required_margin = NAN;
  onset.settings.criterion = "townsend";
  onset.regions.clear();
  onset.relative_density = 1.02;
  const std::string report = report_markdown(results_);
  EXPECT_NE(report.find("No inception found"), std::string::npos);
  EXPECT_NE(report.find("**none found** (no margin required)"), std::string::npos);
  EXPECT_NE(report.find("lies below the operating voltage: none."), std::string::npos);
  EXPECT_NE(report.find("Townsend generation"), std::string::npos);
  EXPECT_NE(report.find("gamma = 0.001"), std::string::npos);
  EXPECT_NE(report.find("(K_a = 1)"), std::string::npos);  // denser than the reference atmosphere
}

TEST_F(OnsetWriters, ReportFlagsAShortfallAndOmitsTheSectionWithoutEvaluation) {
  results_.onset.settings.required_margin = 1.5;
  EXPECT_NE(report_markdown(results_).find("(required 1.5: **NOT met**)"), std::string::npos);
  results_.onset.evaluated = false;
  EXPECT_EQ(report_markdown(results_).find("Discharge onset"), std::string::npos);
}

}  // namespace
}  // namespace hv
