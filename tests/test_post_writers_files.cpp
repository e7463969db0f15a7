// The output writers, checked by independent readers: VTK's own XML readers (Debian's Python VTK 9.1
// bindings, /usr/bin/python3; see shared/deps.md section 6), Python's json module as a strict
// RFC 8259 parser, and the written format rules (RFC 8259 escaping, RFC 4180 quoting, SI to
// engineering-unit conversions). A tiny hand-made mesh and result set stand in for a run
// (writers_fixture.h).
#include <cmath>
#include <cstdlib>
#include <set>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "postproc/writers.h"
#include "writers_fixture.h"

namespace hv {
namespace {

using namespace hv::testing;

// Parses summary.json with Python's json module, rejecting NaN and Infinity (not RFC 8259), and prints
// the values the tests compare.
const char* const kJsonDumpScript = R"(import json, sys
def reject(token):
    raise ValueError('not RFC 8259 JSON: ' + token)
with open(sys.argv[1], encoding='utf-8') as f:
    s = json.load(f, parse_constant=reject)
required = ['format', 'title', 'parameters', 'mesh', 'electrodes', 'max_field', 'capacitance_matrix_F',
            'energy_J', 'timings_s']
print('missing', *[k for k in required if k not in s])
print('format', s['format'])
print('title', s['title'].encode().hex())
print('parameters', *[k + '=' + repr(v) for k, v in s['parameters'].items()])
print('mesh', *[s['mesh'][k] for k in ('order', 'nodes', 'triangles', 'dofs')])
print('electrode_names', *[name.encode().hex() for name in s['electrodes']])
e = list(s['electrodes'].values())[1]
print('shield', repr(e['potential_V']), e['floating'], repr(e['charge_C']), repr(e['max_field_V_per_m']),
      *[repr(x) for x in e['max_field_at_m']])
print('max_field', repr(s['max_field']['V_per_m']), s['max_field']['electrode'], *[repr(x) for x in s['max_field']['at_m']])
print('capacitance', *[repr(x) for row in s['capacitance_matrix_F'] for x in row])
print('energy_J', repr(s['energy_J']))
print('timings', *[repr(s['timings_s'][k]) for k in ('mesh', 'assemble', 'solve', 'post')])
print('residual', s['solver']['relative_residual'])
)";

// Parses the mesh command's summary.json the same strict way and prints its members.
const char* const kMeshJsonDumpScript = R"(import json, sys
def reject(token):
    raise ValueError('not RFC 8259 JSON: ' + token)
with open(sys.argv[1], encoding='utf-8') as f:
    s = json.load(f, parse_constant=reject)
for key, value in s.items():
    print(key, repr(value))
)";

// ---- summary.json ----

TEST_F(Writers, SummaryJsonParsesAsStandardJsonWithTheContractKeys) {
  const fs::path file = folder_ / "summary.json";
  write_file_atomically(file.string(), summary_json(results_));
  Dump dump = run_python(kJsonDumpScript, file);
  // Required keys: shared/spec/case-format.md, "summary.json (required keys)".
  EXPECT_TRUE(dump["missing"].empty());
  EXPECT_EQ(dump["format"], std::vector<std::string>{"hvstress-summary/1"});
  EXPECT_EQ(dump["mesh"], (std::vector<std::string>{"2", "9", "2", "5"}));
  EXPECT_EQ(dump["electrode_names"], (std::vector<std::string>{hex("hv"), hex(kShield)}));
  EXPECT_EQ(dump["residual"], std::vector<std::string>{"None"});  // NaN written as null (RFC 8259 s. 6)
}

