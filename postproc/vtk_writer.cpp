// field.vtu, surfaces.vtp and fieldlines.vtp through VTK's XML writers. The r-z half plane is drawn as VTK's z = 0
// plane: x = r, y = z. Writer settings and the node order of second-order triangles were checked
// on this VTK version (shared/deps.md, section 6): our P2 triangle (vertices counter-clockwise, then
// the mid nodes of edges 01, 12, 20) is VTK_QUADRATIC_TRIANGLE without permutation, and our P3
// triangle (mesh.h) is VTK_LAGRANGE_TRIANGLE with 10 points without permutation (vtkLagrangeTriangle's
// parametric coordinates of VTK 9.1 list the vertices, the edge points of edges 01, 12, 20 in each
// edge's direction, then the centroid).
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <vtkCellArray.h>
#include <vtkCellData.h>
#include <vtkCellType.h>
#include <vtkDoubleArray.h>
#include <vtkFieldData.h>
#include <vtkIntArray.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkPoints.h>
#include <vtkPolyData.h>
#include <vtkStringArray.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLPolyDataWriter.h>
#include <vtkXMLUnstructuredGridWriter.h>

#include "postproc/writers.h"

namespace hv {

namespace {

vtkNew<vtkDoubleArray> double_array(const char* name, int components, vtkIdType tuples) {
  vtkNew<vtkDoubleArray> array;
  array->SetName(name);
  array->SetNumberOfComponents(components);
  array->SetNumberOfTuples(tuples);
  return array;
}

vtkNew<vtkIntArray> int_array(const char* name, vtkIdType values) {
  vtkNew<vtkIntArray> array;
  array->SetName(name);
  array->SetNumberOfValues(values);
  return array;
}

// Encodes `data` as binary appended, zlib-compressed XML with 64-bit block headers (files above
// 4 GB stay readable), then writes it through a temporary name and a rename, so that a reader
// never sees half a file. Throws RunError on failure.
void write_vtk_atomically(vtkXMLWriter& writer, vtkDataObject* data, const std::string& path) {
  writer.SetInputData(data);
  writer.SetDataModeToAppended();
  writer.EncodeAppendedDataOff();  // raw bytes; the default appended encoding is base64
  writer.SetCompressorTypeToZLib();
  writer.SetHeaderTypeToUInt64();
  writer.WriteToOutputStringOn();  // into memory: the file itself goes through the atomic write
  if (writer.Write() != 1) throw RunError("VTK could not encode the data for " + path);
  write_file_atomically(path, writer.GetOutputString());
}

// ---- field.vtu ----

vtkNew<vtkPoints> mesh_points(const Mesh& mesh) {
  vtkNew<vtkPoints> points;
  points->SetDataTypeToDouble();  // the default is float32
  points->SetNumberOfPoints(mesh.n_nodes());
  for (int i = 0; i < mesh.n_nodes(); ++i) points->SetPoint(i, mesh.nodes[i].r, mesh.nodes[i].z, 0.0);
  return points;
}

void add_triangles(const Mesh& mesh, vtkUnstructuredGrid& grid) {
  const int cell_type = mesh.order == 3 ? VTK_LAGRANGE_TRIANGLE : mesh.order == 2 ? VTK_QUADRATIC_TRIANGLE : VTK_TRIANGLE;
  const int per_triangle = mesh.nodes_per_triangle();
  grid.AllocateExact(mesh.n_triangles(), static_cast<vtkIdType>(mesh.n_triangles()) * per_triangle);
  std::vector<vtkIdType> ids(static_cast<size_t>(per_triangle));
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* nodes = mesh.triangle(t);
    for (int k = 0; k < per_triangle; ++k) ids[static_cast<size_t>(k)] = nodes[k];
    grid.InsertNextCell(cell_type, per_triangle, ids.data());
  }
}

// Relative permittivity and region index of every triangle.
void add_region_arrays(const Mesh& mesh, vtkCellData& cell_data) {
  auto permittivity = double_array("permittivity", 1, mesh.n_triangles());
  auto region_id = int_array("region_id", mesh.n_triangles());
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int region = mesh.triangle_region[static_cast<size_t>(t)];
    permittivity->SetValue(t, mesh.regions[static_cast<size_t>(region)].permittivity);
    region_id->SetValue(t, region);
  }
  cell_data.AddArray(permittivity);
  cell_data.AddArray(region_id);
}

