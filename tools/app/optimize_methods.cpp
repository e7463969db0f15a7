#include "tools/app/optimize_methods.h"

#include <algorithm>
#include <cassert>
#include <cmath>

namespace hv {

// ---- golden-section search ----

namespace {

// 1/phi = (sqrt(5) - 1) / 2: the interior points sit at this fraction of the bracket from either end,
// so after dropping one end the surviving interior point is again at the golden fraction of the new
// bracket and only one new evaluation is needed per step (Kiefer 1953).
const double kInverseGolden = (std::sqrt(5.0) - 1.0) / 2.0;

}  // namespace

LineSearchResult golden_section_minimize(const std::function<double(double)>& objective, double lo, double hi,
                                         double tolerance, int max_evaluations) {
  assert(lo < hi && tolerance > 0 && "golden_section_minimize: bad arguments");
  LineSearchResult best;
  best.value = INFINITY;
  const auto evaluate = [&](double x) {
    const double value = objective(x);
    ++best.evaluations;
    if (value < best.value || best.evaluations == 1) {
      best.x = x;
      best.value = value;
    }
    return value;
  };
  double a = lo, b = hi;
  double left = b - kInverseGolden * (b - a), right = a + kInverseGolden * (b - a);
  double f_left = evaluate(left), f_right = evaluate(right);
  while (b - a > tolerance && best.evaluations < max_evaluations) {
    if (f_left <= f_right) {  // the minimum lies in [a, right]; ties keep the lower side, deterministically
      b = right;
      right = left, f_right = f_left;
      left = b - kInverseGolden * (b - a);
      f_left = evaluate(left);
    } else {  // the minimum lies in [left, b]
      a = left;
      left = right, f_left = f_right;
      right = a + kInverseGolden * (b - a);
      f_right = evaluate(right);
    }
  }
  best.converged = b - a <= tolerance;
  return best;
}

// ---- Nelder-Mead simplex ----

namespace {

using PointN = std::vector<double>;

struct Vertex {
  PointN x;
  double value = 0.0;
};

// Nelder & Mead (1965), section 2: reflection alpha = 1, expansion gamma = 2, contraction beta = 1/2;
// a failed contraction shrinks every vertex halfway towards the best one.
constexpr double kReflection = 1.0;
constexpr double kExpansion = 2.0;
constexpr double kContraction = 0.5;
constexpr double kShrink = 0.5;
constexpr double kInitialStep = 0.25;  // fraction of the box side: the initial simplex spans a quarter box

class BoxSimplex {
 public:
  BoxSimplex(const std::function<double(const PointN&)>& objective, PointN lo, PointN hi)
      : objective_(objective), lo_(std::move(lo)), hi_(std::move(hi)) {}

  int evaluations() const { return evaluations_; }

  Vertex evaluate(PointN x) {
    for (size_t i = 0; i < x.size(); ++i) x[i] = std::clamp(x[i], lo_[i], hi_[i]);
    ++evaluations_;
    const double value = objective_(x);
    return {std::move(x), value};
  }

  // centroid + coefficient * (centroid - worst), clamped into the box by evaluate().
  Vertex step_from(const PointN& centroid, const PointN& worst, double coefficient) {
    PointN x(centroid.size());
    for (size_t i = 0; i < x.size(); ++i) x[i] = centroid[i] + coefficient * (centroid[i] - worst[i]);
    return evaluate(std::move(x));
  }

  // The largest distance of a vertex from the best one, per coordinate, as a fraction of the box side.
  double size(const std::vector<Vertex>& simplex) const {
    double largest = 0.0;
    for (const Vertex& vertex : simplex) {
      for (size_t i = 0; i < vertex.x.size(); ++i)
        largest = std::max(largest, std::abs(vertex.x[i] - simplex.front().x[i]) / (hi_[i] - lo_[i]));
    }
    return largest;
  }

  std::vector<Vertex> initial_simplex() {
    PointN centre(lo_.size());
    for (size_t i = 0; i < centre.size(); ++i) centre[i] = 0.5 * (lo_[i] + hi_[i]);
    std::vector<Vertex> simplex{evaluate(centre)};
    for (size_t i = 0; i < centre.size(); ++i) {
      PointN moved = centre;
      moved[i] += kInitialStep * (hi_[i] - lo_[i]);
      simplex.push_back(evaluate(moved));
    }
    return simplex;
  }

