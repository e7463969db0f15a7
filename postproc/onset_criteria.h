// The onset criteria as pure functions of one sampled field line and a voltage scale (private to the
// onset evaluation; physics.md, "Onset criteria").
//
// A line is the list of LinePoints of trace_field_line: arc length s from the start (m, increasing)
// and |E| at the solved voltage (V/m). Between two points 1/|E| is taken linear in s: exact for the
// 1/r field of a cylinder, close for the 1/r^2 of a sphere. At voltage scale x the field is x |E(s)|.
// Ionization coefficients come in as a function of the field magnitude, so the criteria can be
// checked against closed forms with analytic coefficients.
#pragma once

#include <functional>
#include <vector>

#include "postproc/field_lines.h"
#include "postproc/gas.h"

namespace hv::onset {

// alpha and eta (1/m) at a field magnitude (V/m). alpha and alpha - eta are expected to grow with the
// field, alpha - eta > 0 exactly above the critical field; then both criteria below are
// non-decreasing in the scale, which the root finding relies on.
using CoefficientsAt = std::function<IonizationCoefficients(double E_V_per_m)>;

enum class Criterion { Streamer, Townsend };

struct CriterionParameters {
  Criterion criterion = Criterion::Streamer;
  double K = 0.0;               // streamer: the critical integral of alpha_eff (dimensionless)
  double gamma = 0.0;           // townsend: secondary emission coefficient
  double critical_field = 0.0;  // V/m: alpha_eff = 0 there
};

// The ionization zone attached to the start: from s = 0 to where x |E| first falls to the critical
// field (interpolated, so both numbers are continuous in x), and the integral of alpha_eff over it,
// by 3-point Gauss-Legendre on each stretch between line points. Zero when x |E(0)| <= critical.
struct StreamerIntegral {
  double integral = 0.0;     // dimensionless
  double zone_length = 0.0;  // m
};
StreamerIntegral streamer_integral(const std::vector<LinePoint>& line, double scale, const CoefficientsAt& coefficients,
                                   double critical_field);

// The Townsend generation integral from the start (the cathode) over the whole line:
//   integral_0^L alpha(s) exp(integral_0^s alpha_eff(s') ds') ds
// with alpha_eff not clipped (attachment beyond the zone damps the avalanche). Gauss-Legendre
// collocation on sub-intervals over which the exponent changes by at most 0.5: relative error about
// 1e-8 where the field is resolved by the line points.
double townsend_generation_integral(const std::vector<LinePoint>& line, double scale, const CoefficientsAt& coefficients);

// The criterion's excess at scale x, zero at inception and non-decreasing in x:
//   streamer  F(x) = streamer integral - K
//   townsend  G(x) = ln(gamma * generation integral): zero where gamma * integral = 1, finite where
//             the avalanche factor overflows, and nearly linear in x, which suits Brent's steps
double criterion_excess(const std::vector<LinePoint>& line, double scale, const CoefficientsAt& coefficients,
                        const CriterionParameters& parameters);

// A root of f in [a, b] where f(a) and f(b) differ in sign (values passed in), to within
// relative_tolerance * |root|: Brent's method (bisection safeguarding secant and inverse quadratic
// interpolation steps; R. P. Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4).
double brent_root(const std::function<double(double)>& f, double a, double b, double f_a, double f_b,
                  double relative_tolerance);

// The lowest scale in [lowest, highest] at which the criterion is met: `lowest` when it already is
// there, infinity when it is not met at `highest`, else the root of the excess to 1e-6 relative.
double inception_scale(const std::vector<LinePoint>& line, const CoefficientsAt& coefficients,
                       const CriterionParameters& parameters, double lowest, double highest);

}  // namespace hv::onset
