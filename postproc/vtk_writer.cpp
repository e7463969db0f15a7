// field.vtu and surfaces.vtp through VTK's XML writers. The r-z half plane is drawn as VTK's z = 0
// plane: x = r, y = z. Writer settings and the node order of second-order triangles were checked
// on this VTK version (shared/deps.md, section 6): our P2 triangle (vertices counter-clockwise, then
// the mid nodes of edges 01, 12, 20) is VTK_QUADRATIC_TRIANGLE without permutation.
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
  const int cell_type = mesh.order == 2 ? VTK_QUADRATIC_TRIANGLE : VTK_TRIANGLE;
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

  vtkNew<vtkXMLPolyDataWriter> writer;
  write_vtk_atomically(*writer, polydata, path);
}

}  // namespace hv