 private:
  const std::function<double(const PointN&)>& objective_;
  PointN lo_, hi_;
  int evaluations_ = 0;
};

// Best first; a stable sort keeps equal values in their earlier order, so runs are repeatable.
void sort_by_value(std::vector<Vertex>& simplex) {
  std::stable_sort(simplex.begin(), simplex.end(),
                   [](const Vertex& a, const Vertex& b) { return a.value < b.value; });
}

// The centroid of every vertex but the worst (the last after sorting).
PointN centroid_without_worst(const std::vector<Vertex>& simplex) {
  PointN centroid(simplex.front().x.size(), 0.0);
  const size_t kept = simplex.size() - 1;
  for (size_t v = 0; v < kept; ++v) {
    for (size_t i = 0; i < centroid.size(); ++i) centroid[i] += simplex[v].x[i] / static_cast<double>(kept);
  }
  return centroid;
}

}  // namespace

SimplexResult nelder_mead_minimize(const std::function<double(const std::vector<double>&)>& objective,
                                   const std::vector<double>& lo, const std::vector<double>& hi, double tolerance,
                                   int max_evaluations) {
  assert(!lo.empty() && lo.size() == hi.size() && tolerance > 0 && "nelder_mead_minimize: bad arguments");
  BoxSimplex box(objective, lo, hi);
  std::vector<Vertex> simplex = box.initial_simplex();
  sort_by_value(simplex);
  while (box.size(simplex) > tolerance && box.evaluations() < max_evaluations) {
    Vertex& worst = simplex.back();
    const double second_worst = simplex[simplex.size() - 2].value;
    const PointN centroid = centroid_without_worst(simplex);
    Vertex reflected = box.step_from(centroid, worst.x, kReflection);
    if (reflected.value < simplex.front().value) {
      Vertex expanded = box.step_from(centroid, worst.x, kExpansion);
      worst = expanded.value < reflected.value ? std::move(expanded) : std::move(reflected);
    } else if (reflected.value < second_worst) {
      worst = std::move(reflected);
    } else {
      // Contract towards the better of the worst and its reflection: Nelder & Mead contract from the
      // better of the two; accepting by comparison with it is the outside/inside form of Lagarias,
      // Reeds, Wright & Wright (SIAM J. Optim. 9, 1998).
      const bool outside = reflected.value < worst.value;
      Vertex contracted = box.step_from(centroid, worst.x, outside ? kContraction : -kContraction);
      if (contracted.value < std::min(worst.value, reflected.value)) {
        worst = std::move(contracted);
      } else {
        for (size_t v = 1; v < simplex.size(); ++v) {
          PointN x = simplex[v].x;
          for (size_t i = 0; i < x.size(); ++i) x[i] = simplex.front().x[i] + kShrink * (x[i] - simplex.front().x[i]);
          simplex[v] = box.evaluate(std::move(x));
        }
      }
    }
    sort_by_value(simplex);
  }
  return {simplex.front().x, simplex.front().value, box.evaluations(), box.size(simplex) <= tolerance};
}

// ---- bisection for a threshold ----

ThresholdResult bisect_smallest_feasible(const std::function<bool(double)>& feasible, double lo, double hi,
                                         double tolerance, int max_evaluations) {
  assert(lo < hi && tolerance > 0 && "bisect_smallest_feasible: bad arguments");
  ThresholdResult result;
  result.evaluations = 1;
  if (!feasible(hi)) {
    result.converged = true;
    return result;
  }
  result.found = true;
  result.smallest_feasible = hi;
  result.largest_infeasible = lo;
  ++result.evaluations;
  if (feasible(lo)) {
    result.smallest_feasible = lo;
    result.converged = true;
    return result;
  }
  while (result.smallest_feasible - result.largest_infeasible > tolerance && result.evaluations < max_evaluations) {
    const double middle = 0.5 * (result.largest_infeasible + result.smallest_feasible);
    ++result.evaluations;
    (feasible(middle) ? result.smallest_feasible : result.largest_infeasible) = middle;
  }
  result.converged = result.smallest_feasible - result.largest_infeasible <= tolerance;
  return result;
}

}  // namespace hv
