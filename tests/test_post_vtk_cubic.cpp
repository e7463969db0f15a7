// field.vtu of a cubic (order 3) mesh, read back by VTK itself (Debian's Python VTK 9.1 bindings,
// /usr/bin/python3): VTK_LAGRANGE_TRIANGLE cells of 10 points whose own isoparametric map puts each of
// our reference nodes (mesh.h) on the node we wrote, so the point order needs no permutation.
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include <unistd.h>

#include <gtest/gtest.h>

#include "postproc/writers.h"
#include "solver/elements.h"

namespace hv {
namespace {

namespace fs = std::filesystem;

// Prints the cell types, then for every cell the largest distance between the point VTK's cell maps
// our node i's reference coordinates to and the point we wrote as node i.
const char* const kScript = R"(import sys
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader
from vtkmodules.vtkCommonCore import reference
from vtkmodules.vtkCommonDataModel import vtkGenericCell
ours = [(0, 0), (1, 0), (0, 1), (1/3, 0), (2/3, 0), (2/3, 1/3), (1/3, 2/3), (0, 2/3), (0, 1/3), (1/3, 1/3)]
reader = vtkXMLUnstructuredGridReader()
reader.SetFileName(sys.argv[1])
reader.Update()
grid = reader.GetOutput()
print('types', *[grid.GetCellType(c) for c in range(grid.GetNumberOfCells())])
cell = vtkGenericCell()
for c in range(grid.GetNumberOfCells()):
    grid.GetCell(c, cell)
    worst = 0.0
    for i, (xi, eta) in enumerate(ours):
        x = [0.0] * 3
        weights = [0.0] * cell.GetNumberOfPoints()
        cell.EvaluateLocation(reference(0), [xi, eta, 0.0], x, weights)
        p = grid.GetPoint(cell.GetPointId(i))
        worst = max(worst, abs(x[0] - p[0]) + abs(x[1] - p[1]))
    print('cell', cell.GetNumberOfPoints(), worst)
)";

// One curved cubic triangle: side 01 on a circle of radius 0.1 m about the origin, the others straight.
Mesh curved_cubic_triangle() {
  Mesh mesh;
  mesh.order = 3;
  auto on_circle = [](double angle) { return Point{0.1 * std::cos(angle), 0.1 * std::sin(angle)}; };
  const Point v0 = on_circle(0.0), v1 = on_circle(0.6), v2{0.02, 0.03};
  auto between = [](Point a, Point b, double t) { return Point{a.r + t * (b.r - a.r), a.z + t * (b.z - a.z)}; };
  mesh.nodes = {v0, v1, v2, on_circle(0.2), on_circle(0.4), between(v1, v2, 1.0 / 3), between(v1, v2, 2.0 / 3),
                between(v2, v0, 1.0 / 3), between(v2, v0, 2.0 / 3)};
  mesh.nodes.push_back(blended_interior_node(mesh.nodes.data()));
  mesh.triangles = {0, 1, 2, 3, 4, 5, 6, 7, 8, 9};
  mesh.triangle_region = {0};
  mesh.regions = {{"gas", 1.0, true}};
  return mesh;
}

TEST(CubicVtu, LagrangeTrianglesReadBackWithOurNodeOrder) {
  const fs::path folder = fs::temp_directory_path() / ("hv_vtk_cubic_" + std::to_string(::getpid()));
  fs::create_directories(folder);
  const fs::path file = folder / "field.vtu", script = folder / "read.py";
  write_field_vtu(file.string(), curved_cubic_triangle(), nullptr);
  std::ofstream(script) << kScript;
  const std::string command = "/usr/bin/python3 '" + script.string() + "' '" + file.string() + "'";
  FILE* pipe = ::popen(command.c_str(), "r");
  ASSERT_NE(pipe, nullptr);
  std::string output;
  char buffer[4096];
  for (size_t n; (n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0;) output.append(buffer, n);
  EXPECT_EQ(::pclose(pipe), 0) << command;
  fs::remove_all(folder);

  EXPECT_NE(output.find("types 69\n"), std::string::npos) << output;  // VTK_LAGRANGE_TRIANGLE (vtkCellType.h)
  int points = 0;
  double worst = 1.0;
  const size_t cell = output.find("cell ");
  ASSERT_NE(cell, std::string::npos) << output;
  ASSERT_EQ(std::sscanf(output.c_str() + cell, "cell %d %lf", &points, &worst), 2) << output;
  EXPECT_EQ(points, 10);
  EXPECT_LT(worst, 1e-15);  // each node where VTK's own map puts its reference point
}

}  // namespace
}  // namespace hv
