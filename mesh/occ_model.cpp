#include "mesh/occ_model.h"

#include <gmsh.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <set>
#include <sstream>

#include "mesh/gmsh_session.h"
#include "mesh/outline.h"

namespace hv {

namespace {

namespace occ = gmsh::model::occ;
using DimTags = gmsh::vectorpair;
using Entity = std::pair<int, int>;  // (dimension, tag)

constexpr double kPi = 3.14159265358979323846;
// Default open radius: this many times the model's largest extent from the domain centre.
constexpr double kOpenRadiusFactor = 5.0;
// Default max_size: this fraction of the domain's size (open radius, or the box's longer side).
constexpr double kMaxSizeFraction = 0.1;
// Default surface size: this many elements per full turn of the smallest radius of curvature (6
// degrees each). 24 is the floor for a usable field; 60 is what the recovered surface field needs to
// stay within 0.1-0.3 % of closed-form results on the bundled analytic cases (measured: a sphere 50 mm
// above a plane is 0.96 % low with 24 per turn, 0.27 % with 48 and under 0.1 % with 96). The size uses
// one more, so that the mesher's rounding of the count never gives fewer.
constexpr int kElementsPerTurn = 60;
// Default surface size of an electrode without arcs: this fraction of its bounding box's shorter
// side.
constexpr double kStraightSizeFraction = 1.0 / 8;
// Distance in model units below which OpenCASCADE points coincide (its boxes are inflated ~1e-7).
constexpr double kModelTolerance = 1e-6;

// One shape of the case with its outline and what it is.
struct ResolvedShape {
  const ShapeSpec* spec = nullptr;
  Outline outline;
  int electrode = -1;  // index into GeometrySpec::electrodes, or -1
  int material = -1;   // index into GeometrySpec::materials, or -1
};

// A surface produced by the fragment: inside the domain or not, and the shapes covering it.
struct Piece {
  int tag = 0;
  bool in_domain = false;
  std::vector<int> shapes;  // indices into the resolved shapes, in painting order
  int owner = -1;           // the shape that paints it; -1 for gas
  std::vector<int> curves;  // its boundary curves
  std::vector<int> points;  // its boundary points
};

std::string format_length(double metres) {
  std::ostringstream out;
  out << metres << " m";
  return out.str();
}

std::string format_point(Point p) {
  std::ostringstream out;
  out << "(r = " << p.r << " m, z = " << p.z << " m)";
  return out.str();
}

std::string format_place(const SourceLocation& where) {
  if (where.file.empty()) return where.key_path;
  return where.file + ":" + std::to_string(where.line);
}

template <class Named>
int index_of(const std::vector<Named>& items, const std::string& name) {
  for (size_t i = 0; i < items.size(); ++i)
    if (items[i].name == name) return static_cast<int>(i);
  return -1;
}

// Two conductors that may not touch: different potentials, or one of them floating.
bool conflicting(const ElectrodeSpec& a, const ElectrodeSpec& b) {
  if (&a == &b) return false;
  return a.floating || b.floating || a.potential_V != b.potential_V;
}

bool grounded(const ElectrodeSpec& e) { return !e.floating && e.potential_V == 0.0; }

void check_mesh_controls(const MeshSpec& mesh) {
  if (mesh.order < 1 || mesh.order > 3) throw InputError(mesh.where, "mesh.order must be 1, 2 or 3");
  if (!(mesh.surface_size >= 0)) throw InputError(mesh.where, "mesh.surface_size must be positive");
  if (!(mesh.max_size >= 0)) throw InputError(mesh.where, "mesh.max_size must be positive");
  if (!(mesh.growth > 1.0)) throw InputError(mesh.where, "mesh.growth must be larger than 1", "1.2 to 1.5 is usual");
  if (mesh.surface_size > 0 && mesh.max_size > 0 && mesh.surface_size > mesh.max_size)
    throw InputError(mesh.where, "mesh.surface_size is larger than mesh.max_size", "swap them");
}

// A floating electrode's potential follows from its zero net charge; with no shape it has no
// surface to hold a charge (and is most likely misspelt in `shapes`).
void require_shapes_of_floating_electrodes(const GeometrySpec& spec) {
  for (const ElectrodeSpec& electrode : spec.electrodes) {
    if (!electrode.floating) continue;
    if (std::none_of(spec.shapes.begin(), spec.shapes.end(),
                     [&](const ShapeSpec& shape) { return shape.electrode == electrode.name; }))
      throw InputError(electrode.where, "the floating electrode '" + electrode.name + "' has no shape",
                       "give a shape `electrode: " + electrode.name + "`, or remove the electrode");
  }
}

std::vector<ResolvedShape> resolve_shapes(const GeometrySpec& spec) {
  for (const MaterialSpec& material : spec.materials)
    if (!(material.permittivity > 0))
      throw InputError(material.where, "material '" + material.name + "': permittivity must be positive");
  require_shapes_of_floating_electrodes(spec);
  std::vector<ResolvedShape> shapes;
  for (const ShapeSpec& shape : spec.shapes) {
    ResolvedShape resolved;
    resolved.spec = &shape;
    if (shape.electrode.empty() == shape.material.empty())
      throw InputError(shape.where, "shape '" + shape.name + "' must be either an electrode or a material",
                       "give exactly one of `electrode:` and `material:`");
    resolved.electrode = index_of(spec.electrodes, shape.electrode);
    resolved.material = index_of(spec.materials, shape.material);
    if (!shape.electrode.empty() && resolved.electrode < 0)
      throw InputError(shape.where, "shape '" + shape.name + "': no electrode '" + shape.electrode + "'",
                       "declare it under `electrodes:`");
    if (!shape.material.empty() && resolved.material < 0)
      throw InputError(shape.where, "shape '" + shape.name + "': no material '" + shape.material + "'",
                       "declare it under `materials:`");
    resolved.outline = outline_of(shape);
    shapes.push_back(std::move(resolved));
  }
  return shapes;
}

// The bounding box of all shapes, clipped at r = 0 (the half plane the model lives in).
BoundingBox shapes_box(const std::vector<ResolvedShape>& shapes) {
  BoundingBox box = bounding_box(shapes.front().outline);
  for (const ResolvedShape& shape : shapes) {
    const BoundingBox b = bounding_box(shape.outline);
    box = {std::min(box.r_min, b.r_min), std::max(box.r_max, b.r_max), std::min(box.z_min, b.z_min),
           std::max(box.z_max, b.z_max)};
  }
  box.r_min = std::max(box.r_min, 0.0);
  return box;
}

DomainOutline open_domain(const GeometrySpec& spec, const std::vector<ResolvedShape>& shapes) {
  const DomainSpec& d = spec.domain;
  if (shapes.empty())
    throw InputError(d.where, "an open domain needs at least one shape", "add the electrodes under `shapes:`");
  if (d.radius < 0) throw InputError(d.where, "domain.radius must be positive");
  const BoundingBox box = shapes_box(shapes);
  DomainOutline domain;
  domain.open = true;
  domain.open_center = {0.0, spec.ground_plane.present ? spec.ground_plane.z : 0.5 * (box.z_min + box.z_max)};
  const double reach = std::max(std::hypot(box.r_max, box.z_max - domain.open_center.z),
                                std::hypot(box.r_max, box.z_min - domain.open_center.z));
  domain.open_radius = d.radius > 0 ? d.radius : kOpenRadiusFactor * reach;
  return domain;
}

DomainOutline box_domain(const GeometrySpec& spec) {
  const DomainSpec& d = spec.domain;
  DomainOutline domain;
  domain.open = false;
  domain.r_max = d.r_max;
  domain.z_min = spec.ground_plane.present ? spec.ground_plane.z : d.z_min;
  domain.z_max = d.z_max;
  if (!(domain.r_max > 0) || !(domain.z_max > domain.z_min))
    throw InputError(d.where, "the box needs r_max > 0 and z_max above its bottom (the ground plane if any)");
  domain.top = d.top;
  domain.right = d.right;
  domain.bottom = d.bottom;
  for (const BoxSide* side : {&d.top, &d.right, &d.bottom})
    if (!side->is_symmetry() && index_of(spec.electrodes, side->electrode) < 0)
      throw InputError(d.where, "box side '" + side->electrode + "' is no electrode",
                       "use `symmetry` or an electrode declared under `electrodes:`");
  return domain;
}

// The model's largest extent, m: the unit of Gmsh's model coordinates.
double model_extent(const std::vector<ResolvedShape>& shapes, const DomainOutline& domain) {
  BoundingBox box = shapes.empty() ? BoundingBox{0, domain.r_max, domain.z_min, domain.z_max} : shapes_box(shapes);
  if (!domain.open) {
    box = {0.0, std::max(box.r_max, domain.r_max), std::min(box.z_min, domain.z_min),
           std::max(box.z_max, domain.z_max)};
  }
  return std::max(box.r_max - box.r_min, box.z_max - box.z_min);
}

DimTags add_domain(const DomainOutline& domain, double scale) {
  if (!domain.open) {
    return {{2, occ::addRectangle(0, to_model(domain.z_min, scale), 0, to_model(domain.r_max, scale),
                                  to_model(domain.z_max - domain.z_min, scale))}};
  }
  const double radius = to_model(domain.open_radius, scale), zc = to_model(domain.open_center.z, scale);
  const int disk = occ::addDisk(0, zc, 0, radius, radius);
  // Half disk on the axis; above a ground plane, the quarter disk above it.
  const int half_plane = domain.has_ground_plane ? occ::addRectangle(0, zc, 0, radius, radius)
                                                 : occ::addRectangle(0, zc - radius, 0, radius, 2 * radius);
  DimTags out;
  std::vector<DimTags> map;
  occ::intersect({{2, disk}}, {{2, half_plane}}, out, map);
  return out;
}

int add_outline(const Outline& outline, double scale) {
  if (outline.is_circle)
    return occ::addDisk(to_model(outline.center.r, scale), to_model(outline.center.z, scale), 0,
                        to_model(outline.radius, scale), to_model(outline.radius, scale));
  auto add_point = [&](Point p) { return occ::addPoint(to_model(p.r, scale), to_model(p.z, scale), 0); };
  std::vector<int> starts;
  for (const OutlinePiece& piece : outline.loop) starts.push_back(add_point(piece.from));
  std::vector<int> curves;
  for (size_t i = 0; i < outline.loop.size(); ++i) {
    const OutlinePiece& piece = outline.loop[i];
    const int end = starts[(i + 1) % starts.size()];
    curves.push_back(piece.is_arc ? occ::addCircleArc(starts[i], add_point(piece.center), end)
                                  : occ::addLine(starts[i], end));
  }
  return occ::addPlaneSurface({occ::addCurveLoop(curves)});
}

// The shape's surface in model units, clipped to r >= 0 by intersecting it with a rectangle
// [0, reach] x [-reach, reach] that holds the whole model.
DimTags add_clipped_shape(const ResolvedShape& shape, double scale, double reach) {
  return run_gmsh_on_input(shape.spec->where, "shape '" + shape.spec->name + "': building the outline",
                           "check that the outline does not cross itself", [&] {
                             const int surface = add_outline(shape.outline, scale);
                             const int half_plane = occ::addRectangle(0, -reach, 0, reach, 2 * reach);
                             DimTags out;
                             std::vector<DimTags> map;
                             occ::intersect({{2, surface}}, {{2, half_plane}}, out, map);
                             return out;
                           });
}

Point model_point_in_metres(const Entity& entity, double scale) {
  double x0, y0, z0, x1, y1, z1;
  gmsh::model::getBoundingBox(entity.first, entity.second, x0, y0, z0, x1, y1, z1);
  return {0.5 * (x0 + x1) * scale, 0.5 * (y0 + y1) * scale};
}

std::vector<int> boundary_tags(const DimTags& entities, bool down_to_points) {
  DimTags boundary;
  gmsh::model::getBoundary(entities, boundary, /*combined=*/!down_to_points, /*oriented=*/false,
                           /*recursive=*/down_to_points);
  std::set<int> tags;
  for (const Entity& e : boundary) tags.insert(std::abs(e.second));
  return {tags.begin(), tags.end()};
}

// Fragments the domain with every shape so that all regions share nodes, and records for every
// resulting surface whether it is in the domain and which shapes cover it.
std::vector<Piece> fragment_model(const DimTags& domain, const std::vector<DimTags>& shapes) {
  DimTags tools;
  std::vector<int> tool_shape;
  for (size_t s = 0; s < shapes.size(); ++s)
    for (const Entity& e : shapes[s]) tools.push_back(e), tool_shape.push_back(static_cast<int>(s));
  DimTags out;
  std::vector<DimTags> map;
  occ::fragment(domain, tools, out, map);
  occ::synchronize();

  std::map<int, Piece> pieces;
  for (size_t i = 0; i < map.size(); ++i) {
    for (const Entity& e : map[i]) {
      if (e.first != 2) continue;
      Piece& piece = pieces[e.second];
      piece.tag = e.second;
      if (i < domain.size()) {
        piece.in_domain = true;
      } else {
        const int shape = tool_shape[i - domain.size()];
        if (piece.shapes.empty() || piece.shapes.back() != shape) piece.shapes.push_back(shape);
      }
    }
  }
  std::vector<Piece> result;
  for (auto& [tag, piece] : pieces) {
    piece.curves = boundary_tags({{2, tag}}, false);
    piece.points = boundary_tags({{2, tag}}, true);
    result.push_back(std::move(piece));
  }
  return result;
}

[[noreturn]] void reject_pair(const ResolvedShape& a, const ResolvedShape& b, const std::string& relation,
                              const std::string& hint) {
  throw InputError(b.spec->where,
                   "electrode shape '" + b.spec->name + "' (" + b.spec->electrode + ") " + relation + " shape '" +
                       a.spec->name + "' (" + a.spec->electrode + ", " + format_place(a.spec->where) + ")",
                   hint);
}

const char* kConflictHint = "electrodes of different potential (or a floating one) must keep a gap";

// Paints each piece: the last electrode shape covering it, else the last dielectric, else gas.
// Rejects overlapping conflicting electrodes and electrodes reaching outside the domain.
void paint_pieces(const GeometrySpec& spec, const std::vector<ResolvedShape>& shapes, const DomainOutline& domain,
                  double scale, std::vector<Piece>& pieces) {
  for (Piece& piece : pieces) {
    int last_electrode = -1, last_dielectric = -1;
    for (int s : piece.shapes) {
      if (shapes[s].electrode < 0) {
        last_dielectric = s;
        continue;
      }
      if (last_electrode >= 0 &&
          conflicting(spec.electrodes[shapes[last_electrode].electrode], spec.electrodes[shapes[s].electrode]))
        reject_pair(shapes[last_electrode], shapes[s], "overlaps", kConflictHint);
      last_electrode = s;
    }
    piece.owner = last_electrode >= 0 ? last_electrode : last_dielectric;
    if (piece.in_domain || last_electrode < 0) continue;
    const ShapeSpec& culprit = *shapes[last_electrode].spec;
    double x, y, z;
    occ::getCenterOfMass(2, piece.tag, x, y, z);
    if (domain.has_ground_plane && y * scale < domain.ground_z)
      throw InputError(culprit.where, "electrode shape '" + culprit.name + "' reaches below the ground plane",
                       "keep electrodes above the plane (z >= " + format_length(spec.ground_plane.z) + ")");
    throw InputError(culprit.where, "electrode shape '" + culprit.name + "' reaches outside the domain",
                     domain.open ? "enlarge domain.radius (now " + format_length(domain.open_radius) + ")"
                                 : "keep electrodes inside the box");
  }
}

bool is_electrode_piece(const Piece& piece, const std::vector<ResolvedShape>& shapes) {
  return piece.owner >= 0 && shapes[piece.owner].electrode >= 0;
}

// Conflicting electrodes may not share a curve or a point of the fragmented model.
void check_touching(const GeometrySpec& spec, const std::vector<ResolvedShape>& shapes,
                    const std::vector<Piece>& pieces, double scale) {
  std::map<Entity, std::vector<int>> shapes_at;  // entity -> owner shapes of electrode pieces around it
  for (const Piece& piece : pieces) {
    if (!piece.in_domain || !is_electrode_piece(piece, shapes)) continue;
    for (int c : piece.curves) shapes_at[{1, c}].push_back(piece.owner);
    for (int p : piece.points) shapes_at[{0, p}].push_back(piece.owner);
  }
  for (const auto& [entity, owners] : shapes_at)
    for (int a : owners)
      for (int b : owners)
        if (a < b && conflicting(spec.electrodes[shapes[a].electrode], spec.electrodes[shapes[b].electrode]))
          reject_pair(shapes[a], shapes[b], "touches",
                      "they meet at " + format_point(model_point_in_metres(entity, scale)) + "; " + kConflictHint);
}

// Electrodes may touch the axis, a symmetry side, a box side of their own name, and (when at 0 V)
// the ground plane; nothing else of the domain's outer boundary.
void check_outer_contacts(const GeometrySpec& spec, const std::vector<ResolvedShape>& shapes,
                          const std::vector<Piece>& pieces, const DomainOutline& domain, double scale) {
  DimTags in_domain;
  for (const Piece& piece : pieces)
    if (piece.in_domain) in_domain.push_back({2, piece.tag});
  DimTags outer_curves;
  for (int c : boundary_tags(in_domain, false)) outer_curves.push_back({1, c});
  const std::vector<int> outer_points = boundary_tags(outer_curves, true);

  for (const Piece& piece : pieces) {
    if (!piece.in_domain || !is_electrode_piece(piece, shapes)) continue;
    const ShapeSpec& shape = *shapes[piece.owner].spec;
    const ElectrodeSpec& electrode = spec.electrodes[shapes[piece.owner].electrode];
    for (int p : piece.points) {
      if (!std::binary_search(outer_points.begin(), outer_points.end(), p)) continue;
      const Point at = model_point_in_metres({0, p}, scale);
      for (OuterSide side :
           {OuterSide::GroundPlane, OuterSide::Top, OuterSide::Right, OuterSide::Bottom, OuterSide::Open}) {
        if (!domain.on(side, at)) continue;
        const std::string touches =
            "electrode shape '" + shape.name + "' touches the " + side_name(side) + " at " + format_point(at);
        if (side == OuterSide::Open)
          throw InputError(shape.where, touches,
                           "enlarge domain.radius (now " + format_length(domain.open_radius) + ")");
        if (side == OuterSide::GroundPlane && !grounded(electrode))
          throw InputError(shape.where, touches + ", but its potential is not 0 V",
                           "lift it off the plane, or make it a 0 V electrode");
        if (side == OuterSide::GroundPlane) continue;
        const BoxSide& box_side = domain.box_side(side);
        if (!box_side.is_symmetry() && box_side.electrode != electrode.name)
          throw InputError(shape.where, touches + ", which is electrode '" + box_side.electrode + "'",
                           "only shapes of that electrode may touch it");
      }
    }
  }
}

bool on_outer_side(const DomainOutline& domain, Point p) {
  for (OuterSide side :
       {OuterSide::Axis, OuterSide::GroundPlane, OuterSide::Top, OuterSide::Right, OuterSide::Bottom, OuterSide::Open})
    if (domain.on(side, p)) return true;
  return false;
}

// Warns about convex corners of electrode shapes that remain on the meshed boundary.
// Corners on the domain's outer sides are not corners of the field problem (a symmetry side
// mirrors them into a straight edge; a conducting side continues the conductor).
std::vector<std::string> sharp_corner_warnings(const std::vector<ResolvedShape>& shapes,
                                               const std::vector<int>& meshed_points, const DomainOutline& domain,
                                               double scale) {
  std::vector<std::string> warnings;
  for (const ResolvedShape& shape : shapes) {
    if (shape.electrode < 0) continue;
    std::vector<Point> exposed;
    for (const Point corner : sharp_corners(shape.outline)) {
      if (on_outer_side(domain, corner)) continue;
      DimTags near;
      const double x = corner.r / scale, y = corner.z / scale, d = kModelTolerance;
      gmsh::model::getEntitiesInBoundingBox(x - d, y - d, -d, x + d, y + d, d, near, 0);
      for (const Entity& e : near)
        if (std::binary_search(meshed_points.begin(), meshed_points.end(), e.second)) {
          exposed.push_back(corner);
          break;
        }
    }
    if (exposed.empty()) continue;
    warnings.push_back("electrode shape '" + shape.spec->name + "' (" + format_place(shape.spec->where) + ") has " +
                       std::to_string(exposed.size()) + " sharp corner(s), e.g. at " + format_point(exposed.front()) +
                       ": the field is singular there; give the shape a `round`");
  }
  return warnings;
}

// The element size on each electrode's surface, m: mesh.surface_size when given, else
// 2 pi R_min / 61 from its smallest radius of curvature, else 1/8 of its shorter side.
std::vector<double> electrode_sizes(const GeometrySpec& spec, const std::vector<ResolvedShape>& shapes,
                                    double max_size) {
  std::vector<double> sizes(spec.electrodes.size(), max_size);
  for (const ResolvedShape& shape : shapes) {
    if (shape.electrode < 0) continue;
    double size = spec.mesh.surface_size;
    if (size == 0.0) {
      const double radius = smallest_radius(shape.outline);
      const BoundingBox box = bounding_box(shape.outline);
      const double shorter_side = std::min(box.r_max - std::max(box.r_min, 0.0), box.z_max - box.z_min);
      size = radius > 0 ? 2 * kPi * radius / (kElementsPerTurn + 1) : kStraightSizeFraction * shorter_side;
    }
    double& current = sizes[static_cast<size_t>(shape.electrode)];
    current = std::min(current, size);
  }
  return sizes;
}

std::vector<Region> regions_of(const GeometrySpec& spec, const std::vector<ResolvedShape>& shapes,
                               std::vector<Piece>& kept, std::vector<std::pair<int, int>>& surfaces) {
  std::vector<bool> used(spec.materials.size() + 1, false);  // gas, then each material
  for (const Piece& piece : kept) used[piece.owner < 0 ? 0 : 1 + shapes[piece.owner].material] = true;
  std::vector<Region> regions;
  std::vector<int> region_of(used.size(), -1);
  for (size_t i = 0; i < used.size(); ++i) {
    if (!used[i]) continue;
    region_of[i] = static_cast<int>(regions.size());
    if (i == 0)
      regions.push_back({"gas", 1.0, true});
    else
      regions.push_back({spec.materials[i - 1].name, spec.materials[i - 1].permittivity, false});
  }
  for (const Piece& piece : kept)
    surfaces.emplace_back(piece.tag, region_of[piece.owner < 0 ? 0 : 1 + shapes[piece.owner].material]);
  return regions;
}

}  // namespace

double to_model(double metres, double length_scale) {
  constexpr double grid = 1.0 / (1ull << 36);
  return std::round(metres / length_scale / grid) * grid;
}

PaintedModel build_painted_model(const GeometrySpec& spec) {
  check_mesh_controls(spec.mesh);
  const std::vector<ResolvedShape> shapes = resolve_shapes(spec);
  PaintedModel model;
  model.domain = spec.domain.outer == DomainSpec::Outer::Open ? open_domain(spec, shapes) : box_domain(spec);
  model.domain.has_ground_plane = spec.ground_plane.present;
  model.domain.ground_z = spec.ground_plane.z;
  const double scale = model_extent(shapes, model.domain);
  if (!(scale > 0)) throw InputError(spec.domain.where, "the model has no extent", "add shapes");
  model.length_scale = scale;
  model.domain.tolerance = kModelTolerance * scale;

  gmsh::model::add("hvstress");
  const DimTags domain = add_domain(model.domain, scale);
  const double domain_size = model.domain.open ? model.domain.open_radius
                                               : std::max(model.domain.r_max, model.domain.z_max - model.domain.z_min);
  double reach = 4 * domain_size + 2 * std::abs(model.domain.open_center.z);  // m
  for (const ResolvedShape& shape : shapes) {
    const BoundingBox b = bounding_box(shape.outline);
    reach = std::max(reach, 2 * std::max({std::abs(b.r_min), b.r_max, std::abs(b.z_min), std::abs(b.z_max)}));
  }
  reach = to_model(reach, scale);
  std::vector<DimTags> shape_surfaces;
  for (const ResolvedShape& shape : shapes) shape_surfaces.push_back(add_clipped_shape(shape, scale, reach));

  std::vector<Piece> pieces = fragment_model(domain, shape_surfaces);
  paint_pieces(spec, shapes, model.domain, scale, pieces);
  check_touching(spec, shapes, pieces, scale);
  check_outer_contacts(spec, shapes, pieces, model.domain, scale);

  std::vector<Piece> kept;
  DimTags removed;
  for (const Piece& piece : pieces) {
    if (piece.in_domain && !is_electrode_piece(piece, shapes))
      kept.push_back(piece);
    else
      removed.push_back({2, piece.tag});
  }
  std::set<int> kept_curves, kept_points;
  for (const Piece& piece : kept) {
    kept_curves.insert(piece.curves.begin(), piece.curves.end());
    kept_points.insert(piece.points.begin(), piece.points.end());
  }
  std::vector<std::set<int>> electrode_curves(spec.electrodes.size());
  for (const Piece& piece : pieces) {
    if (!piece.in_domain || !is_electrode_piece(piece, shapes)) continue;
    for (int c : piece.curves)
      if (kept_curves.count(c)) electrode_curves[static_cast<size_t>(shapes[piece.owner].electrode)].insert(c);
  }
  for (const std::set<int>& curves : electrode_curves)
    model.electrode_curves.emplace_back(curves.begin(), curves.end());
  model.warnings = sharp_corner_warnings(shapes, {kept_points.begin(), kept_points.end()}, model.domain, scale);

  // Conductors are holes, and what lies outside the domain goes: only the painted pieces are meshed.
  gmsh::model::removeEntities(removed, /*recursive=*/true);

  model.max_size = spec.mesh.max_size > 0 ? spec.mesh.max_size : kMaxSizeFraction * domain_size;
  model.electrode_size = electrode_sizes(spec, shapes, model.max_size);
  model.regions = regions_of(spec, shapes, kept, model.surfaces);
  if (model.surfaces.empty())
    throw InputError(spec.domain.where, "nothing is left to mesh", "the electrodes fill the domain");
  return model;
}

}  // namespace hv