TEST_F(Writers, SummaryJsonNumbersRoundTripExactly) {
  const fs::path file = folder_ / "summary.json";
  write_file_atomically(file.string(), summary_json(results_));
  Dump dump = run_python(kJsonDumpScript, file);
  const std::vector<std::string>& parameters = dump["parameters"];
  ASSERT_EQ(parameters.size(), 2u);
  EXPECT_EQ(std::strtod(split(parameters[0], '=').at(1).c_str(), nullptr), 300e3 * std::sqrt(2.0));
  EXPECT_EQ(std::strtod(split(parameters[1], '=').at(1).c_str(), nullptr), 0.35);
  const ElectrodeResult& shield = results_.electrodes[1];
  EXPECT_EQ(numbers(dump["shield"], 0)[0], shield.potential_V);
  EXPECT_EQ(dump["shield"].at(1), "True");
  EXPECT_EQ(numbers(dump["shield"], 2),
            (std::vector<double>{shield.charge_C, shield.max_field_V_per_m, shield.max_field_at.r,
                                 shield.max_field_at.z}));
  EXPECT_EQ(numbers(dump["max_field"], 0)[0], 3.456e6);
  EXPECT_EQ(numbers(dump["max_field"], 2), (std::vector<double>{0.0123, 0.0456}));
  // Rows in electrode order (contract: "capacitance_matrix_F rows ... order of electrodes").
  EXPECT_EQ(numbers(dump["capacitance"]), (std::vector<double>{12.5e-12, -3.25e-12, -3.25e-12, 7.0e-12 / 3.0}));
  EXPECT_EQ(numbers(dump["energy_J"]), std::vector<double>{0.1 / 3.0});
  EXPECT_EQ(numbers(dump["timings"]), (std::vector<double>{0.5, 0.25, 0.125, 0.0625}));
}

TEST_F(Writers, SummaryJsonEscapesStringsAsRfc8259) {
  const std::string json = summary_json(results_);
  // RFC 8259 section 7: '"' -> \", LF -> \n, TAB -> \t, U+0001 -> \u0001; UTF-8 passes through.
  EXPECT_NE(json.find("\"title\": \"Bushing \\\"A\\\"\\ntest\\tend\\u0001 \xC2\xB5\""), std::string::npos);
  EXPECT_NE(json.find("\"shield \\\"B\\\", upper\": {"), std::string::npos);
  const fs::path file = folder_ / "summary.json";
  write_file_atomically(file.string(), json);
  EXPECT_EQ(run_python(kJsonDumpScript, file)["title"], std::vector<std::string>{hex(kTitle)});
}

TEST_F(Writers, MeshSummaryJsonParsesAndRoundTrips) {
  const fs::path file = folder_ / "summary.json";
  write_file_atomically(file.string(), mesh_summary_json(mesh_, results_.mesh_stats));
  Dump dump = run_python(kMeshJsonDumpScript, file);
  EXPECT_EQ(dump["format"], std::vector<std::string>{"'hvstress-mesh/1'"});
  EXPECT_EQ(dump["order"], std::vector<std::string>{"2"});
  EXPECT_EQ(dump["nodes"], std::vector<std::string>{"9"});
  EXPECT_EQ(dump["triangles"], std::vector<std::string>{"2"});
  EXPECT_EQ(numbers(dump["min_size_m"]), std::vector<double>{1e-3 / 3.0});
  EXPECT_EQ(numbers(dump["seconds"]), std::vector<double>{0.01});
}

// ---- field.vtu ----

TEST_F(Writers, FieldVtuReadsBackExactlyThroughVtk) {
  const fs::path file = folder_ / "field.vtu";
  write_field_vtu(file.string(), mesh_, &results_);
  Dump dump = run_python(kVtkDumpScript, file);

  EXPECT_EQ(dump["point_type"], std::vector<std::string>{kVtkDouble});
  std::vector<double> points;
  for (const Point& node : mesh_.nodes) points.insert(points.end(), {node.r, node.z, 0.0});
  EXPECT_EQ(numbers(dump["points"]), points);
  // VTK_QUADRATIC_TRIANGLE = 22 (vtkCellType.h); node order equals ours (shared/deps.md section 6).
  EXPECT_EQ(dump["cell_types"], (std::vector<std::string>{"22", "22"}));
  EXPECT_EQ(numbers(dump["cells"]), (std::vector<double>{6, 0, 2, 8, 1, 5, 4, 6, 0, 8, 6, 4, 7, 3}));

  std::vector<double> potential, field, magnitude;
  for (int i = 0; i < mesh_.n_nodes(); ++i) {
    const auto [E_r, E_z] = results_.node_field[static_cast<size_t>(i)];
    potential.push_back(results_.potential[i]);
    field.insert(field.end(), {E_r, E_z, 0.0});
    magnitude.push_back(std::hypot(E_r, E_z));
  }
  expect_array(dump, "point:potential_V", kVtkDouble, 1, potential);
  expect_array(dump, "point:E_V_per_m", kVtkDouble, 3, field);
  expect_array(dump, "point:E_abs_V_per_m", kVtkDouble, 1, magnitude);
  expect_array(dump, "cell:permittivity", kVtkDouble, 1, {1.0, 2.2});
  expect_array(dump, "cell:region_id", kVtkInt, 1, {0, 1});

  // Binary appended, zlib, 64-bit headers (the settings of shared/deps.md section 6).
  const std::string text = read_text(file);
  EXPECT_NE(text.find("header_type=\"UInt64\""), std::string::npos);
  EXPECT_NE(text.find("compressor=\"vtkZLibDataCompressor\""), std::string::npos);
  EXPECT_NE(text.find("<AppendedData encoding=\"raw\">"), std::string::npos);
}