// Potential (V), the field vector and its magnitude (V/m) at every node. The vector's components
// are (E_r, E_z, E_phi) = VTK's (x, y, z); E_phi is zero in axisymmetric electrostatics.
void add_field_arrays(const Mesh& mesh, const RunResults& results, vtkPointData& point_data) {
  const auto n_nodes = static_cast<size_t>(mesh.n_nodes());
  if (static_cast<size_t>(results.potential.size()) != n_nodes || results.node_field.size() != n_nodes)
    throw RunError("field.vtu: the results hold " + std::to_string(results.potential.size()) +
                   " potentials and " + std::to_string(results.node_field.size()) +
                   " field vectors for a mesh of " + std::to_string(n_nodes) + " nodes");
  auto potential = double_array("potential_V", 1, mesh.n_nodes());
  auto field = double_array("E_V_per_m", 3, mesh.n_nodes());
  auto magnitude = double_array("E_abs_V_per_m", 1, mesh.n_nodes());
  for (int i = 0; i < mesh.n_nodes(); ++i) {
    const auto& [E_r, E_z] = results.node_field[static_cast<size_t>(i)];
    potential->SetValue(i, results.potential[i]);
    field->SetTuple3(i, E_r, E_z, 0.0);
    magnitude->SetValue(i, std::hypot(E_r, E_z));
  }
  point_data.AddArray(potential);
  point_data.AddArray(field);
  point_data.AddArray(magnitude);
}

// ---- surfaces.vtp ----

// Appends one contour's samples as points and one polyline through them, in order.
void add_contour(const std::vector<SurfaceSample>& contour, vtkPoints& points, vtkCellArray& lines) {
  lines.InsertNextCell(static_cast<vtkIdType>(contour.size()));
  for (const SurfaceSample& sample : contour)
    lines.InsertCellPoint(points.InsertNextPoint(sample.at.r, sample.at.z, 0.0));
}

vtkNew<vtkDoubleArray> sample_array(const char* name, const RunResults& results, vtkIdType n_samples,
                                    double SurfaceSample::*member) {
  auto array = double_array(name, 1, n_samples);
  vtkIdType i = 0;
  for (const SurfaceField& surface : results.surfaces)
    for (const auto& contour : surface.contours)
      for (const SurfaceSample& sample : contour) array->SetValue(i++, sample.*member);
  return array;
}

// Local inception voltage (V) and margin at every sample (NaN where no start point lies), and
// onset_flag: 1 where the local inception voltage lies below operating x required margin (below the
// operating voltage when no margin is required), the test that also bounds the onset regions.
void add_onset_arrays(const RunResults& results, vtkIdType n_samples, vtkPointData& point_data) {
  const OnsetSettings& settings = results.onset.settings;
  const double required = std::isnan(settings.required_margin) ? 1.0 : settings.required_margin;
  const double threshold_V = settings.operating_V * required;
  auto flag = int_array("onset_flag", n_samples);
  vtkIdType i = 0;
  for (const SurfaceField& surface : results.surfaces)
    for (const auto& contour : surface.contours)
      for (const SurfaceSample& sample : contour) flag->SetValue(i++, sample.inception_V < threshold_V ? 1 : 0);
  point_data.AddArray(sample_array("inception_V", results, n_samples, &SurfaceSample::inception_V));
  point_data.AddArray(sample_array("margin", results, n_samples, &SurfaceSample::margin));
  point_data.AddArray(flag);
}

// ---- fieldlines.vtp ----

// Every reason a line can end, in the order of LineEnd: end_reason indexes this list.
constexpr LineEnd kLineEnds[] = {LineEnd::WeakField, LineEnd::Conductor, LineEnd::Dielectric, LineEnd::Boundary,
                                 LineEnd::Length};

// For every line, the start point whose line it is, or -1 when no start refers to it.
std::vector<int> start_of_each_line(const OnsetResult& onset) {
  std::vector<int> start(onset.lines.size(), -1);
  for (size_t i = 0; i < onset.starts.size(); ++i) {
    const int line = onset.starts[i].line;
    if (line >= 0 && line < static_cast<int>(start.size())) start[static_cast<size_t>(line)] = static_cast<int>(i);
  }
  return start;
}

