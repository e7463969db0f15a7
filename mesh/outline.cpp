#include "mesh/outline.h"

#include <algorithm>
#include <cmath>
#include <optional>
#include <sstream>
#include <tuple>

namespace hv {

namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kRelativeTolerance = 1e-9;  // of the shape's size: "the same point"
constexpr double kCornerAngle = kPi / 180;   // a tangent jump below 1 degree is no corner

Point operator+(Point a, Point b) { return {a.r + b.r, a.z + b.z}; }
Point operator-(Point a, Point b) { return {a.r - b.r, a.z - b.z}; }
Point operator*(double s, Point a) { return {s * a.r, s * a.z}; }
double dot(Point a, Point b) { return a.r * b.r + a.z * b.z; }
double cross(Point a, Point b) { return a.r * b.z - a.z * b.r; }
double length(Point a) { return std::hypot(a.r, a.z); }
Point unit(Point a) { return (1.0 / length(a)) * a; }
Point left_normal(Point a) { return {-a.z, a.r}; }

std::string format_point(Point p) {
  std::ostringstream out;
  out << "(" << p.r << ", " << p.z << ") m";
  return out.str();
}

[[noreturn]] void reject(const ShapeSpec& shape, const std::string& problem, const std::string& hint) {
  throw InputError(shape.where, "shape '" + shape.name + "': " + problem, hint);
}

double extent_of(const std::vector<Point>& points) {
  double extent = 0.0;
  for (const Point& a : points)
    for (const Point& b : points) extent = std::max(extent, length(a - b));
  return extent;
}

bool on_axis(Point p, double scale) { return p.r <= kRelativeTolerance * scale; }

// Arcs from `from` to `to` about `center` (the shorter way), cut into pieces of at most a
// quarter turn so that every piece is unambiguous for OpenCASCADE.
void append_arc(Point from, Point to, Point center, std::vector<OutlinePiece>& loop) {
  const Point a = from - center, b = to - center;
  const double sweep = std::atan2(cross(a, b), dot(a, b));  // signed, |sweep| < pi
  const int parts = std::max(1, static_cast<int>(std::ceil(std::abs(sweep) / (kPi / 2) - 1e-9)));
  const double radius = length(a), start = std::atan2(a.z, a.r);
  Point previous = from;
  for (int k = 1; k <= parts; ++k) {
    const double angle = start + sweep * k / parts;
    const Point next = k == parts ? to : center + Point{radius * std::cos(angle), radius * std::sin(angle)};
    loop.push_back({previous, next, true, center});
    previous = next;
  }
}

void append_line(Point from, Point to, double scale, std::vector<OutlinePiece>& loop) {
  if (length(to - from) > kRelativeTolerance * scale) loop.push_back({from, to, false, {}});
}

// Signed area enclosed by a closed loop (positive counter-clockwise): the shoelace sum of the
// chords plus, for each arc, its circular segment (R^2/2)(theta - sin theta).
double signed_area(const std::vector<OutlinePiece>& loop) {
  double area = 0.0;
  for (const OutlinePiece& piece : loop) {
    area += 0.5 * cross(piece.from, piece.to);
    if (!piece.is_arc) continue;
    const Point a = piece.from - piece.center, b = piece.to - piece.center;
    const double theta = std::abs(std::atan2(cross(a, b), dot(a, b)));
    const double segment = 0.5 * dot(a, a) * (theta - std::sin(theta));
    const bool bulges_right = cross(piece.to - piece.from, piece.center - piece.from) > 0;
    area += bulges_right ? segment : -segment;
  }
  return area;
}

// Unit tangent in the direction of travel at the start (at_end = false) or end of a piece.
Point tangent(const OutlinePiece& piece, bool at_end) {
  if (!piece.is_arc) return unit(piece.to - piece.from);
  const Point radial = (at_end ? piece.to : piece.from) - piece.center;
  const bool counter_clockwise = cross(piece.from - piece.center, piece.to - piece.center) > 0;
  const Point t = unit(left_normal(radial));
  return counter_clockwise ? t : -1.0 * t;
}

// A closed polygon with every corner off the axis rounded by an arc of radius `round`, tangent to
// both edges. The arc of a corner with turning angle phi takes round * tan(|phi| / 2) of each edge.
std::vector<OutlinePiece> rounded_polygon(const ShapeSpec& shape, std::vector<Point> points, double round) {
  const double scale = extent_of(points);
  points.erase(std::unique(points.begin(), points.end(),
                           [&](Point a, Point b) { return length(a - b) <= kRelativeTolerance * scale; }),
               points.end());
  while (points.size() > 1 && length(points.front() - points.back()) <= kRelativeTolerance * scale) points.pop_back();
  const size_t n = points.size();
  if (n < 3 || scale <= 0) reject(shape, "a polygon needs at least 3 distinct points", "add points");
  if (round < 0) reject(shape, "`round` is negative", "give a corner radius >= 0");

  // Tangent length of each corner (0 where it stays sharp).
  std::vector<double> cut(n, 0.0);
  std::vector<double> half_turn_tan(n, 0.0);
  for (size_t i = 0; i < n; ++i) {
    const Point d_in = unit(points[i] - points[(i + n - 1) % n]);
    const Point d_out = unit(points[(i + 1) % n] - points[i]);
    const double turn = std::atan2(cross(d_in, d_out), dot(d_in, d_out));
    if (std::abs(turn) > kPi - kCornerAngle)
      reject(shape, "the outline folds back on itself at " + format_point(points[i]), "remove that point");
    if (round > 0 && !on_axis(points[i], scale) && std::abs(turn) > kCornerAngle) {
      half_turn_tan[i] = std::tan(std::abs(turn) / 2);
      cut[i] = round * half_turn_tan[i];
    }
  }
  for (size_t i = 0; i < n; ++i) {
    const size_t j = (i + 1) % n;
    const double edge = length(points[j] - points[i]);
    if (cut[i] + cut[j] > edge * (1 + kRelativeTolerance)) {
      std::ostringstream hint;
      hint << "the largest corner radius that fits this edge is " << edge / (half_turn_tan[i] + half_turn_tan[j])
           << " m";
      reject(shape,
             "`round` " + std::to_string(round) + " m does not fit the edge from " + format_point(points[i]) + " to " +
                 format_point(points[j]),
             hint.str());
    }
  }

  std::vector<OutlinePiece> loop;
  for (size_t i = 0; i < n; ++i) {
    const Point previous = points[(i + n - 1) % n], corner = points[i], next = points[(i + 1) % n];
    const Point d_in = unit(corner - previous), d_out = unit(next - corner);
    const Point arc_start = corner - cut[i] * d_in, arc_end = corner + cut[i] * d_out;
    if (cut[i] > 0) {
      const Point towards_center = cross(d_in, d_out) > 0 ? left_normal(d_in) : -1.0 * left_normal(d_in);
      append_arc(arc_start, arc_end, arc_start + round * towards_center, loop);
    }
    const size_t j = (i + 1) % n;
    append_line(arc_end, next - cut[j] * unit(next - corner), scale, loop);
  }
  return loop;
}

std::vector<OutlinePiece> rectangle_loop(const ShapeSpec& shape, const RectShape& rect) {
  if (!(rect.r1 > rect.r0) || !(rect.z1 > rect.z0))
    reject(shape, "a rectangle needs r1 > r0 and z1 > z0", "check the order of the limits");
  return rounded_polygon(shape, {{rect.r0, rect.z0}, {rect.r1, rect.z0}, {rect.r1, rect.z1}, {rect.r0, rect.z1}},
                         rect.round);
}

// A path of lines and arcs. An arc's signed radius puts its bulge left of travel when positive,
// so the centre lies on the other side of the chord: centre = midpoint -/+ h n_left,
// h = sqrt(R^2 - (c/2)^2).
std::vector<OutlinePiece> path_loop(const ShapeSpec& shape, const PathShape& path) {
  std::vector<Point> points{path.start};
  for (const PathSegment& segment : path.segments) points.push_back(segment.to);
  const double scale = extent_of(points);
  if (path.segments.empty() || scale <= 0) reject(shape, "a path needs segments that enclose an area", "add segments");

  std::vector<OutlinePiece> loop;
  Point at = path.start;
  for (const PathSegment& segment : path.segments) {
    const Point chord = segment.to - at;
    const double half_chord = 0.5 * length(chord);
    if (segment.kind == PathSegment::Kind::Line || half_chord == 0.0) {
      append_line(at, segment.to, scale, loop);
    } else {
      const double radius = std::abs(segment.radius);
      if (radius < half_chord * (1 - kRelativeTolerance)) {
        std::ostringstream hint;
        hint << "use |radius| >= " << half_chord << " m (half the chord)";
        reject(shape, "the arc to " + format_point(segment.to) + " has a radius smaller than half its chord",
               hint.str());
      }
      const double h = std::sqrt(std::max(0.0, radius * radius - half_chord * half_chord));
      const Point n_left = unit(left_normal(chord));
      const Point middle = at + 0.5 * chord;
      const Point center = segment.radius > 0 ? middle - h * n_left : middle + h * n_left;
      append_arc(at, segment.to, center, loop);
    }
    at = segment.to;
  }
  const bool ends_at_start = length(at - path.start) <= kRelativeTolerance * scale;
  const bool axis_closes = on_axis(path.start, scale) && on_axis(at, scale);
  if (!ends_at_start && !axis_closes)
    reject(shape, "the path is not closed: it ends at " + format_point(at) + ", not at its start",
           "end it at its start, or start and end it on the axis (r = 0)");
  append_line(at, path.start, scale, loop);  // along the axis, or nothing when already closed
  return loop;
}

// The loop as straight chords: lines as they are, arcs (at most a quarter turn each) cut into
// kChordsPerArc chords, which stray from the true arc by at most 0.5 % of its radius.
std::vector<Point> chord_polygon(const std::vector<OutlinePiece>& loop) {
  constexpr int kChordsPerArc = 8;
  std::vector<Point> corners;
  for (const OutlinePiece& piece : loop) {
    corners.push_back(piece.from);
    if (!piece.is_arc) continue;
    const Point a = piece.from - piece.center, b = piece.to - piece.center;
    const double sweep = std::atan2(cross(a, b), dot(a, b)), radius = length(a), start = std::atan2(a.z, a.r);
    for (int k = 1; k < kChordsPerArc; ++k) {
      const double angle = start + sweep * k / kChordsPerArc;
      corners.push_back(piece.center + Point{radius * std::cos(angle), radius * std::sin(angle)});
    }
  }
  return corners;
}

double distance_to_segment(Point p, Point a, Point b) {
  const Point ab = b - a;
  const double t = std::clamp(dot(p - a, ab) / dot(ab, ab), 0.0, 1.0);
  return length(p - (a + t * ab));
}

// Where segment ab crosses or touches segment cd (within `tolerance`), if it does.
std::optional<Point> segments_meet(Point a, Point b, Point c, Point d, double tolerance) {
  const double c_side = cross(b - a, c - a), d_side = cross(b - a, d - a);
  const double a_side = cross(d - c, a - c), b_side = cross(d - c, b - c);
  if (c_side * d_side < 0 && a_side * b_side < 0) return c + (c_side / (c_side - d_side)) * (d - c);
  for (const auto& [p, from, to] : {std::tuple{c, a, b}, std::tuple{d, a, b}, std::tuple{a, c, d}, std::tuple{b, c, d}})
    if (distance_to_segment(p, from, to) <= tolerance) return p;
  return std::nullopt;
}

// Rejects an outline that crosses or touches itself, such as a bow-tie: OpenCASCADE builds a face
// from it without complaint, but what is inside is not defined. Checks every pair of chords that
// are not neighbours.
void reject_self_crossing(const ShapeSpec& shape, const std::vector<OutlinePiece>& loop, double scale) {
  const std::vector<Point> corners = chord_polygon(loop);
  const size_t n = corners.size();
  for (size_t i = 0; i < n; ++i)
    for (size_t j = i + 2; j < n; ++j) {
      if (i == 0 && j == n - 1) continue;  // the closing chord is a neighbour of the first
      const auto at = segments_meet(corners[i], corners[i + 1], corners[j], corners[(j + 1) % n],
                                    kRelativeTolerance * scale);
      if (at)
        reject(shape, "the outline crosses or touches itself at " + format_point(*at),
               "list the points so that the outline goes round once without crossing; split it into two shapes "
               "if it has two parts");
    }
}

}  // namespace