TEST_F(Writers, FieldVtuOfALinearMeshAloneHasRegionsButNoField) {
  const Mesh linear = two_linear_triangles();
  const fs::path file = folder_ / "mesh.vtu";
  write_field_vtu(file.string(), linear, nullptr);
  Dump dump = run_python(kVtkDumpScript, file);
  EXPECT_EQ(dump["cell_types"], (std::vector<std::string>{"5", "5"}));  // VTK_TRIANGLE (vtkCellType.h)
  EXPECT_EQ(numbers(dump["cells"]), (std::vector<double>{3, 0, 1, 2, 3, 0, 2, 3}));
  expect_array(dump, "cell:permittivity", kVtkDouble, 1, {1.0, 1.0});
  EXPECT_EQ(dump.count("point:potential_V"), 0u);
  EXPECT_EQ(dump.count("point:E_V_per_m"), 0u);
}

TEST_F(Writers, FieldVtuRejectsResultsOfAnotherMesh) {
  results_.potential.resize(4);
  EXPECT_THROW(write_field_vtu((folder_ / "field.vtu").string(), mesh_, &results_), RunError);
  EXPECT_TRUE(folder_entries().empty());
}

// ---- surfaces.vtp ----

TEST_F(Writers, SurfacesVtpHasOnePolylinePerContourWithExactValues) {
  const fs::path file = folder_ / "surfaces.vtp";
  write_surfaces_vtp(file.string(), results_);
  Dump dump = run_python(kVtkDumpScript, file);

  // VTK_POLY_LINE = 4 (vtkCellType.h); contours of 3, 5, 3 and 3 samples, nodes in order.
  EXPECT_EQ(dump["cell_types"], (std::vector<std::string>{"4", "4", "4", "4"}));
  EXPECT_EQ(numbers(dump["cells"]),
            (std::vector<double>{3, 0, 1, 2, 5, 3, 4, 5, 6, 7, 3, 8, 9, 10, 3, 11, 12, 13}));
  expect_array(dump, "cell:surface_id", kVtkInt, 1, {0, 0, 1, 2});
  expect_array(dump, "cell:region_id", kVtkInt, 1, {0, 0, 0, 1});
  EXPECT_EQ(dump["field:surface_names"], (std::vector<std::string>{hex("hv"), hex(kShield), hex("gas|oil")}));

  std::vector<double> points, s, E_abs, E_n, E_t, sigma;
  for (const SurfaceField& surface : results_.surfaces)
    for (const auto& samples : surface.contours)
      for (const SurfaceSample& sample : samples) {
        points.insert(points.end(), {sample.at.r, sample.at.z, 0.0});
        s.push_back(sample.s);
        E_abs.push_back(sample.E_abs);
        E_n.push_back(sample.E_n);
        E_t.push_back(sample.E_t);
        sigma.push_back(sample.sigma);
      }
  EXPECT_EQ(dump["point_type"], std::vector<std::string>{kVtkDouble});
  EXPECT_EQ(numbers(dump["points"]), points);
  expect_array(dump, "point:s_m", kVtkDouble, 1, s);
  expect_array(dump, "point:E_abs_V_per_m", kVtkDouble, 1, E_abs);
  expect_array(dump, "point:E_n_V_per_m", kVtkDouble, 1, E_n);
  expect_array(dump, "point:E_t_V_per_m", kVtkDouble, 1, E_t);
  expect_array(dump, "point:sigma_C_per_m2", kVtkDouble, 1, sigma);
}

// ---- surface-field.csv ----