// The points of a line worth drawing. The tracer stores a point every fraction of an element, which
// the integrals need but a picture does not (thousands of lines would make the file hundreds of MB).
// A line of more than kDrawnWhole points keeps its ends, and a point wherever the arc length has grown
// by 1/kDrawnPerLine of the line's length or |E| has changed by 5 % since the last kept point (so the
// steep part near the electrode stays).
constexpr size_t kDrawnWhole = 200;
constexpr double kDrawnPerLine = 40.0;
std::vector<size_t> drawn_points(const FieldLine& line) {
  std::vector<size_t> kept;
  if (line.points.size() <= kDrawnWhole) {
    for (size_t k = 0; k < line.points.size(); ++k) kept.push_back(k);
    return kept;
  }
  const double step = line.points.back().s / kDrawnPerLine;
  kept.push_back(0);
  for (size_t k = 1; k + 1 < line.points.size(); ++k) {
    const LinePoint &last = line.points[kept.back()], &here = line.points[k];
    const bool far_enough = here.s - last.s >= step;
    const bool field_changed = std::abs(here.E - last.E) > 0.05 * std::max(std::abs(last.E), 1e-300);
    if (far_enough || field_changed) kept.push_back(k);
  }
  if (line.points.size() > 1) kept.push_back(line.points.size() - 1);
  return kept;
}

// The voltage a line is shown at: its start's inception voltage, or the operating voltage when it
// has none (or no start refers to it).
double line_voltage(const OnsetResult& onset, int start) {
  const double inception_V = start >= 0 ? onset.starts[static_cast<size_t>(start)].inception_V : kNoInception;
  return std::isfinite(inception_V) ? inception_V : onset.settings.operating_V;
}

// The coefficients at every point of a line at the field `scale` x the solved field.
std::vector<IonizationCoefficients> coefficients_along(const FieldLine& line, double scale, const GasModel& gas) {
  std::vector<IonizationCoefficients> coefficients;
  for (const LinePoint& point : line.points) coefficients.push_back(gas.coefficients(scale * point.E));
  return coefficients;
}

// integral_0^s f ds' at every point of a line, by the trapezoidal rule over its stored samples.
std::vector<double> cumulative_integral(const FieldLine& line, const std::vector<double>& f) {
  std::vector<double> integral(f.size(), 0.0);
  for (size_t k = 1; k < f.size(); ++k)
    integral[k] = integral[k - 1] + 0.5 * (line.points[k].s - line.points[k - 1].s) * (f[k - 1] + f[k]);
  return integral;
}

// The criterion's integral from the start to every point of a line:
//   streamer:  integral of max(alpha_eff, 0) ds (the ionization zone only);
//   townsend:  gamma * integral of alpha(s) exp(integral_0^s alpha_eff ds') ds.
std::vector<double> running_integral(const FieldLine& line, const std::vector<IonizationCoefficients>& coefficients,
                                     const OnsetSettings& settings) {
  std::vector<double> integrand;
  if (settings.criterion == "townsend") {
    std::vector<double> alpha_eff;
    for (const IonizationCoefficients& c : coefficients) alpha_eff.push_back(c.effective());
    const std::vector<double> growth = cumulative_integral(line, alpha_eff);
    for (size_t k = 0; k < coefficients.size(); ++k)
      integrand.push_back(settings.gamma * coefficients[k].alpha * std::exp(growth[k]));
  } else {
    for (const IonizationCoefficients& c : coefficients) integrand.push_back(std::max(c.effective(), 0.0));
  }
  return cumulative_integral(line, integrand);
}

}  // namespace

void write_field_vtu(const std::string& path, const Mesh& mesh, const RunResults* results) {
  vtkNew<vtkUnstructuredGrid> grid;
  grid->SetPoints(mesh_points(mesh));
  add_triangles(mesh, *grid);
  add_region_arrays(mesh, *grid->GetCellData());
  if (results) add_field_arrays(mesh, *results, *grid->GetPointData());
  vtkNew<vtkXMLUnstructuredGridWriter> writer;
  write_vtk_atomically(*writer, grid, path);
}

