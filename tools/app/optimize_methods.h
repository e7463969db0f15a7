// Derivative-free search methods of `hvstress optimize`, as pure functions of a callable objective:
// no case files, no meshing, so they can be tested on closed-form functions. Every method is
// deterministic (the same objective gives the same sequence of evaluations) and counts its calls.
//
// Objectives may return +infinity for a point that cannot be evaluated (an infeasible design); the
// methods then move away from it like from any poor value. They must not return NaN. A budget of
// `max_evaluations` stops the search between steps; the opening evaluations of a method (two for the
// line searches, n + 1 for the simplex) are always made.
#pragma once

#include <functional>
#include <vector>

namespace hv {

// ---- one variable: golden-section search (Kiefer, "Sequential minimax search for a maximum",
// Proc. Amer. Math. Soc. 4, 1953) ----

struct LineSearchResult {
  double x = 0.0;       // the best point evaluated
  double value = 0.0;   // objective at x
  int evaluations = 0;  // calls of the objective
  bool converged = false;  // the bracket shrank to the tolerance (else the budget ran out)
};

// Minimizes `objective` on [lo, hi] (lo < hi), assuming one minimum (unimodal). Each step keeps the
// part of the bracket that holds the lower of two interior points placed at the golden ratio, so
// one evaluation per step shrinks the bracket by 0.618. Stops when the bracket is at most
// `tolerance` wide (same units as x) or after `max_evaluations` calls. The end points are never
// evaluated: a minimum at a bound is approached to within the tolerance.
LineSearchResult golden_section_minimize(const std::function<double(double)>& objective, double lo, double hi,
                                         double tolerance, int max_evaluations);

// ---- several variables: Nelder-Mead simplex in a box (Nelder & Mead, "A simplex method for
// function minimization", Comput. J. 7, 1965) ----

struct SimplexResult {
  std::vector<double> x;  // the best point evaluated
  double value = 0.0;
  int evaluations = 0;
  bool converged = false;  // the simplex shrank to the tolerance (else the budget ran out)
};

// Minimizes `objective` over the box lo[i] <= x[i] <= hi[i] (lo[i] < hi[i], n >= 1). The initial
// simplex is deterministic: the box centre and, for each axis i, the centre moved by a quarter of the
// box along i. Steps use Nelder & Mead's coefficients (reflection 1, expansion 2, contraction 1/2,
// shrink 1/2); a trial point outside the box is clamped onto it. Stops when every vertex lies within
// `tolerance` of the best vertex in every coordinate, measured as a fraction of the box's side along
// that coordinate, or after `max_evaluations` calls.
SimplexResult nelder_mead_minimize(const std::function<double(const std::vector<double>&)>& objective,
                                   const std::vector<double>& lo, const std::vector<double>& hi, double tolerance,
                                   int max_evaluations);

// ---- a threshold: bisection ----

struct ThresholdResult {
  bool found = false;           // some point of [lo, hi] is feasible (hi is)
  double smallest_feasible = 0.0;    // the smallest feasible point evaluated (when found)
  double largest_infeasible = 0.0;   // the largest infeasible point evaluated below it (lo when none was)
  int evaluations = 0;
  bool converged = false;  // the answer is settled to the tolerance (else the budget ran out)
};

// The smallest x in [lo, hi] with `feasible(x)`, for a predicate that is false below a threshold and
// true above it (monotone). Evaluates hi first (not feasible: nothing is, found = false), then lo
// (feasible: the answer is lo), then halves the bracket [largest infeasible, smallest feasible] until
// it is at most `tolerance` wide or `max_evaluations` calls are spent. The threshold lies in the
// final bracket; the result is its feasible end, so the answer always meets the predicate.
ThresholdResult bisect_smallest_feasible(const std::function<bool(double)>& feasible, double lo, double hi,
                                         double tolerance, int max_evaluations);

}  // namespace hv
