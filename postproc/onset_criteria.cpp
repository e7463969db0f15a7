#include "postproc/onset_criteria.h"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>

namespace hv::onset {
namespace {

// 3-point Gauss-Legendre rule on [0, 1]: exact for polynomials of degree 5.
constexpr double kRoot15 = 3.872983346207417;  // sqrt(15)
constexpr std::array<double, 3> kGaussNodes = {0.5 - kRoot15 / 10, 0.5, 0.5 + kRoot15 / 10};
constexpr std::array<double, 3> kGaussWeights = {5.0 / 18.0, 8.0 / 18.0, 5.0 / 18.0};
// The integrals over [0, node i] of the Lagrange polynomials on those nodes: the Butcher matrix of the
// 3-stage Gauss collocation method (Butcher, Math. Comp. 18, 1964), here a quadrature to each node.
constexpr std::array<std::array<double, 3>, 3> kGaussToNode = {{
    {5.0 / 36, 2.0 / 9 - kRoot15 / 15, 5.0 / 36 - kRoot15 / 30},
    {5.0 / 36 + kRoot15 / 24, 2.0 / 9, 5.0 / 36 - kRoot15 / 24},
    {5.0 / 36 + kRoot15 / 30, 2.0 / 9 + kRoot15 / 15, 5.0 / 36},
}};

// The Townsend integrand grows like exp(integral of alpha_eff): sub-intervals are cut so that this
// exponent changes by at most this much in each, where 3-point Gauss integrates exp to 1e-8.
constexpr double kLargestExponentStep = 0.5;

// |E| at fraction t of a stretch from E_from to E_to: 1/|E| linear in s. Near a curved electrode |E|
// falls like 1/r (cylinder) to 1/r^2 (sphere); this is exact for the first and three times closer
// than linear |E| for the second, and exact for a uniform field.
double field_between(double E_from, double E_to, double t) {
  const double denominator = (1 - t) * E_to + t * E_from;
  return denominator > 0.0 ? E_from * E_to / denominator : 0.0;
}

// Where on a stretch (fraction of its length) the field above falls to `level`, for E_from > level >= E_to.
double fraction_at_field(double E_from, double E_to, double level) {
  return E_to * (E_from - level) / (level * (E_from - E_to));
}

// Integral over [0, length] of max(alpha_eff, 0) with the field from E_from to E_to (V/m).
double integrate_positive_alpha_eff(const CoefficientsAt& coefficients, double E_from, double E_to, double length) {
  double sum = 0.0;
  for (size_t k = 0; k < kGaussNodes.size(); ++k)
    sum += kGaussWeights[k] * std::max(coefficients(field_between(E_from, E_to, kGaussNodes[k])).effective(), 0.0);
  return sum * length;
}

// ln(exp(a) + exp(b)) without overflow; -inf stands for ln 0.
double log_add(double a, double b) {
  if (a < b) std::swap(a, b);
  if (b == -std::numeric_limits<double>::infinity()) return a;
  return a + std::log1p(std::exp(b - a));
}

// ln of the Townsend generation integral. The avalanche factor exp(integral alpha_eff) reaches
// e^1000 at scales the bracket may probe, so the sum is kept as a logarithm. On each sub-interval the
// exponent at the Gauss nodes comes from the same three coefficient values (collocation), so the
// nested integral costs no extra evaluations.
double log_townsend_generation_integral(const std::vector<LinePoint>& line, double scale,
                                        const CoefficientsAt& coefficients) {
  double log_integral = -std::numeric_limits<double>::infinity();
  double exponent = 0.0;  // integral of alpha_eff from the start, dimensionless
  for (size_t k = 0; k + 1 < line.size(); ++k) {
    const double E_from = scale * line[k].E, E_to = scale * line[k + 1].E;
    const double length = line[k + 1].s - line[k].s;
    // |alpha_eff| is largest at one end of the stretch, since |E| is monotone along it.
    const double steepest = std::max(std::abs(coefficients(E_from).effective()), std::abs(coefficients(E_to).effective()));
    const int pieces = static_cast<int>(std::clamp(std::ceil(steepest * length / kLargestExponentStep), 1.0, 1e4));
    const double h = length / pieces;
    for (int j = 0; j < pieces; ++j) {
      std::array<IonizationCoefficients, 3> c;
      for (size_t i = 0; i < 3; ++i) c[i] = coefficients(field_between(E_from, E_to, (j + kGaussNodes[i]) / pieces));
      for (size_t i = 0; i < 3; ++i) {
        if (!(c[i].alpha > 0.0)) continue;
        double node_exponent = exponent;
        for (size_t m = 0; m < 3; ++m) node_exponent += h * kGaussToNode[i][m] * c[m].effective();
        log_integral = log_add(log_integral, std::log(kGaussWeights[i] * h * c[i].alpha) + node_exponent);
      }
      for (size_t i = 0; i < 3; ++i) exponent += h * kGaussWeights[i] * c[i].effective();
    }
  }
  return log_integral;
}

}  // namespace

StreamerIntegral streamer_integral(const std::vector<LinePoint>& line, double scale, const CoefficientsAt& coefficients,
                                   double critical_field) {
  StreamerIntegral out;
  if (line.empty() || scale * line.front().E <= critical_field) return out;
  for (size_t k = 0; k + 1 < line.size(); ++k) {
    const double E_from = scale * line[k].E, E_to = scale * line[k + 1].E;  // E_from > critical here
    const double length = line[k + 1].s - line[k].s;
    if (E_to > critical_field) {
      out.integral += integrate_positive_alpha_eff(coefficients, E_from, E_to, length);
      out.zone_length += length;
      continue;
    }
    // The zone ends inside this stretch, where the interpolated field falls to the critical field.
    const double fraction = fraction_at_field(E_from, E_to, critical_field);
    out.integral += integrate_positive_alpha_eff(coefficients, E_from, critical_field, fraction * length);
    out.zone_length += fraction * length;
    break;
  }
  return out;
}

double townsend_generation_integral(const std::vector<LinePoint>& line, double scale, const CoefficientsAt& coefficients) {
  return std::exp(log_townsend_generation_integral(line, scale, coefficients));
}

double criterion_excess(const std::vector<LinePoint>& line, double scale, const CoefficientsAt& coefficients,
                        const CriterionParameters& parameters) {
  if (parameters.criterion == Criterion::Streamer)
    return streamer_integral(line, scale, coefficients, parameters.critical_field).integral - parameters.K;
  return std::log(parameters.gamma) + log_townsend_generation_integral(line, scale, coefficients);
}

double brent_root(const std::function<double(double)>& f, double a, double b, double f_a, double f_b,
                  double relative_tolerance) {
  assert(!(f_a > 0 && f_b > 0) && !(f_a < 0 && f_b < 0) && "brent_root needs a bracket");
  if (f_a == 0.0) return a;
  if (f_b == 0.0) return b;
  // b is the best estimate, c the other end of the bracket [b, c], a the previous b.
  double c = a, f_c = f_a;
  double step = b - a, previous_step = step;
  for (int iteration = 0; iteration < 200; ++iteration) {
    if ((f_b > 0) == (f_c > 0)) {  // the root lies between a and b: make a the bracket's other end
      c = a, f_c = f_a;
      step = previous_step = b - a;
    }
    if (std::abs(f_c) < std::abs(f_b)) {  // keep the smaller residual in b
      a = b, b = c, c = a;
      f_a = f_b, f_b = f_c, f_c = f_a;
    }
    const double tolerance = 0.5 * relative_tolerance * std::abs(b) + 2 * std::numeric_limits<double>::min();
    const double half_bracket = 0.5 * (c - b);
    if (std::abs(half_bracket) <= tolerance || f_b == 0.0) return b;
    if (std::abs(previous_step) >= tolerance && std::abs(f_a) > std::abs(f_b)) {
      // Interpolate: secant through (a, b) or inverse quadratic through (a, b, c).
      const double s = f_b / f_a;
      double p, q;
      if (a == c) {
        p = 2 * half_bracket * s;
        q = 1 - s;
      } else {
        const double q0 = f_a / f_c, r = f_b / f_c;
        p = s * (2 * half_bracket * q0 * (q0 - r) - (b - a) * (r - 1));
        q = (q0 - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      p = std::abs(p);
      // Accept the interpolation only if it stays well inside the bracket and shrinks fast enough.
      if (2 * p < std::min(3 * half_bracket * q - std::abs(tolerance * q), std::abs(previous_step * q))) {
        previous_step = step;
        step = p / q;
      } else {
        step = previous_step = half_bracket;
      }
    } else {
      step = previous_step = half_bracket;  // bisection
    }
    a = b, f_a = f_b;
    b += std::abs(step) > tolerance ? step : (half_bracket > 0 ? tolerance : -tolerance);
    f_b = f(b);
  }
  return b;
}

double inception_scale(const std::vector<LinePoint>& line, const CoefficientsAt& coefficients,
                       const CriterionParameters& parameters, double lowest, double highest) {
  const auto excess = [&](double x) { return criterion_excess(line, x, coefficients, parameters); };
  const double at_lowest = excess(lowest);
  if (at_lowest >= 0.0) return lowest;
  const double at_highest = excess(highest);
  if (!(at_highest >= 0.0)) return std::numeric_limits<double>::infinity();
  return brent_root(excess, lowest, highest, at_lowest, at_highest, 1e-6);
}

}  // namespace hv::onset
