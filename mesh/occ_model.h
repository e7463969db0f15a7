// The geometry of a case in Gmsh's OpenCASCADE kernel: the domain, the shapes clipped at r = 0,
// painted into regions by one boolean fragment, and checked. Private to mesh/; call inside an
// open GmshSession. Gmsh works in model units: metres divided by `length_scale`, the model's
// largest extent, so that OpenCASCADE's absolute tolerances see the same numbers at every scale.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "mesh/boundaries.h"
#include "mesh/geometry.h"
#include "mesh/mesh.h"

namespace hv {

struct PaintedModel {
  double length_scale = 1.0;  // metres per model unit
  DomainOutline domain;       // in metres
  std::vector<Region> regions;
  std::vector<std::pair<int, int>> surfaces;       // (Gmsh surface tag, region index) to mesh
  std::vector<std::vector<int>> electrode_curves;  // per electrode: Gmsh curves facing the mesh
  std::vector<double> electrode_size;              // per electrode: element size on its surface, m
  double max_size = 0.0;                           // largest element, m
  std::vector<std::string> warnings;
};

// Metres to model units, rounded to a grid of 2^-36 model units (1.5e-11 of the model's extent):
// a case and its copy scaled by 1e-3 then hand Gmsh the very same numbers, whatever the last bits
// of their floating-point lengths, and so get the very same mesh.
double to_model(double metres, double length_scale);

// Builds the current Gmsh model from `spec` and checks it (see check_geometry in mesh/meshing.h).
// Throws InputError naming the shape (or key) at fault.
PaintedModel build_painted_model(const GeometrySpec& spec);

}  // namespace hv
