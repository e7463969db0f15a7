// From a set of triangles to the boundaries the solver needs: every edge used by one triangle, and
// every edge between two regions, classified (axis, ground plane, box side, open arc, electrode,
// interface) and chained head to tail into contours. Pure geometry, no Gmsh. Private to mesh/.
// Coordinates (r, z) in metres.
#pragma once

#include <map>
#include <utility>
#include <vector>

#include "mesh/geometry.h"
#include "mesh/mesh.h"

namespace hv {

// The outer sides of the meshed domain.
enum class OuterSide { Axis, GroundPlane, Top, Right, Bottom, Open };

struct DomainOutline {
  bool open = true;
  Point open_center;                       // open: centre of the truncating arc, on the axis
  double open_radius = 0;                  // open: its radius
  double r_max = 0, z_min = 0, z_max = 0;  // box
  bool has_ground_plane = false;
  double ground_z = 0;
  BoxSide top, right, bottom;  // box: what each side is
  double tolerance = 0;        // distance below which a point lies on a side, m

  // Whether `p` lies on `side` (within `tolerance`).
  bool on(OuterSide side, Point p) const;
  // What a box side is (symmetry or an electrode); only for Top, Right, Bottom.
  const BoxSide& box_side(OuterSide side) const;
};

// Name of a side for messages and boundary names: "axis", "ground_plane", "top", ...
const char* side_name(OuterSide side);

// Mesh edges that lie on an electrode's surface, as given by the mesher: (smaller vertex index,
// larger vertex index) -> index into GeometrySpec::electrodes.
using ElectrodeEdges = std::map<std::pair<int, int>, int>;

// Fills mesh.boundaries from mesh.nodes, triangles (counter-clockwise), triangle_region and
// regions. One Boundary per (kind, side or conductor, adjacent region); interfaces one per region
// pair, named "a|b" with region_a < region_b. Edges run with the region (region_a) on their left.
// Throws RunError for a boundary edge it cannot place (a mesher defect, not an input error).
void find_boundaries(const GeometrySpec& spec, const DomainOutline& domain, const ElectrodeEdges& electrode_edges,
                     Mesh& mesh);

}  // namespace hv
