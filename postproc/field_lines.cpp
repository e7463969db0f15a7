// Field lines: dx/ds = direction E / |E| (s the arc length, m) through the finite-element field, by the
// embedded Runge-Kutta 5(4) pair of Dormand & Prince (J. Comput. Appl. Math. 6, 1980) with the step
// control of Hairer, Norsett & Wanner (Solving Ordinary Differential Equations I, 2nd ed., sec. II.4).
//
// A step spans at most the local element. Between the ends of each step, points are stored on the
// step's continuous extension (the fourth-order dense output of the pair, Shampine, Math. Comp. 46,
// 1986, as given by Hairer, Norsett & Wanner sec. II.6), each costing one field evaluation: enough of
// them that consecutive points lie at most a quarter element apart and |E| changes by at most
// max_field_change (relative) between them, so that functions of |E| integrate accurately along the
// line by the trapezoid rule.
//
// A line ends at the first point where it would leave the gas or where |E| falls to the stop field.
// The step that gets there is completed with the field of the gas continued beyond its border, then
// the crossing is found by bisection on the step's dense output. A step that ends beyond a symmetry
// side is reflected back across it (the field there is the mirror image), and on the axis the line
// follows the axis, so lines run along both instead of leaving through them.
#include <algorithm>
#include <cmath>

#include "postproc/field_lines.h"
#include "solver/elements.h"

namespace hv {

std::string to_string(LineEnd end) {
  switch (end) {
    case LineEnd::WeakField: return "weak-field";
    case LineEnd::Conductor: return "conductor";
    case LineEnd::Dielectric: return "dielectric";
    case LineEnd::Boundary: return "boundary";
    case LineEnd::Length: return "length";
  }
  return "unknown";
}

namespace {

// The Dormand-Prince 5(4) tableau (as tabulated in Hairer, Norsett & Wanner, sec. II.5). The last
// stage is evaluated at the fifth-order result (first same as last); kError holds b - b_hat, the
// difference of the fifth- and fourth-order weights.
constexpr int kStages = 7;
constexpr double kA[kStages][kStages - 1] = {
    {},
    {1.0 / 5},
    {3.0 / 40, 9.0 / 40},
    {44.0 / 45, -56.0 / 15, 32.0 / 9},
    {19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729},
    {9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656},
    {35.0 / 384, 0.0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84},
};
constexpr double kError[kStages] = {71.0 / 57600,  0.0,          -71.0 / 16695, 71.0 / 1920,
                                    -17253.0 / 339200, 22.0 / 525, -1.0 / 40};
// The dense output's fourth-degree coefficients (Hairer, Norsett & Wanner sec. II.6, after Shampine).
constexpr double kDense[kStages] = {-12715105075.0 / 11282082432, 0.0, 87487479700.0 / 32700410799,
                                    -10690763975.0 / 1880347072, 701980252875.0 / 199316789632,
                                    -1453857185.0 / 822651844, 69997945.0 / 29380423};

// Step-size control (Hairer, Norsett & Wanner, eq. 4.13): h_new = h min(5, max(0.2, 0.9 err^(-1/5))),
// with no growth right after a rejected step.
constexpr double kSafety = 0.9, kLeastFactor = 0.2, kMostFactor = 5.0;

constexpr double kLongestStep = 1.0;           // x the local element size
constexpr double kSampleSpacing = 0.25;        // x the local element size: stored points at most this far apart
constexpr double kSmallestStep = 1e-9;         // x domain size: steps this short are accepted as they are
constexpr double kBisectionTolerance = 1e-12;  // x domain size: how closely a line's end is located
constexpr double kNudge = 1e-9;                // x domain size: how far a start on a border moves into the gas
constexpr double kAxisBand = 1e-9;             // x domain size: points this close to the axis lie on it
constexpr double kDefaultLengthFactor = 4.0;   // max_length 0 means this many domain sizes

Point along(Point x, Point d, double t) { return {x.r + t * d.r, x.z + t * d.z}; }
double length(Point v) { return std::sqrt(v.r * v.r + v.z * v.z); }
double dot(Point a, Point b) { return a.r * b.r + a.z * b.z; }

// The mirror image of p across the straight line through a and b.
Point mirror(Point p, Point a, Point b) {
  const double edge = length({b.r - a.r, b.z - a.z});
  const Point t{(b.r - a.r) / edge, (b.z - a.z) / edge};
  const Point foot = along(a, t, dot({p.r - a.r, p.z - a.z}, t));
  return {2 * foot.r - p.r, 2 * foot.z - p.z};
}

// A point of the line where the gas field is known.
struct Sample {
  Point at;
  int triangle = -1;  // the gas triangle holding `at`
  Point E;
  double s = 0.0;
};

// The field at a stage point of a step: from the gas triangle holding it, or (beyond the gas)
// continued from the triangle where the step began.
struct StageField {
  bool known = false;
  bool in_gas = false;
  int triangle = -1;
  Point E;
};

// One Dormand-Prince step from a sample.
struct Step {
  bool complete = false;  // every stage had a field
  double h = 0.0;
  Point k[kStages];       // dx/ds at the stages: k[0] at the start, k[6] at `to`
  Point to;               // the fifth-order result
  StageField at_to;       // the field there (first same as last)
  double error = 0.0;     // RMS of the fifth minus fourth order position, m
};

class LineTracer {
 public:
  LineTracer(const FieldSampler& sampler, const TraceOptions& options)
      : sampler_(sampler),
        mesh_(sampler.mesh()),
        options_(options),
        size_(sampler.domain_size()),
        max_length_(options.max_length > 0 ? options.max_length : kDefaultLengthFactor * size_) {}