Outline outline_of(const ShapeSpec& shape) {
  Outline outline;
  if (const auto* circle = std::get_if<CircleShape>(&shape.outline)) {
    if (!(circle->radius > 0)) reject(shape, "the circle's radius is not positive", "give a radius > 0");
    outline.is_circle = true;
    outline.center = circle->center;
    outline.radius = circle->radius;
  } else if (const auto* rect = std::get_if<RectShape>(&shape.outline)) {
    outline.loop = rectangle_loop(shape, *rect);
  } else if (const auto* polygon = std::get_if<PolygonShape>(&shape.outline)) {
    outline.loop = rounded_polygon(shape, polygon->points, polygon->round);
  } else {
    outline.loop = path_loop(shape, std::get<PathShape>(shape.outline));
  }
  const BoundingBox box = bounding_box(outline);
  if (!(box.r_max > 0)) reject(shape, "the shape lies entirely at r <= 0", "the model is the half plane r >= 0");
  if (!outline.is_circle) {
    const double size = std::max(box.r_max - box.r_min, box.z_max - box.z_min);
    reject_self_crossing(shape, outline.loop, size);
    if (std::abs(signed_area(outline.loop)) <= kRelativeTolerance * size * size)
      reject(shape, "the outline encloses no area", "check its points");
  }
  return outline;
}

