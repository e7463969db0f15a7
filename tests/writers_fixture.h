// The shared set-up of the writer tests: a tiny hand-made mesh and result set that stand in for a run,
// and readers outside the project that check the files: VTK's own XML readers (Debian's Python VTK
// 9.1 bindings, /usr/bin/python3; see shared/deps.md section 6) and Python's json module.
#pragma once

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "postproc/writers.h"

namespace hv::testing {

namespace fs = std::filesystem;

// ---- the sample run ----

// A square of side 2h with corner (r0, z0), split along its diagonal into two P2 triangles on a
// 3 x 3 grid of nodes (node i + 3 j at r0 + i h, z0 + j h). Triangle 0 is in the gas, triangle 1 in
// an oil of permittivity 2.2 (a value with no exact binary form, to test the double round trip).
inline Mesh two_triangle_mesh() {
  Mesh mesh;
  mesh.order = 2;
  const double r0 = 0.0123, z0 = 0.0456, h = 0.001 / 3.0;
  for (int j = 0; j < 3; ++j)
    for (int i = 0; i < 3; ++i) mesh.nodes.push_back({r0 + i * h, z0 + j * h});
  // Vertices counter-clockwise, then the mid nodes of edges 01, 12, 20.
  mesh.triangles = {0, 2, 8, 1, 5, 4,  // (0,0) (2,0) (2,2)
                    0, 8, 6, 4, 7, 3};  // (0,0) (2,2) (0,2)
  mesh.triangle_region = {0, 1};
  mesh.regions = {{"gas", 1.0, true}, {"oil", 2.2, false}};
  return mesh;
}

// The same square as two straight 3-node triangles.
inline Mesh two_linear_triangles() {
  Mesh mesh;
  mesh.order = 1;
  mesh.nodes = {{0.0, 0.0}, {0.01, 0.0}, {0.01, 0.01}, {0.0, 0.01}};
  mesh.triangles = {0, 1, 2, 0, 2, 3};
  mesh.triangle_region = {0, 0};
  mesh.regions = {{"gas", 1.0, true}};
  return mesh;
}

inline const char* const kTitle = "Bushing \"A\"\ntest\tend\x01 \xC2\xB5";  // quotes, LF, TAB, U+0001, micro sign
inline const char* const kShield = "shield \"B\", upper";                  // a quote and a comma

inline SurfaceSample sample(double s, Point at, double scale) {
  return {s, at, 3.0e6 * scale / 7.0, 2.9e6 * scale / 7.0, -1.1e6 * scale / 9.0, 8.854e-12 * scale};
}

inline std::vector<SurfaceSample> contour(int n_samples, double scale) {
  std::vector<SurfaceSample> samples;
  for (int k = 0; k < n_samples; ++k)
    samples.push_back(sample(k * 1e-4 / 3.0, {0.01 + k * 1e-4 / 7.0, 0.02 - k * 1e-4 / 11.0}, scale + k));
  return samples;
}

inline RunResults sample_results(const Mesh& mesh) {
  RunResults results;
  results.title = kTitle;
  results.case_file = "cases/bushing.yaml";
  results.case_text = "hvstress: 1\ntitle: bushing\n# a note with ```backticks```\n";
  results.parameters = {{"U", 300e3 * std::sqrt(2.0)}, {"ring_R", 0.35}};
  results.parameter_units = {"V", "m"};
  results.mesh = &mesh;
  results.mesh_stats = {mesh.n_nodes(), mesh.n_triangles(), 4, 0, 1e-3 / 3.0, 1.4e-3, 0.01};
  results.solve_report.ok = true;
  results.solve_report.method = "cholmod-supernodal";
  results.solve_report.dofs = 5;
  results.solve_report.factor_nonzeros = 12;
  results.solve_report.relative_residual = std::nan("");  // must come out as null
  results.potential.resize(mesh.n_nodes());
  for (int i = 0; i < mesh.n_nodes(); ++i) {
    results.potential[i] = 1000.0 * (i + 1) / 7.0;
    results.node_field.push_back({1e6 * (i + 1.0 / 3.0), -1e6 * i / 9.0});
  }
  results.electrodes = {{"hv", false, 1e5, 3.3e-9, 3.456e6, {0.0123, 0.0456}, 2.5e6, {0.02, 0.03}},
                        {kShield, true, 42.1e3, 0.0, 1.5e6, {0.002, 0.5}, 1.5e6, {0.002, 0.5}}};
  results.max_field_electrode = "hv";
  results.max_field_V_per_m = 3.456e6;
  results.max_field_at = {0.0123, 0.0456};
  results.capacitance_F.resize(2, 2);
  results.capacitance_F << 12.5e-12, -3.25e-12, -3.25e-12, 7.0e-12 / 3.0;
  results.energy_J = 0.1 / 3.0;
  results.has_ground_plane = true;
  results.ground_plane_charge_C = -1.0e-9 / 3.0;
  results.surfaces = {{"hv", BoundaryKind::Electrode, 0, 0, {contour(3, 1.0), contour(5, 2.0)}},
                      {kShield, BoundaryKind::Electrode, 1, 0, {contour(3, 3.0)}},
                      {"gas|oil", BoundaryKind::Interface, -1, 1, {contour(3, 4.0)}}};
  results.timings = {0.5, 0.25, 0.125, 0.0625, 1.0};
  results.version = "0.1.0";
  return results;
}

// ---- helpers ----

inline std::string read_text(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

inline std::string hex(const std::string& bytes) {
  static const char* const digits = "0123456789abcdef";
  std::string out;
  for (const unsigned char byte : bytes) {
    out += digits[byte >> 4];
    out += digits[byte & 0xF];
  }
  return out;
}

inline std::vector<std::string> split(const std::string& text, char separator) {
  std::vector<std::string> parts;
  std::istringstream in(text);
  for (std::string part; std::getline(in, part, separator);) parts.push_back(part);
  return parts;
}

// Python prints every number with repr(), the shortest text that reads back to the same double;
// strtod (correctly rounded in glibc) turns it into exactly that double again.
inline std::vector<double> numbers(const std::vector<std::string>& tokens, size_t first = 0) {
  std::vector<double> values;
  for (size_t i = first; i < tokens.size(); ++i) values.push_back(std::strtod(tokens[i].c_str(), nullptr));
  return values;
}

// Output of the dump scripts: one line per item, "label token token ...".
using Dump = std::map<std::string, std::vector<std::string>>;

inline Dump parse_dump(const std::string& output) {
  Dump dump;
  for (const std::string& line : split(output, '\n')) {
    std::istringstream in(line);
    std::string label;
    in >> label;
    std::vector<std::string>& tokens = dump[label];
    for (std::string token; in >> token;) tokens.push_back(token);
  }
  return dump;
}

// Data type codes of vtkType.h.
inline constexpr const char* kVtkInt = "6";
inline constexpr const char* kVtkDouble = "11";

// Checks one dumped array: "<VTK data type> <components> <values...>".
inline void expect_array(Dump& dump, const std::string& label, const char* data_type, int components,
                  const std::vector<double>& values) {
  const std::vector<std::string>& tokens = dump[label];
  ASSERT_GE(tokens.size(), 2u) << label << " missing";
  EXPECT_EQ(tokens[0], data_type) << label;
  EXPECT_EQ(tokens[1], std::to_string(components)) << label;
  EXPECT_EQ(numbers(tokens, 2), values) << label;
}

// Reads a .vtu or .vtp with VTK's XML readers and prints its points, cells and arrays.
// Arrays: "<point|cell>:<name> <VTK data type> <components> <values...>"; field data strings in hex.
inline const char* const kVtkDumpScript = R"(import sys
from vtkmodules.vtkCommonCore import vtkIdList
from vtkmodules.vtkIOXML import vtkXMLPolyDataReader, vtkXMLUnstructuredGridReader
path = sys.argv[1]
reader = vtkXMLUnstructuredGridReader() if path.endswith('.vtu') else vtkXMLPolyDataReader()
reader.SetFileName(path)
reader.Update()
data = reader.GetOutput()
points = data.GetPoints()
print('point_type', points.GetDataType())
print('points', *[repr(x) for i in range(data.GetNumberOfPoints()) for x in points.GetPoint(i)])
print('cell_types', *[data.GetCellType(c) for c in range(data.GetNumberOfCells())])
ids = vtkIdList()
cells = []
for c in range(data.GetNumberOfCells()):
    data.GetCellPoints(c, ids)
    cells.append(ids.GetNumberOfIds())
    cells.extend(ids.GetId(k) for k in range(ids.GetNumberOfIds()))
print('cells', *cells)
for label, attributes in (('point', data.GetPointData()), ('cell', data.GetCellData())):
    for a in range(attributes.GetNumberOfArrays()):
        array = attributes.GetArray(a)
        n = array.GetNumberOfComponents()
        values = [repr(array.GetComponent(t, c)) for t in range(array.GetNumberOfTuples()) for c in range(n)]
        print(label + ':' + array.GetName(), array.GetDataType(), n, *values)
fields = data.GetFieldData()
for a in range(fields.GetNumberOfArrays()):
    array = fields.GetAbstractArray(a)
    print('field:' + array.GetName(), *[array.GetValue(i).encode().hex() for i in range(array.GetNumberOfValues())])
)";

// A fresh temporary folder per test, the sample run, and the Python readers.
class Writers : public ::testing::Test {
 protected:
  void SetUp() override {
    std::string pattern = (fs::temp_directory_path() / "hv_post_writers_XXXXXX").string();
    ASSERT_NE(::mkdtemp(pattern.data()), nullptr);
    folder_ = pattern;
  }
  void TearDown() override { fs::remove_all(folder_); }

  // Runs a Python script with /usr/bin/python3 on `file` and returns its parsed output.
  Dump run_python(const char* script, const fs::path& file) {
    const fs::path script_path = folder_ / "dump.py";
    std::ofstream(script_path) << script;
    const std::string command = "/usr/bin/python3 '" + script_path.string() + "' '" + file.string() + "'";
    FILE* pipe = ::popen(command.c_str(), "r");
    EXPECT_NE(pipe, nullptr);
    std::string output;
    char buffer[4096];
    for (size_t n; pipe && (n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0;) output.append(buffer, n);
    EXPECT_EQ(pipe ? ::pclose(pipe) : -1, 0) << command;
    fs::remove(script_path);
    return parse_dump(output);
  }

  std::set<std::string> folder_entries() const {
    std::set<std::string> names;
    for (const auto& entry : fs::directory_iterator(folder_)) names.insert(entry.path().filename().string());
    return names;
  }

  fs::path folder_;
  Mesh mesh_ = two_triangle_mesh();
  RunResults results_ = sample_results(mesh_);
};

}  // namespace hv::testing