  FieldLine trace(Point start) const;

 private:
  bool is_gas(int triangle) const {
    return mesh_.regions[static_cast<size_t>(mesh_.triangle_region[static_cast<size_t>(triangle)])].is_gas;
  }
  Point slope(Point at, Point E) const;
  bool sample_gas(Point p, int hint, Sample& out) const;
  bool continues(Point p, int hint, Sample& out) const;
  bool start_in_gas(Point start, Sample& out) const;
  StageField stage_field(Point y, int hint, int step_triangle) const;
  Step dormand_prince(const Sample& from, double h) const;
  Point onto_axis_band(Point p) const { return {p.r < kAxisBand * size_ ? 0.0 : p.r, p.z}; }
  void reflect_at_symmetry_side(const Sample& from, Step& step) const;
  Point dense_output(const Sample& from, const Step& step, double theta) const;
  void record_within(FieldLine& line, const Sample& from, const Step& step, double theta_to, double E_to) const;
  void finish_within_step(FieldLine& line, const Sample& from, const Step& step) const;
  void set_end(FieldLine& line, const Sample& last, Point beyond) const;

  const FieldSampler& sampler_;
  const Mesh& mesh_;
  const TraceOptions& options_;
  const double size_;
  const double max_length_;
};

void record(FieldLine& line, const Sample& sample) { line.points.push_back({sample.at, sample.s, length(sample.E)}); }

// dx/ds: the unit vector along direction x E. On the axis the field is axial by symmetry (a radial
// component there is discretization error), so a line that reaches the axis follows it. Positions
// closer to the axis than kAxisBand are put on it (a finite-element field has E_r != 0 there, which
// would push a line that starts a rounding error off the axis away from it).
Point LineTracer::slope(Point at, Point E) const {
  const double magnitude = length(E);
  if (magnitude == 0) return {0.0, 0.0};
  const Point d{options_.direction * E.r / magnitude, options_.direction * E.z / magnitude};
  if (at.r <= 0) return {0.0, d.z >= 0 ? 1.0 : -1.0};
  return d;
}

bool LineTracer::sample_gas(Point p, int hint, Sample& out) const {
  int triangle = hint;
  Point E;
  if (!sampler_.field(p, triangle, E) || !is_gas(triangle)) return false;
  out.at = p, out.triangle = triangle, out.E = E;
  return true;
}

// The line goes on through p: it lies in the gas and |E| there is above the stop field.
bool LineTracer::continues(Point p, int hint, Sample& out) const {
  return sample_gas(p, hint, out) && length(out.E) > options_.stop_field;
}

// A start on an electrode surface may, by rounding, lie in no gas triangle. It then moves kNudge x the
// domain size into the gas: to the one of eight probes around it whose direction best matches the line's.
bool LineTracer::start_in_gas(Point start, Sample& out) const {
  start = onto_axis_band(start);
  if (sample_gas(start, -1, out)) return true;
  bool found = false;
  double best = -INFINITY;
  for (int i = 0; i < 8; ++i) {
    const Point offset{std::cos(i * kPi / 4), std::sin(i * kPi / 4)};
    Sample probe;
    if (!sample_gas(along(start, offset, kNudge * size_), -1, probe)) continue;
    const double alignment = dot(offset, slope(probe.at, probe.E));
    if (alignment > best) best = alignment, out = probe, found = true;
  }
  return found;
}

StageField LineTracer::stage_field(Point y, int hint, int step_triangle) const {
  StageField f;
  f.triangle = hint;
  if (sampler_.field(y, f.triangle, f.E) && is_gas(f.triangle)) {
    f.known = f.in_gas = true;
    return f;
  }
  f.triangle = step_triangle;
  f.known = sampler_.field_continued(step_triangle, y, f.E);
  return f;
}

Step LineTracer::dormand_prince(const Sample& from, double h) const {
  Step step;
  step.h = h;
  Point* k = step.k;
  k[0] = slope(from.at, from.E);
  int hint = from.triangle;
  for (int i = 1; i < kStages; ++i) {
    Point y = from.at;
    for (int j = 0; j < i; ++j) y = along(y, k[j], h * kA[i][j]);
    y = onto_axis_band(y);  // never beyond the axis
    const StageField f = stage_field(y, hint, from.triangle);
    if (!f.known) return step;
    if (f.in_gas) hint = f.triangle;
    k[i] = slope(y, f.E);
    step.to = y, step.at_to = f;
  }
  Point difference;
  for (int i = 0; i < kStages; ++i) difference = along(difference, k[i], h * kError[i]);
  step.error = length(difference) / std::sqrt(2.0);
  step.complete = true;
  return step;
}

// A step whose end lies beyond a symmetry side (rounding, or the weakly imposed zero normal field)
// ends at its mirror image instead, which lies in the gas.
void LineTracer::reflect_at_symmetry_side(const Sample& from, Step& step) const {
  const FieldSampler::Border border = sampler_.border_crossed(from.triangle, step.to);
  if (border.boundary < 0 || mesh_.boundaries[static_cast<size_t>(border.boundary)].kind != BoundaryKind::Symmetry)
    return;
  Sample reflected;
  if (!sample_gas(mirror(step.to, border.edge_from, border.edge_to), from.triangle, reflected)) return;
  step.to = reflected.at;
  step.at_to = {true, true, reflected.triangle, reflected.E};
  step.k[kStages - 1] = slope(reflected.at, reflected.E);
}

// The step's dense output at theta in [0, 1] (theta h along the line):
//   y0 + theta (D + (1 - theta) (B + theta (D - h k7 - B + (1 - theta) h sum d_i k_i)))
// with D = y1 - y0 and B = h k1 - D (Hairer, Norsett & Wanner sec. II.6).
Point LineTracer::dense_output(const Sample& from, const Step& step, double theta) const {
  const double h = step.h;
  const Point D{step.to.r - from.at.r, step.to.z - from.at.z};
  const Point B = along({-D.r, -D.z}, step.k[0], h);
  Point quartic;
  for (int i = 0; i < kStages; ++i) quartic = along(quartic, step.k[i], h * kDense[i]);
  const Point cubic = along({D.r - B.r, D.z - B.z}, step.k[kStages - 1], -h);
  const auto at = [&](double d, double b, double c, double q) {
    return d + (1 - theta) * (b + theta * (c + (1 - theta) * q));
  };
  const Point p{from.at.r + theta * at(D.r, B.r, cubic.r, quartic.r),
                from.at.z + theta * at(D.z, B.z, cubic.z, quartic.z)};
  return onto_axis_band(p);
}

// Stores points of the step's path strictly between theta = 0 and theta_to, evenly spaced in theta:
// as many as keep them kSampleSpacing elements apart and the change of |E| between them within
// max_field_change (judged from |E| at both ends, E_to at theta_to).
void LineTracer::record_within(FieldLine& line, const Sample& from, const Step& step, double theta_to,
                               double E_to) const {
  const double E_from = length(from.E);
  const double by_spacing = theta_to * step.h / (kSampleSpacing * sampler_.element_size(from.triangle));
  const double by_change = std::abs(E_to - E_from) / (options_.max_field_change * E_from);
  const int pieces = static_cast<int>(std::ceil(std::max(by_spacing, by_change) - 1e-9));
  int hint = from.triangle;
  for (int i = 1; i < pieces; ++i) {
    const double theta = theta_to * i / pieces;
    Sample point;
    if (!sample_gas(dense_output(from, step, theta), hint, point)) continue;  // the path grazes a border
    hint = point.triangle;
    point.s = from.s + theta * step.h;
    record(line, point);
  }
}

// The step ends beyond the gas or at |E| <= stop field: bisect its path for the last point that
// continues, record the points up to it, and end the line there.
void LineTracer::finish_within_step(FieldLine& line, const Sample& from, const Step& step) const {
  double inside = 0.0, beyond = 1.0;
  Sample last = from;
  while ((beyond - inside) * step.h > kBisectionTolerance * size_) {
    const double middle = (inside + beyond) / 2;
    Sample probe;
    if (continues(dense_output(from, step, middle), last.triangle, probe)) {
      inside = middle;
      last = probe;
      last.s = from.s + middle * step.h;
    } else {
      beyond = middle;
    }
  }
  if (inside > 0) {
    record_within(line, from, step, inside, length(last.E));
    record(line, last);
  }
  set_end(line, last, dense_output(from, step, beyond));
}

// Why the line ends at `last`, from what lies just past it.
void LineTracer::set_end(FieldLine& line, const Sample& last, Point beyond) const {
  Sample past;
  if (sample_gas(beyond, last.triangle, past)) {
    line.end = LineEnd::WeakField;
    return;
  }
  const FieldSampler::Border border = sampler_.border_crossed(last.triangle, beyond);
  line.end = LineEnd::Boundary;
  if (border.region >= 0) {
    line.end = LineEnd::Dielectric;
    line.ended_on = mesh_.regions[static_cast<size_t>(border.region)].name;
  } else if (border.boundary >= 0) {
    const Boundary& b = mesh_.boundaries[static_cast<size_t>(border.boundary)];
    if (b.kind == BoundaryKind::Electrode || b.kind == BoundaryKind::GroundPlane) line.end = LineEnd::Conductor;
    line.ended_on = b.name;
  }
}

FieldLine LineTracer::trace(Point start) const {
  FieldLine line;
  Sample here;
  if (!start_in_gas(start, here)) {
    line.points.push_back({start, 0.0, 0.0});
    line.end = LineEnd::Boundary;
    return line;
  }
  record(line, here);
  if (length(here.E) <= options_.stop_field) {
    line.end = LineEnd::WeakField;
    return line;
  }
  const double smallest = kSmallestStep * size_;
  const double scale = options_.tolerance * size_;  // error allowed per step, m
  double h = kLongestStep * sampler_.element_size(here.triangle);
  bool just_rejected = false;
  for (;;) {
    const double remaining = max_length_ - here.s;
    if (remaining <= kBisectionTolerance * size_) {
      line.end = LineEnd::Length;
      return line;
    }
    h = std::min({h, kLongestStep * sampler_.element_size(here.triangle), remaining});
    const bool forced = h <= smallest;  // too short to shorten further: taken whatever its error
    Step step = dormand_prince(here, h);
    if (!step.complete) {
      if (!forced) {
        h = std::max(h * kLeastFactor, smallest);
        continue;
      }
      set_end(line, here, along(here.at, step.k[0], h));
      return line;
    }
    const double error_ratio = step.error / scale;
    const double factor =
        std::clamp(kSafety * std::pow(error_ratio, -0.2), kLeastFactor, just_rejected ? 1.0 : kMostFactor);
    if (!forced && error_ratio > 1) {
      h = std::max(h * factor, smallest);
      just_rejected = true;
      continue;
    }
    if (!step.at_to.in_gas) reflect_at_symmetry_side(here, step);
    if (!step.at_to.in_gas || length(step.at_to.E) <= options_.stop_field) {
      finish_within_step(line, here, step);
      return line;
    }
    if (dot(step.k[0], step.k[kStages - 1]) < 0) {  // the field reversed within the step: a null
      line.end = LineEnd::WeakField;
      return line;
    }
    record_within(line, here, step, 1.0, length(step.at_to.E));
    here = {step.to, step.at_to.triangle, step.at_to.E, here.s + h};
    record(line, here);
    h *= factor;
    just_rejected = false;
  }
}

}  // namespace

FieldLine trace_field_line(const FieldSampler& sampler, Point start, const TraceOptions& options) {
  return LineTracer(sampler, options).trace(start);
}

}  // namespace hv