BoundingBox bounding_box(const Outline& outline) {
  if (outline.is_circle) {
    const Point c = outline.center;
    return {c.r - outline.radius, c.r + outline.radius, c.z - outline.radius, c.z + outline.radius};
  }
  BoundingBox box{outline.loop.front().from.r, outline.loop.front().from.r, outline.loop.front().from.z,
                  outline.loop.front().from.z};
  auto include = [&](Point p) {
    box.r_min = std::min(box.r_min, p.r), box.r_max = std::max(box.r_max, p.r);
    box.z_min = std::min(box.z_min, p.z), box.z_max = std::max(box.z_max, p.z);
  };
  for (const OutlinePiece& piece : outline.loop) {
    include(piece.to);
    if (!piece.is_arc) continue;
    // An arc of at most a quarter turn reaches beyond its ends only where it passes one of the
    // four axis-parallel directions from its centre.
    const Point a = piece.from - piece.center, b = piece.to - piece.center;
    const double radius = length(a);
    for (const Point direction : {Point{1, 0}, Point{0, 1}, Point{-1, 0}, Point{0, -1}}) {
      if (cross(a, direction) * cross(direction, b) > 0 && dot(a + b, direction) > 0)
        include(piece.center + radius * direction);
    }
  }
  return box;
}

double smallest_radius(const Outline& outline) {
  if (outline.is_circle) return outline.radius;
  double smallest = 0.0;
  for (const OutlinePiece& piece : outline.loop) {
    if (!piece.is_arc) continue;
    const double radius = length(piece.from - piece.center);
    smallest = smallest == 0.0 ? radius : std::min(smallest, radius);
  }
  return smallest;
}

std::vector<Point> sharp_corners(const Outline& outline) {
  std::vector<Point> corners;
  if (outline.is_circle) return corners;
  const BoundingBox box = bounding_box(outline);
  const double scale = std::max(box.r_max - box.r_min, box.z_max - box.z_min);
  const double orientation = signed_area(outline.loop) > 0 ? 1.0 : -1.0;
  const size_t n = outline.loop.size();
  for (size_t i = 0; i < n; ++i) {
    const OutlinePiece& arriving = outline.loop[i];
    const OutlinePiece& leaving = outline.loop[(i + 1) % n];
    const Point t_in = tangent(arriving, true), t_out = tangent(leaving, false);
    const double turn = std::atan2(cross(t_in, t_out), dot(t_in, t_out));
    // Convex: the outline turns the same way as it goes round (left when counter-clockwise).
    if (std::abs(turn) > kCornerAngle && turn * orientation > 0 && !on_axis(arriving.to, scale))
      corners.push_back(arriving.to);
  }
  return corners;
}

}  // namespace hv
