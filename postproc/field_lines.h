// Field lines through the finite-element field: point location by walking through neighbouring
// triangles (Devillers, Pion & Teillaud, Int. J. Found. Comput. Sci. 13, 2002), the P2 field at any
// point (inverse isoparametric map), and integration of dx/ds = E/|E| by the embedded Runge-Kutta
// 5(4) pair of Dormand & Prince (J. Comput. Appl. Math. 6, 1980) with step control.
#pragma once

#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "mesh/mesh.h"

namespace hv {

// The field of a solved potential anywhere in the mesh. Thread-safe for concurrent queries.
class FieldSampler {
 public:
  FieldSampler(const Mesh& mesh, const Eigen::VectorXd& potential);
  // The sampler keeps references to both: temporaries would dangle.
  FieldSampler(const Mesh&& mesh, const Eigen::VectorXd& potential) = delete;
  FieldSampler(const Mesh& mesh, const Eigen::VectorXd&& potential) = delete;
  ~FieldSampler();
  FieldSampler(const FieldSampler&) = delete;
  FieldSampler& operator=(const FieldSampler&) = delete;

  // The triangle holding p and its reference coordinates, walking from `hint` (-1: any start). False
  // when p lies outside the meshed regions (in a conductor, beyond the outer boundary, at r < 0).
  bool locate(Point p, int hint, int& triangle, double& xi, double& eta) const;
  // E (V/m, components r and z) at p; `triangle` is the hint in and the containing triangle out.
  bool field(Point p, int& triangle, Point& E) const;

  // E (V/m) of `triangle`'s polynomial continued to p, which may lie a little outside the triangle
  // (up to about its own size): lets a step that ends beyond the gas be completed before its crossing
  // is found. False when the inverse isoparametric map does not converge at p.
  bool field_continued(int triangle, Point p, Point& E) const;

  // What a path crosses where it leaves gas triangle `triangle` for the nearby point `outside`: the
  // region (index into mesh().regions) when `outside` lies in a solid dielectric, or else the boundary
  // (index into mesh().boundaries) whose edge it crosses out of the mesh, with that edge's end
  // vertices; -1 when neither applies.
  struct Border {
    int region = -1;
    int boundary = -1;
    Point edge_from, edge_to;
  };
  Border border_crossed(int triangle, Point outside) const;

  // The shortest (straight) edge of the triangle, m: the scale on which the element's field varies.
  double element_size(int triangle) const;
  // The diagonal of the mesh's bounding box, m.
  double domain_size() const;

  const Mesh& mesh() const;

 private:
  struct Index;
  const Mesh& mesh_;
  const Eigen::VectorXd& potential_;
  std::unique_ptr<const Index> index_;
};

// Why a field line ended.
enum class LineEnd {
  WeakField,    // the field fell below the stop field (the gas no longer ionizes at any voltage considered)
  Conductor,    // it reached a conductor (electrode or ground plane)
  Dielectric,   // it reached the surface of a solid dielectric (leaves the gas)
  Boundary,     // it left the domain (open boundary, box side)
  Length,       // it reached the maximum length
};
std::string to_string(LineEnd end);

// One point of a traced line.
struct LinePoint {
  Point at;
  double s = 0.0;  // arc length from the start, m
  double E = 0.0;  // |E| at the solved potential, V/m
};

struct FieldLine {
  std::vector<LinePoint> points;  // from the start outward; the first is the start point
  LineEnd end = LineEnd::Length;
  std::string ended_on;           // the conductor or region reached, when that is why it ended
};

struct TraceOptions {
  double direction = 1.0;        // +1: along E, -1: against E
  double stop_field = 0.0;       // V/m at the solved potential: end where |E| falls below it
  double max_length = 0.0;       // m; 0 = the domain's size
  double tolerance = 1e-7;       // allowed position error per step, as a fraction of the domain's size
  double max_field_change = 0.003;  // largest relative change of |E| between consecutive points: with
                                    // it the trapezoid rule on the points integrates exp(-c / |E|)
                                    // to about (c / |E| x max_field_change)^2 / 12, relative
};

// Traces the field line from `start` (a point of the gas on or just off an electrode surface) in the
// direction of `options.direction * E`, recording points at every accepted step (dense enough to
// integrate alpha_eff along it: steps are also limited to a fraction of the local element size).
// As built: steps span at most one element, and points are also recorded between their ends on the
// step's dense output, at most a quarter element apart and with |E| changing by at most
// options.max_field_change between neighbours. Lines follow the axis and symmetry sides.
// The line stops at the first gas-region boundary it meets (conductor, dielectric, domain) at the
// crossing point, or where |E| < stop_field, or at max_length.
FieldLine trace_field_line(const FieldSampler& sampler, Point start, const TraceOptions& options);

}  // namespace hv
