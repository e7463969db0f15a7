// The outline of one shape of a case as a closed loop of straight lines and circular arcs (or a
// full circle), in metres, frame (r, z). Pure geometry without Gmsh: validation of the shape
// parameters, bounding box, curvature and sharp corners. The mesher turns an outline into
// OpenCASCADE curves (mesh/occ_model.cpp). Private to mesh/.
#pragma once

#include <vector>

#include "mesh/geometry.h"

namespace hv {

// One piece of a loop. An arc is the shorter arc from `from` to `to` about `center`; arcs are kept
// at most a quarter turn, so that "the shorter arc" is never ambiguous.
struct OutlinePiece {
  Point from;
  Point to;
  bool is_arc = false;
  Point center;  // arcs only
};

struct Outline {
  bool is_circle = false;  // a full circle: `center`, `radius`; `loop` is empty
  Point center;
  double radius = 0.0;
  std::vector<OutlinePiece> loop;  // otherwise: closed, each piece starts where the previous ends
};

struct BoundingBox {
  double r_min = 0, r_max = 0, z_min = 0, z_max = 0;
};

// The outline of `shape`: rectangles and polygons with their corners rounded by tangent arcs,
// paths closed (by the axis when both ends lie on it). Throws InputError naming the shape when
// a size is not positive, `round` does not fit an edge, an arc radius is smaller than half its
// chord, a path is not closed, or the outline encloses no area.
Outline outline_of(const ShapeSpec& shape);

// Exact bounding box (arcs included), before clipping at r = 0.
BoundingBox bounding_box(const Outline& outline);

// The smallest radius of curvature of the outline's arcs and circles; 0 when it has none.
double smallest_radius(const Outline& outline);

// Convex corners of the body off the axis (r > 0) where the outline's tangent jumps: there the
// field of an electrode is singular.
std::vector<Point> sharp_corners(const Outline& outline);

}  // namespace hv