void write_surfaces_vtp(const std::string& path, const RunResults& results) {
  vtkNew<vtkPoints> points;
  points->SetDataTypeToDouble();
  vtkNew<vtkCellArray> lines;
  auto surface_id = int_array("surface_id", 0);
  auto region_id = int_array("region_id", 0);
  vtkNew<vtkStringArray> surface_names;
  surface_names->SetName("surface_names");  // indexed by surface_id
  for (size_t s = 0; s < results.surfaces.size(); ++s) {
    const SurfaceField& surface = results.surfaces[s];
    surface_names->InsertNextValue(surface.name);
    for (const auto& contour : surface.contours) {
      add_contour(contour, *points, *lines);
      surface_id->InsertNextValue(static_cast<int>(s));
      region_id->InsertNextValue(surface.region);
    }
  }

  vtkNew<vtkPolyData> polydata;
  polydata->SetPoints(points);
  polydata->SetLines(lines);
  polydata->GetCellData()->AddArray(surface_id);
  polydata->GetCellData()->AddArray(region_id);
  polydata->GetFieldData()->AddArray(surface_names);
  const vtkIdType n_samples = points->GetNumberOfPoints();
  vtkPointData& point_data = *polydata->GetPointData();
  point_data.AddArray(sample_array("s_m", results, n_samples, &SurfaceSample::s));
  point_data.AddArray(sample_array("E_abs_V_per_m", results, n_samples, &SurfaceSample::E_abs));
  point_data.AddArray(sample_array("E_n_V_per_m", results, n_samples, &SurfaceSample::E_n));
  point_data.AddArray(sample_array("E_t_V_per_m", results, n_samples, &SurfaceSample::E_t));
  point_data.AddArray(sample_array("sigma_C_per_m2", results, n_samples, &SurfaceSample::sigma));
  if (results.onset.evaluated) add_onset_arrays(results, n_samples, point_data);

  vtkNew<vtkXMLPolyDataWriter> writer;
  write_vtk_atomically(*writer, polydata, path);
}

void write_fieldlines_vtp(const std::string& path, const RunResults& results, const GasModel& gas) {
  const OnsetResult& onset = results.onset;
  vtkNew<vtkPoints> points;
  points->SetDataTypeToDouble();
  vtkNew<vtkCellArray> cells;
  auto s = double_array("s_m", 1, 0);
  auto E_abs = double_array("E_abs_V_per_m", 1, 0);
  auto alpha_eff = double_array("alpha_eff_per_m", 1, 0);
  auto integral = double_array("running_integral", 1, 0);
  auto start_index = int_array("start_index", 0);
  auto end_reason = int_array("end_reason", 0);
  auto voltage = double_array("voltage_V", 1, 0);
  const std::vector<int> start_of_line = start_of_each_line(onset);
  for (size_t l = 0; l < onset.lines.size(); ++l) {
    const FieldLine& line = onset.lines[l];
    if (line.points.size() < 2) continue;  // a line that ended where it started draws nothing
    const int start = start_of_line[l];
    const double line_V = line_voltage(onset, start);
    const double scale = line_V / onset.settings.solved_V;  // all fixed potentials scale together
    const std::vector<IonizationCoefficients> coefficients = coefficients_along(line, scale, gas);
    const std::vector<double> running = running_integral(line, coefficients, onset.settings);
    const std::vector<size_t> drawn = drawn_points(line);
    cells->InsertNextCell(static_cast<vtkIdType>(drawn.size()));
    for (const size_t k : drawn) {
      const LinePoint& point = line.points[k];
      cells->InsertCellPoint(points->InsertNextPoint(point.at.r, point.at.z, 0.0));
      s->InsertNextValue(point.s);
      E_abs->InsertNextValue(scale * point.E);
      alpha_eff->InsertNextValue(coefficients[k].effective());
      integral->InsertNextValue(running[k]);
    }
    start_index->InsertNextValue(start);
    end_reason->InsertNextValue(static_cast<int>(line.end));
    voltage->InsertNextValue(line_V);
  }
  vtkNew<vtkStringArray> end_names;
  end_names->SetName("end_reason_names");  // indexed by end_reason
  for (const LineEnd end : kLineEnds) end_names->InsertNextValue(to_string(end));

  vtkNew<vtkPolyData> polydata;
  polydata->SetPoints(points);
  polydata->SetLines(cells);
  vtkPointData& point_data = *polydata->GetPointData();
  point_data.AddArray(s);
  point_data.AddArray(E_abs);
  point_data.AddArray(alpha_eff);
  point_data.AddArray(integral);
  vtkCellData& cell_data = *polydata->GetCellData();
  cell_data.AddArray(start_index);
  cell_data.AddArray(end_reason);
  cell_data.AddArray(voltage);
  polydata->GetFieldData()->AddArray(end_names);

  vtkNew<vtkXMLPolyDataWriter> writer;
  write_vtk_atomically(*writer, polydata, path);
}

}  // namespace hv
