#include "tools/app/adaptive.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <functional>
#include <queue>
#include <sstream>

namespace hv {

namespace {

// The first mesh is this much coarser than a fixed run's default (60 elements per turn of the
// smallest radius becomes 15): cheap to solve, and fine enough for the estimate to find the places
// that matter. Measured on the bundled closed-form cases (docs/methods.md).
constexpr double kStartSizeFactor = 4.0;
// Per step the predicted energy-norm error falls by this factor. An aggressive cut keeps the loop
// short, and it makes the step-to-step change an upper bound of the remaining error (see
// estimated_errors).
constexpr double kReduction = 0.2;
// Sizes change per step by at most these factors: the estimate's h^(p+1) scaling is an asymptotic
// law, not to be trusted over larger jumps (and not at all at a singular corner).
constexpr double kMaxRefine = 6.0, kMaxCoarsen = 2.0;
// Indicators of triangles touching an electrode surface where its field is at least kHotFraction of
// its highest count this much more: the quantities of interest are the surface maxima, and the
// recovered boundary flux at a node depends mostly on the triangles at it.
constexpr double kSurfaceWeight = 64.0, kHotFraction = 0.5;
// Electrodes whose maximum field is below this fraction of the design's highest converge against
// that fraction of the highest field (within_tolerance).
constexpr double kMinorFieldFraction = 0.1;
// No element below this fraction of the model's extent (10^-6 model units, far below any useful size).
constexpr double kSmallestSize = 1e-6;

double seconds_since(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

// The weight of each node's triangles in the error indicators: kSurfaceWeight times more on the
// surfaces of the case's electrodes (not the ground plane, not box sides that are not electrodes)
// where the field is at least kHotFraction of that electrode's highest, where the maxima, the
// quantities of interest, can lie; 1 elsewhere. An electrode judged against a fraction of the
// highest field (fields_within) needs its absolute field error that much smaller than the hottest
// electrode's, so its weight is raised by the same ratio. |E| from the averaged nodal field is enough.
std::vector<double> surface_node_weights(const RunResults& results, int n_electrodes) {
  const Mesh& mesh = *results.mesh;
  auto field = [&](int node) {
    const auto& E = results.node_field[static_cast<size_t>(node)];
    return std::hypot(E[0], E[1]);
  };
  std::vector<int> owner(static_cast<size_t>(mesh.n_nodes()), -1);
  std::vector<double> highest(static_cast<size_t>(n_electrodes), 0.0);
  for (const Boundary& boundary : mesh.boundaries) {
    if (boundary.kind != BoundaryKind::Electrode || boundary.conductor < 0 || boundary.conductor >= n_electrodes)
      continue;
    for (const auto& contour : boundary.contours)
      for (const BoundaryEdge& edge : contour)
        for (int node : edge.nodes) {
          if (node < 0) continue;
          owner[static_cast<size_t>(node)] = boundary.conductor;
          highest[static_cast<size_t>(boundary.conductor)] =
              std::max(highest[static_cast<size_t>(boundary.conductor)], field(node));
        }
  }
  const double hottest = highest.empty() ? 0.0 : *std::max_element(highest.begin(), highest.end());
  std::vector<double> weight(owner.size(), 1.0);
  for (size_t node = 0; node < owner.size(); ++node) {
    if (owner[node] < 0) continue;
    const double own = highest[static_cast<size_t>(owner[node])];
    if (field(static_cast<int>(node)) >= kHotFraction * own && own > 0)
      weight[node] = kSurfaceWeight * hottest / std::max(own, kMinorFieldFraction * hottest);
  }
  return weight;
}

// Area of the straight triangle a, b, c.
double straight_area(const Point& a, const Point& b, const Point& c) {
  return 0.5 * std::abs((b.r - a.r) * (c.z - a.z) - (c.r - a.r) * (b.z - a.z));
}

// Straight area of a mesh triangle from its vertices.
double vertex_area(const Mesh& mesh, int t) {
  const int* v = mesh.triangle(t);
  return straight_area(mesh.nodes[static_cast<size_t>(v[0])], mesh.nodes[static_cast<size_t>(v[1])],
                       mesh.nodes[static_cast<size_t>(v[2])]);
}

// Edge length of the equilateral triangle of the same area: the size a mesher aims at.
double equivalent_size(double area) { return std::sqrt(4 / std::sqrt(3.0) * area); }

// Lowers vertex sizes so that along every triangle edge the size grows by at most (growth - 1) times
// the edge's length: Dijkstra's shortest paths from the smallest sizes outward (Borouchaki, Hecht &
// Frey, "Mesh gradation control", Int. J. Numer. Methods Eng. 43, 1998, the h-shock correction).
void limit_gradation(const Mesh& mesh, double growth, std::vector<double>& size) {
  std::vector<std::vector<int>> neighbours(size.size());
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* v = mesh.triangle(t);
    for (int k = 0; k < 3; ++k) {
      neighbours[static_cast<size_t>(v[k])].push_back(v[(k + 1) % 3]);
      neighbours[static_cast<size_t>(v[(k + 1) % 3])].push_back(v[k]);
    }
  }
  using Item = std::pair<double, int>;
  std::priority_queue<Item, std::vector<Item>, std::greater<Item>> queue;
  for (size_t v = 0; v < size.size(); ++v)
    if (std::isfinite(size[v])) queue.emplace(size[v], static_cast<int>(v));
  while (!queue.empty()) {
    const auto [h, v] = queue.top();
    queue.pop();
    if (h > size[static_cast<size_t>(v)]) continue;
    const Point& a = mesh.nodes[static_cast<size_t>(v)];
    for (int w : neighbours[static_cast<size_t>(v)]) {
      const Point& b = mesh.nodes[static_cast<size_t>(w)];
      const double bound = h + (growth - 1) * std::hypot(a.r - b.r, a.z - b.z);
      if (bound < size[static_cast<size_t>(w)]) {
        size[static_cast<size_t>(w)] = bound;
        queue.emplace(bound, w);
      }
    }
  }
}

// Triangles a size map asks for: (4 / sqrt 3) times the integral of 1/h^2, h averaged per triangle.
double predicted_triangles(const SizeMap& map) {
  double count = 0.0;
  for (const auto& tri : map.triangles) {
    const double area = straight_area(map.vertices[static_cast<size_t>(tri[0])], map.vertices[static_cast<size_t>(tri[1])],
                                      map.vertices[static_cast<size_t>(tri[2])]);
    const double h = (map.size[static_cast<size_t>(tri[0])] + map.size[static_cast<size_t>(tri[1])] +
                      map.size[static_cast<size_t>(tri[2])]) / 3;
    count += area / (h * h);
  }
  return 4 / std::sqrt(3.0) * count;
}

// |new - old| / |new|, with "no inception" (infinite) equal to itself and 0 against 0.
double relative_change(double old_value, double new_value) {
  if (old_value == new_value) return 0.0;
  if (!std::isfinite(old_value) || !std::isfinite(new_value) || new_value == 0.0) return INFINITY;
  return std::abs(new_value - old_value) / std::abs(new_value);
}

// The field quantities of one step (the inception voltage and the step's seconds come later).
AccuracyStep record_step(const RunOutcome& outcome, const ErrorEstimate& estimate) {
  AccuracyStep step;
  step.order = outcome.meshed.mesh.order;
  step.triangles = outcome.meshed.mesh.n_triangles();
  step.dofs = outcome.results.solve_report.dofs;
  step.energy_error = estimate.relative();
  for (const ElectrodeResult& electrode : outcome.results.electrodes)
    step.max_field_V_per_m.push_back(electrode.max_field_V_per_m);
  return step;
}

// The estimated relative error of each quantity on the last mesh: its change from the mesh before.
// If each step cuts a quantity's error e by at least half (e_k <= e_(k-1) / 2, which the aggressive
// kReduction aims at), then |Q_k - Q_(k-1)| >= e_(k-1) - e_k >= e_k: the change bounds the error
// (the argument behind the step-to-step estimates of Roache, Verification and Validation in
// Computational Science and Engineering, 1998, with a safety factor instead of a fitted order).
// An extrapolation from three meshes (Aitken's delta-squared) stopped a step sooner but was not a
// bound: with the fitted surface-field recovery the changes do not fall by a steady ratio, and its
// estimate fell to 0.02 of the true error on the benchmark case at tolerance 1e-4.
void estimated_errors(Accuracy& accuracy) {
  const size_t n = accuracy.steps.size();
  const AccuracyStep& last = accuracy.steps.back();
  accuracy.energy_error = last.energy_error;
  accuracy.max_field_error.assign(last.max_field_V_per_m.size(), NAN);
  if (n < 2) return;
  const AccuracyStep& before = accuracy.steps[n - 2];
  for (size_t e = 0; e < last.max_field_V_per_m.size(); ++e)
    accuracy.max_field_error[e] = relative_change(before.max_field_V_per_m[e], last.max_field_V_per_m[e]);
  if (!std::isnan(last.inception_V) && !std::isnan(before.inception_V))  // onset on both meshes
    accuracy.inception_error = relative_change(before.inception_V, last.inception_V);
}

// The largest of the per-electrode relative `errors` of a step's maximum `fields`, as the stop rule
// judges them. An electrode whose maximum field is below kMinorFieldFraction of the design's highest
// surface field (a grounded enclosure far from the hot spot, say) cannot be where discharges start
// first; its error is measured against that fraction of the highest field rather than against its own
// small value, so a slowly settling, irrelevant number does not keep the loop refining. The reported
// estimates stay relative to each electrode's own field. NaN anywhere gives NaN.
double judged_error(const std::vector<double>& fields, const std::vector<double>& errors) {
  const double highest = fields.empty() ? 0.0 : *std::max_element(fields.begin(), fields.end());
  double largest = 0.0;
  for (size_t e = 0; e < fields.size(); ++e) {
    const double scale = std::max(fields[e], kMinorFieldFraction * highest);
    const double error = scale > 0 ? errors[e] * fields[e] / scale : errors[e];
    if (std::isnan(error)) return NAN;
    largest = std::max(largest, error);
  }
  return largest;
}

// Whether every electrode's maximum field has an estimated error below `limit` (judged_error).
bool fields_within(const Accuracy& accuracy, double limit) {
  return accuracy.steps.size() >= 2 && judged_error(accuracy.steps.back().max_field_V_per_m, accuracy.max_field_error) < limit;
}

// Whether the loop may stop: the fields within the tolerance and, when the case evaluates onset, the
// inception voltage too.
bool within_tolerance(const Accuracy& accuracy, bool with_onset) {
  return fields_within(accuracy, accuracy.tolerance) && (!with_onset || accuracy.inception_error < accuracy.tolerance);
}

// Whether this step evaluates onset. The stop rule compares the inception voltage of the last two
// meshes, so onset starts on the mesh where the fields are two steps from the tolerance (their
// estimate within tolerance / kReduction^2: each step cuts it by about kReduction), and continues on
// every later mesh, and on the last mesh the step limit allows. Earlier meshes skip it: their field
// lines would be traced through a field still far from settled, for an inception voltage no stop rule
// looks at.
bool onset_due(const Accuracy& accuracy, int step) {
  const size_t n = accuracy.steps.size();
  const bool evaluated_before = n >= 2 && !std::isnan(accuracy.steps[n - 2].inception_V);
  return evaluated_before || step >= accuracy.max_steps ||
         fields_within(accuracy, accuracy.tolerance / (kReduction * kReduction));
}

std::string percent(double fraction) {
  std::ostringstream out;
  out.precision(2);
  out << 100 * fraction << " %";
  return out.str();
}

// The plain-words warning of a loop that stopped short of its tolerance.
std::string not_converged_warning(const Accuracy& accuracy, const std::vector<ElectrodeResult>& electrodes) {
  std::string text = "the adaptive mesh refinement stopped (" + accuracy.stop_reason + ") before every result changed by "
                     "less than the tolerance of " + percent(accuracy.tolerance) + "; estimated errors:";
  for (size_t e = 0; e < electrodes.size(); ++e)
    text += " " + electrodes[e].name + " maximum field " + percent(accuracy.max_field_error[e]) + ";";
  if (!std::isnan(accuracy.inception_error)) text += " inception voltage " + percent(accuracy.inception_error) + ";";
  return text + " raise mesh.adapt.max_steps, or round sharp electrode corners (the field there has no finite maximum)";
}

}  // namespace

SizeMap refined_sizes(const Mesh& mesh, const ErrorEstimate& estimate, const std::vector<double>& node_weight,
                      double reduction, double growth) {
  const int n = mesh.n_triangles();
  const double p = mesh.order;
  std::vector<double> weighted(static_cast<size_t>(n));
  double squares = 0.0, powers = 0.0;
  for (int t = 0; t < n; ++t) {
    const int* v = mesh.triangle(t);
    const double w = estimate.element[static_cast<size_t>(t)] *
                     std::max({node_weight[static_cast<size_t>(v[0])], node_weight[static_cast<size_t>(v[1])],
                               node_weight[static_cast<size_t>(v[2])]});
    weighted[static_cast<size_t>(t)] = w;
    squares += w * w;
    powers += std::pow(w, 2 / (p + 1));
  }
  // Equidistribution (Zienkiewicz & Zhu, part 2): the error of a triangle scales as h^(p+1), and a
  // triangle of size h split into pieces of size h' makes (h / h')^2 of them. Every new triangle
  // carrying the same error e* gives the total error sqrt(sum (w_T / e*)^(2 / (p + 1)) e*^2); setting
  // it to `reduction` times today's error gives e* in closed form.
  const double target = std::pow(reduction * reduction * squares / std::max(powers, 1e-300), (p + 1) / (2 * p));
  SizeMap map;
  map.vertices = mesh.nodes;
  map.size.assign(mesh.nodes.size(), INFINITY);
  double extent = 0.0;
  for (const Point& x : mesh.nodes) extent = std::max({extent, std::abs(x.r), std::abs(x.z)});
  for (int t = 0; t < n; ++t) {
    const int* v = mesh.triangle(t);
    map.triangles.push_back({v[0], v[1], v[2]});
    const double w = weighted[static_cast<size_t>(t)];
    const double ratio = w > 0 ? std::clamp(std::pow(target / w, 1 / (p + 1)), 1 / kMaxRefine, kMaxCoarsen) : kMaxCoarsen;
    const double h = std::max(kSmallestSize * extent, equivalent_size(vertex_area(mesh, t)) * ratio);
    for (int k = 0; k < 3; ++k) map.size[static_cast<size_t>(v[k])] = std::min(map.size[static_cast<size_t>(v[k])], h);
  }
  limit_gradation(mesh, growth, map.size);
  for (double& h : map.size)
    if (!std::isfinite(h)) h = 0.0;  // mid nodes: not a vertex of any triangle of the map
  return map;
}

int adaptive_order(const MeshSpec& spec) {
  if (spec.order_given) return spec.order;
  return spec.adapt.tolerance <= kCubicFromTolerance ? 3 : 2;
}

std::unique_ptr<RunOutcome> run_adaptive(const Case& the_case, const StepSolver& solve_step,
                                         const OnsetEvaluator& evaluate_onset, const StepListener& on_step) {
  const MeshSpec& spec = the_case.geometry.mesh;
  GeometrySpec geometry = the_case.geometry;
  geometry.mesh.default_size_factor = kStartSizeFactor;
  geometry.mesh.order = adaptive_order(spec);
  Accuracy accuracy;
  accuracy.adaptive = true;
  accuracy.tolerance = spec.adapt.tolerance;
  accuracy.max_steps = spec.adapt.max_steps;
  std::unique_ptr<RunOutcome> outcome;
  SizeMap sizes;
  for (int step = 1;; ++step) {
    if (on_step) on_step("adaptive mesh " + std::to_string(step) + " of at most " + std::to_string(spec.adapt.max_steps));
    const auto start = std::chrono::steady_clock::now();
    if (on_step) on_step("meshing");
    outcome = solve_step(build_mesh(geometry, step == 1 ? nullptr : &sizes));
    const Mesh& mesh = outcome->meshed.mesh;
    const ErrorEstimate estimate = zz_error_estimate(mesh, outcome->solution.potential);
    accuracy.steps.push_back(record_step(*outcome, estimate));
    estimated_errors(accuracy);
    if (evaluate_onset && onset_due(accuracy, step)) {
      evaluate_onset(*outcome);
      accuracy.steps.back().inception_V = outcome->results.onset.inception_V;
      estimated_errors(accuracy);
    }
    accuracy.steps.back().seconds = seconds_since(start);
    if (within_tolerance(accuracy, static_cast<bool>(evaluate_onset))) {
      accuracy.converged = true;
      accuracy.stop_reason = "every result changed by less than the tolerance";
      break;
    }
    if (step >= spec.adapt.max_steps) {
      accuracy.stop_reason = "mesh.adapt.max_steps = " + std::to_string(spec.adapt.max_steps) + " meshes solved";
      break;
    }
    sizes = refined_sizes(mesh, estimate,
                          surface_node_weights(outcome->results, static_cast<int>(the_case.geometry.electrodes.size())),
                          kReduction, spec.growth);
    if (predicted_triangles(sizes) > spec.max_elements) {
      accuracy.stop_reason = "the next mesh would exceed mesh.max_elements";
      break;
    }
  }
  if (evaluate_onset && !outcome->results.onset.evaluated) evaluate_onset(*outcome);  // stopped by max_elements
  if (!accuracy.converged) outcome->results.warnings.push_back(not_converged_warning(accuracy, outcome->results.electrodes));
  outcome->results.accuracy = std::move(accuracy);
  return outcome;
}

}  // namespace hv
