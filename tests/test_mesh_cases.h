// Small designs and exact measures of meshes for the mesher's tests (tests/test_mesh_*.cpp).
#pragma once

#include <cmath>
#include <string>
#include <vector>

#include "mesh/geometry.h"
#include "mesh/mesh.h"

namespace hv::test {

constexpr double kPi = 3.14159265358979323846;

inline ShapeSpec electrode_shape(const std::string& name, decltype(ShapeSpec::outline) outline,
                                 const std::string& electrode) {
  ShapeSpec shape;
  shape.name = name;
  shape.outline = std::move(outline);
  shape.electrode = electrode;
  shape.where = {"case.yaml", 10, 3, "shapes." + name};
  return shape;
}

inline ShapeSpec dielectric_shape(const std::string& name, decltype(ShapeSpec::outline) outline,
                                  const std::string& material) {
  ShapeSpec shape = electrode_shape(name, std::move(outline), "");
  shape.material = material;
  return shape;
}

inline ElectrodeSpec fixed_electrode(const std::string& name, double volts) {
  ElectrodeSpec electrode;
  electrode.name = name;
  electrode.potential_V = volts;
  return electrode;
}

// A sphere of radius R centred on the axis at z = 0, in the box [0, 5R] x [-5R, 5R] (symmetry sides).
inline GeometrySpec sphere_in_box(double R) {
  GeometrySpec spec;
  spec.electrodes = {fixed_electrode("hv", 1.0)};
  spec.shapes = {electrode_shape("ball", CircleShape{{0.0, 0.0}, R}, "hv")};
  spec.domain.outer = DomainSpec::Outer::Box;
  spec.domain.r_max = 5 * R;
  spec.domain.z_min = -5 * R;
  spec.domain.z_max = 5 * R;
  return spec;
}

// Multiplies every length of a design by `factor`.
inline GeometrySpec scaled(GeometrySpec spec, double factor) {
  auto scale_point = [&](Point& p) { p.r *= factor, p.z *= factor; };
  for (ShapeSpec& shape : spec.shapes) {
    if (auto* rect = std::get_if<RectShape>(&shape.outline)) {
      rect->r0 *= factor, rect->r1 *= factor, rect->z0 *= factor, rect->z1 *= factor, rect->round *= factor;
    } else if (auto* circle = std::get_if<CircleShape>(&shape.outline)) {
      scale_point(circle->center), circle->radius *= factor;
    } else if (auto* polygon = std::get_if<PolygonShape>(&shape.outline)) {
      for (Point& p : polygon->points) scale_point(p);
      polygon->round *= factor;
    } else if (auto* path = std::get_if<PathShape>(&shape.outline)) {
      scale_point(path->start);
      for (PathSegment& s : path->segments) scale_point(s.to), s.radius *= factor;
    }
  }
  spec.ground_plane.z *= factor;
  spec.domain.radius *= factor, spec.domain.r_max *= factor, spec.domain.z_min *= factor, spec.domain.z_max *= factor;
  spec.mesh.surface_size *= factor, spec.mesh.max_size *= factor;
  return spec;
}

// Jacobian determinant of a mesh triangle's P1/P2 map at (xi, eta) (Zienkiewicz & Taylor, The Finite
// Element Method vol. 1: isoparametric triangles; node order: vertices, then mid nodes 01, 12, 20).
inline double jacobian(const Mesh& mesh, int t, double xi, double eta) {
  const int* v = mesh.triangle(t);
  const double l0 = 1 - xi - eta;
  const double p1_xi[3] = {-1, 1, 0}, p1_eta[3] = {-1, 0, 1};
  const double p2_xi[6] = {1 - 4 * l0, 4 * xi - 1, 0, 4 * (l0 - xi), 4 * eta, -4 * eta};
  const double p2_eta[6] = {1 - 4 * l0, 0, 4 * eta - 1, -4 * xi, 4 * xi, 4 * (l0 - eta)};
  const double* d_xi = mesh.order == 1 ? p1_xi : p2_xi;
  const double* d_eta = mesh.order == 1 ? p1_eta : p2_eta;
  double r_xi = 0, r_eta = 0, z_xi = 0, z_eta = 0;
  for (int i = 0; i < mesh.nodes_per_triangle(); ++i) {
    const Point& x = mesh.nodes[static_cast<size_t>(v[i])];
    r_xi += d_xi[i] * x.r, z_xi += d_xi[i] * x.z, r_eta += d_eta[i] * x.r, z_eta += d_eta[i] * x.z;
  }
  return r_xi * z_eta - r_eta * z_xi;
}

// Area of one triangle: the integral of det J over the reference triangle. det J of a P2 map is a
// quadratic, which the edge-midpoint rule (weights 1/6) integrates exactly (Strang & Fix, An
// Analysis of the Finite Element Method, 1973, table 4.1).
inline double triangle_area(const Mesh& mesh, int t) {
  return (jacobian(mesh, t, 0.5, 0) + jacobian(mesh, t, 0.5, 0.5) + jacobian(mesh, t, 0, 0.5)) / 6;
}

inline double mesh_area(const Mesh& mesh, int region = -1) {
  double area = 0;
  for (int t = 0; t < mesh.n_triangles(); ++t)
    if (region < 0 || mesh.triangle_region[static_cast<size_t>(t)] == region) area += triangle_area(mesh, t);
  return area;
}

// Length of a P2 (or P1) boundary edge by 5-point Gauss-Legendre quadrature of |dx/dt| on [0, 1]
// (abscissae and weights from Abramowitz & Stegun, table 25.4).
inline double edge_length(const Mesh& mesh, const BoundaryEdge& edge) {
  const double x[5] = {0.0, -0.5384693101056831, 0.5384693101056831, -0.9061798459386640, 0.9061798459386640};
  const double w[5] = {0.5688888888888889, 0.4786286704993665, 0.4786286704993665, 0.2369268850561891,
                       0.2369268850561891};
  const Point a = mesh.nodes[static_cast<size_t>(edge.nodes[0])], b = mesh.nodes[static_cast<size_t>(edge.nodes[1])];
  const Point m =
      edge.nodes[2] >= 0 ? mesh.nodes[static_cast<size_t>(edge.nodes[2])] : Point{0.5 * (a.r + b.r), 0.5 * (a.z + b.z)};
  double length = 0;
  for (int k = 0; k < 5; ++k) {
    const double t = 0.5 * (x[k] + 1);
    // x(t) = a (1-t)(1-2t) + b t(2t-1) + m 4t(1-t)
    const double da = 4 * t - 3, db = 4 * t - 1, dm = 4 - 8 * t;
    length += 0.5 * w[k] * std::hypot(da * a.r + db * b.r + dm * m.r, da * a.z + db * b.z + dm * m.z);
  }
  return length;
}

inline const Boundary* find_boundary(const Mesh& mesh, BoundaryKind kind, const std::string& name) {
  for (const Boundary& b : mesh.boundaries)
    if (b.kind == kind && b.name == name) return &b;
  return nullptr;
}

inline int edge_count(const Boundary& boundary) {
  int n = 0;
  for (const auto& contour : boundary.contours) n += static_cast<int>(contour.size());
  return n;
}

}  // namespace hv::test
