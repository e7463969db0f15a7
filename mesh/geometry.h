// The validated description of one axisymmetric design, as the case reader fills it: shapes, what
// each shape is (electrode or dielectric), the domain and the mesh controls. All lengths in metres,
// potentials in volts, coordinates (r, z). The mesher turns this into a Mesh (mesh/mesh.h).
#pragma once

#include <string>
#include <variant>
#include <vector>

#include "mesh/base.h"

namespace hv {

// Rectangle [r0, r1] x [z0, z1]; `round` is the radius of every corner off the axis (0: sharp).
struct RectShape {
  double r0 = 0, r1 = 0, z0 = 0, z1 = 0;
  double round = 0;
};

// A circle in the r-z plane: centred on the axis it is a sphere, off the axis a torus.
struct CircleShape {
  Point center;
  double radius = 0;
};

// A closed polygon (the last point joins the first); `round` rounds every corner off the axis.
struct PolygonShape {
  std::vector<Point> points;
  double round = 0;
};

// One piece of a path: a straight line or a circular arc to `to`. For an arc, `radius` is signed:
// positive bulges to the left of the direction of travel, negative to the right.
struct PathSegment {
  enum class Kind { Line, Arc };
  Kind kind = Kind::Line;
  Point to;
  double radius = 0;
};

// Lines and arcs from `start`. The path is closed if it ends at its start, or if both its ends lie
// on the axis (r = 0): the axis closes it.
struct PathShape {
  Point start;
  std::vector<PathSegment> segments;
};

struct ShapeSpec {
  std::string name;
  std::variant<RectShape, CircleShape, PolygonShape, PathShape> outline;
  std::string electrode;  // the electrode this shape belongs to, or empty
  std::string material;   // the dielectric this shape is made of, or empty (exactly one is set)
  SourceLocation where;   // for errors about this shape
};

struct ElectrodeSpec {
  std::string name;
  bool floating = false;     // isolated metal: unknown potential, zero net charge
  double potential_V = 0.0;  // fixed potential when not floating
  SourceLocation where;
};

struct MaterialSpec {
  std::string name;
  double permittivity = 1.0;  // relative
  SourceLocation where;
};

struct GroundPlaneSpec {
  bool present = false;
  double z = 0.0;  // the domain lies above it
  SourceLocation where;
};

// One side of a box domain: `symmetry` (zero normal field) or an electrode's fixed potential.
struct BoxSide {
  std::string electrode;  // empty means symmetry
  bool is_symmetry() const { return electrode.empty(); }
};

struct DomainSpec {
  enum class Outer { Open, Box };
  Outer outer = Outer::Open;
  double radius = 0.0;  // open: radius of the truncating half circle; 0 = default (5 x model extent)
  double r_max = 0.0;   // box: right side
  double z_min = 0.0;   // box: bottom (the ground plane when there is one)
  double z_max = 0.0;   // box: top
  BoxSide top, right, bottom;
  SourceLocation where;
};

// Adaptive refinement (tools/app/adaptive.h): Auto adapts when the case sets neither
// mesh.surface_size nor mesh.max_size, so a case with only geometry gets a converged answer.
struct AdaptSpec {
  enum class Mode { Auto, On, Off };
  Mode mode = Mode::Auto;
  double tolerance = 1e-3;  // relative step-to-step change of every quantity of interest to stop at
  int max_steps = 8;        // meshes solved at most
};

struct MeshSpec {
  int order = 2;             // 1: straight 3-node triangles, 2: curved 6-node, 3: curved 10-node triangles
  bool order_given = false;  // the case chose the order; else an adaptive run chooses it (adaptive.h)
  double surface_size = 0;   // element size on electrode surfaces; 0 = from curvature
  double max_size = 0;       // largest element anywhere; 0 = default
  double growth = 1.3;       // size ratio between neighbouring elements, at most
  int max_elements = 5000000;  // the mesher refuses sizes whose estimated triangle count is larger
  // Multiplies the default surface sizes (those from curvature or extent, not mesh.surface_size): the
  // adaptive loop starts from a coarser mesh than a fixed run uses.
  double default_size_factor = 1.0;
  AdaptSpec adapt;
  SourceLocation where;

  // Whether this mesh is refined adaptively: asked for, or by default when no size is given.
  bool adaptive() const {
    return adapt.mode == AdaptSpec::Mode::On ||
           (adapt.mode == AdaptSpec::Mode::Auto && surface_size == 0 && max_size == 0);
  }
};

struct GeometrySpec {
  std::vector<MaterialSpec> materials;
  std::vector<ElectrodeSpec> electrodes;
  std::vector<ShapeSpec> shapes;  // in painting order
  GroundPlaneSpec ground_plane;
  DomainSpec domain;
  MeshSpec mesh;
};

}  // namespace hv