TEST_F(Writers, SurfaceFieldCsvHasHeaderAndOneRowPerSample) {
  const std::vector<std::string> lines = split(surface_field_csv(results_), '\n');
  ASSERT_EQ(lines.size(), 1u + 14u);
  EXPECT_EQ(lines[0], "surface,region,contour,s_m,r_m,z_m,E_abs_V_per_m,E_n_V_per_m,E_t_V_per_m,sigma_C_per_m2");
  // Row 5: surface "hv", contour 1, its second sample; 10 significant digits leave a relative
  // error below 5e-10.
  const std::vector<std::string> fields = split(lines[5], ',');
  ASSERT_EQ(fields.size(), 10u);
  EXPECT_EQ(fields[0], "hv");
  EXPECT_EQ(fields[1], mesh_.regions[static_cast<size_t>(results_.surfaces[0].region)].name);
  EXPECT_EQ(fields[2], "1");
  const SurfaceSample& expected = results_.surfaces[0].contours[1][1];
  const std::vector<double> values = numbers(fields, 3);
  const double wanted[] = {expected.s,   expected.at.r, expected.at.z, expected.E_abs,
                           expected.E_n, expected.E_t,  expected.sigma};
  for (size_t k = 0; k < 7; ++k) EXPECT_NEAR(values[k], wanted[k], 5e-10 * std::abs(wanted[k])) << k;
}

TEST_F(Writers, SurfaceFieldCsvQuotesNamesAsRfc4180) {
  // RFC 4180 section 2, rules 6 and 7: enclose in quotes, double the quotes inside.
  const std::vector<std::string> lines = split(surface_field_csv(results_), '\n');
  EXPECT_EQ(lines[9].rfind("\"shield \"\"B\"\", upper\",", 0), 0u) << lines[9];
}

// ---- report.md ----

TEST_F(Writers, ReportShowsCautionHeadlineAndEngineeringUnits) {
  const std::string report = report_markdown(results_);
  EXPECT_NE(report.find("High voltage can kill"), std::string::npos);
  EXPECT_NE(report.find("design aid, not proof of safety"), std::string::npos);
  // 3.456e6 V/m = 3.456 kV/mm; 0.0123 m = 12.3 mm (SI prefixes, BIPM SI Brochure, 9th ed., 2019).
  EXPECT_NE(report.find("Highest surface field: **3.456 kV/mm** on electrode **hv** at r = 12.3 mm, "
                        "z = 45.6 mm."),
            std::string::npos);
  // 1e5 V = 100 kV, 3.3e-9 C = 3.3 nC, 42.1e3 V = 42.1 kV, 1.5e6 V/m = 1.5 kV/mm, 0.5 m = 500 mm.
  EXPECT_NE(report.find("| hv | 100 | no | 3.3 nC | 3.456 | 12.3, 45.6 | 2.5 | 20, 30 |\n"), std::string::npos);
  EXPECT_NE(report.find("| shield \"B\", upper | 42.1 | yes | 0 C | 1.5 | 2, 500 | 1.5 | 2, 500 |\n"), std::string::npos);
  // 12.5e-12 F = 12.5 pF; 7e-12/3 F = 2.333 pF to four digits.
  EXPECT_NE(report.find("| hv | 12.5 | -3.25 |\n"), std::string::npos);
  EXPECT_NE(report.find("| shield \"B\", upper | -3.25 | 2.333 |\n"), std::string::npos);
}

TEST_F(Writers, ReportEchoesTheCaseInALongEnoughFence) {
  const std::string report = report_markdown(results_);
  // CommonMark 0.30 section 4.5: the text holds a run of 3 backticks, so the fence needs 4.
  EXPECT_NE(report.find("````yaml\n" + results_.case_text + "````\n"), std::string::npos);
  EXPECT_NE(report.find("| U | 424264.0687 | V |"), std::string::npos);  // 300 kV * sqrt(2)
}

// ---- atomic writes ----

TEST_F(Writers, VtkWritesLeaveNoTemporaryFile) {
  write_field_vtu((folder_ / "field.vtu").string(), mesh_, &results_);
  write_surfaces_vtp((folder_ / "surfaces.vtp").string(), results_);
  EXPECT_EQ(folder_entries(), (std::set<std::string>{"field.vtu", "surfaces.vtp"}));
}

TEST_F(Writers, VtkWriteIntoAMissingFolderThrowsAndLeavesNothing) {
  const fs::path missing = folder_ / "missing";
  EXPECT_THROW(write_field_vtu((missing / "field.vtu").string(), mesh_, &results_), RunError);
  EXPECT_THROW(write_surfaces_vtp((missing / "surfaces.vtp").string(), results_), RunError);
  EXPECT_TRUE(folder_entries().empty());
}

}  // namespace
}  // namespace hv
