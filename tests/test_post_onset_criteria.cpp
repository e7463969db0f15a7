// The onset criteria on synthetic field lines with analytic ionization coefficients: closed forms for
// a uniform gap, a fine independent quadrature for a 1/r field, the Townsend self-sustainment limit
// of physics.md, and Brent's root finding.
#include <cmath>
#include <vector>

#include <gtest/gtest.h>

#include "postproc/onset_criteria.h"

namespace hv::onset {
namespace {

// Townsend's form alpha = A exp(-B / E) with a constant attachment eta (Townsend, 1910s; any gas
// discharge text, e.g. Raizer, Gas Discharge Physics, 1991, ch. 4). Values of the order of air's.
constexpr double kA = 2e6, kB = 2e7, kEta = 1000.0;  // 1/m, V/m, 1/m
IonizationCoefficients townsend_form(double E) { return {E > 0 ? kA * std::exp(-kB / E) : 0.0, kEta}; }
const double kCritical = kB / std::log(kA / kEta);  // alpha = eta

std::vector<LinePoint> sampled_line(int n, double length, const std::function<double(double)>& field_at_s) {
  std::vector<LinePoint> line;
  for (int k = 0; k <= n; ++k) {
    const double s = length * k / n;
    line.push_back({Point{0.0, s}, s, field_at_s(s)});
  }
  return line;
}

TEST(StreamerIntegral, UniformGapGivesAlphaEffTimesGap) {
  // Constant field over the whole gap: the zone is the gap, the integral alpha_eff(E) d.
  const double d = 0.01, E = 3e6, scale = 1.1;
  const auto line = sampled_line(7, d, [&](double) { return E; });
  const StreamerIntegral result = streamer_integral(line, scale, townsend_form, kCritical);
  EXPECT_NEAR(result.integral, townsend_form(scale * E).effective() * d, 1e-12 * result.integral);
  EXPECT_NEAR(result.zone_length, d, 1e-15);
  // Below the critical field nothing ionizes.
  const StreamerIntegral below = streamer_integral(line, 0.99 * kCritical / E, townsend_form, kCritical);
  EXPECT_EQ(below.integral, 0.0);
  EXPECT_EQ(below.zone_length, 0.0);
}

// Fields along a radius from the surface (r = a + s) of a cylinder, E = E_a a / r, and of a sphere,
// E = E_a (a / r)^2 (Jackson, Classical Electrodynamics, 3rd ed., ch. 1).
constexpr double kRadius = 1e-3, kSurfaceField = 6e6;
double cylinder_field(double s) { return kSurfaceField * kRadius / (kRadius + s); }
double sphere_field(double s) { return kSurfaceField * std::pow(kRadius / (kRadius + s), 2); }

// Integral of max(alpha_eff, 0) over the zone, by the midpoint rule with 1e6 steps.
double reference_streamer_integral(const std::function<double(double)>& field, double zone_end) {
  const int steps = 1000000;
  double sum = 0.0;
  for (int k = 0; k < steps; ++k) sum += std::max(townsend_form(field((k + 0.5) * zone_end / steps)).effective(), 0.0);
  return sum * zone_end / steps;
}

TEST(StreamerIntegral, CylinderFieldMatchesFineQuadrature) {
  // Zone a < r < r_c with E(r_c) = critical (r_c = 2.44 a); line points every a/20 up to r = 3 a.
  const double zone_end = kRadius * kSurfaceField / kCritical - kRadius;
  const StreamerIntegral result = streamer_integral(sampled_line(40, 2 * kRadius, cylinder_field), 1.0, townsend_form, kCritical);
  EXPECT_NEAR(result.integral / reference_streamer_integral(cylinder_field, zone_end), 1.0, 1e-5);  // measured 2e-7
  EXPECT_NEAR(result.zone_length / zone_end, 1.0, 1e-12);  // 1/|E| is linear along a 1/r field
}

TEST(StreamerIntegral, SphereFieldConvergesAtSecondOrder) {
  const double zone_end = kRadius * std::sqrt(kSurfaceField / kCritical) - kRadius;
  const double reference = reference_streamer_integral(sphere_field, zone_end);
  const auto error = [&](int points) {
    return std::abs(streamer_integral(sampled_line(points, 2 * kRadius, sphere_field), 1.0, townsend_form, kCritical).integral /
                        reference - 1);
  };
  EXPECT_LT(error(40), 2e-3);             // line points every a/20; measured 1.5e-3
  EXPECT_GT(error(40) / error(80), 3.5);  // halving the spacing: 4x for second order; measured 4.0
}

TEST(StreamerIntegral, IsContinuousAndIncreasingInTheScale) {
  // Where the zone end passes a line point (x E_k = critical) the integral must not jump.
  const auto line = sampled_line(10, 2 * kRadius, sphere_field);
  for (const LinePoint& p : line) {
    const double x = kCritical / p.E;
    const double below = streamer_integral(line, x * (1 - 1e-9), townsend_form, kCritical).integral;
    const double above = streamer_integral(line, x * (1 + 1e-9), townsend_form, kCritical).integral;
    EXPECT_GE(above, below);
    EXPECT_LT(above - below, 1e-6 * (above + 1e-3));
  }
  double previous = 0.0;
  for (double scale = 0.4; scale < 1.5; scale += 1e-3) {
    const double value = streamer_integral(line, scale, townsend_form, kCritical).integral;
    EXPECT_GE(value, previous);
    previous = value;
  }
}

TEST(TownsendIntegral, WithoutAttachmentIsTheClosedForm) {
  // integral_0^d alpha exp(alpha x) dx = exp(alpha d) - 1 (uniform field, eta = 0).
  const auto no_attachment = [](double E) { return IonizationCoefficients{kA * std::exp(-kB / E), 0.0}; };
  const double d = 0.005, E = 3e6, alpha = no_attachment(E).alpha;
  const auto line = sampled_line(5, d, [&](double) { return E; });
  EXPECT_NEAR(townsend_generation_integral(line, 1.0, no_attachment) / std::expm1(alpha * d), 1.0, 1e-7);
}

TEST(TownsendIntegral, WithAttachmentIsTheClosedForm) {
  // integral_0^d alpha exp(a x) dx = (alpha / a) (exp(a d) - 1) with a = alpha - eta.
  const double d = 0.005, E = 3e6;
  const IonizationCoefficients c = townsend_form(E);
  const auto line = sampled_line(5, d, [&](double) { return E; });
  EXPECT_NEAR(townsend_generation_integral(line, 1.0, townsend_form) / (c.alpha / c.effective() * std::expm1(c.effective() * d)),
              1.0, 1e-7);
}

// The Townsend integral by the midpoint rule with 1e6 steps, exponent and integral together.
double reference_townsend_integral(const std::function<double(double)>& field, double length) {
  const int steps = 1000000;
  const double h = length / steps;
  double exponent = 0.0, sum = 0.0;
  for (int k = 0; k < steps; ++k) {
    const IonizationCoefficients c = townsend_form(field((k + 0.5) * h));
    sum += c.alpha * std::exp(exponent + 0.5 * c.effective() * h) * h;
    exponent += c.effective() * h;
  }
  return sum;
}

TEST(TownsendIntegral, CylinderFieldMatchesFineQuadrature) {
  const double length = 2 * kRadius;
  EXPECT_NEAR(townsend_generation_integral(sampled_line(40, length, cylinder_field), 1.0, townsend_form) /
                  reference_townsend_integral(cylinder_field, length),
              1.0, 1e-6);  // measured 5e-10
}

TEST(TownsendIntegral, SphereFieldConvergesAtSecondOrder) {
  // The exponent (about 19 here) turns the field's interpolation error into a larger relative error.
  const double length = 2 * kRadius, reference = reference_townsend_integral(sphere_field, length);
  const auto error = [&](int points) {
    return std::abs(townsend_generation_integral(sampled_line(points, length, sphere_field), 1.0, townsend_form) / reference - 1);
  };
  EXPECT_LT(error(40), 2e-2);             // measured 1.3e-2
  EXPECT_GT(error(40) / error(80), 3.5);  // measured 4.0
}

TEST(TownsendCriterion, WithoutAttachmentMeetsLnOnePlusInverseGamma) {
  // gamma (exp(alpha d) - 1) = 1  <=>  alpha d = ln(1 + 1/gamma): 4.62 / 6.91 / 9.21 for gamma =
  // 1e-2 / 1e-3 / 1e-4 (physics.md, "Onset criteria" [calc]; Townsend's breakdown condition).
  const auto no_attachment = [](double E) { return IonizationCoefficients{kA * std::exp(-kB / E), 0.0}; };
  const double d = 0.01, E = 1e6;
  const auto line = sampled_line(4, d, [&](double) { return E; });
  const double expected[] = {4.62, 6.91, 9.21};
  int k = 0;
  for (double gamma : {1e-2, 1e-3, 1e-4}) {
    CriterionParameters p;
    p.criterion = Criterion::Townsend, p.gamma = gamma, p.critical_field = 0.0;
    const double x = inception_scale(line, no_attachment, p, 0.1, 10.0);
    const double alpha_d = no_attachment(x * E).alpha * d;
    EXPECT_NEAR(alpha_d, std::log(1 + 1 / gamma), 1e-5 * alpha_d);
    EXPECT_NEAR(alpha_d, expected[k++], 0.005);
  }
}

TEST(InceptionScale, UniformGapSolvesAlphaEffTimesGapEqualsK) {
  // alpha_eff(x E) d = K, solved independently by bisection of the scalar equation.
  const double d = 0.01, E = 2e6, K = 9.15;
  const auto line = sampled_line(6, d, [&](double) { return E; });
  CriterionParameters p;
  p.criterion = Criterion::Streamer, p.K = K, p.critical_field = kCritical;
  const double lowest = kCritical / E;
  const double x = inception_scale(line, townsend_form, p, lowest, 5 * lowest);
  double lo = lowest, hi = 5 * lowest;
  for (int k = 0; k < 200; ++k) {
    const double mid = 0.5 * (lo + hi);
    (townsend_form(mid * E).effective() * d < K ? lo : hi) = mid;
  }
  EXPECT_NEAR(x, lo, 1e-6 * lo);
  // Not reachable below the highest scale: infinity; met at the lowest: the lowest.
  EXPECT_TRUE(std::isinf(inception_scale(line, townsend_form, p, lowest, 0.99 * lo)));
  p.K = 0.0;
  EXPECT_EQ(inception_scale(line, townsend_form, p, 1.01 * lowest, 5 * lowest), 1.01 * lowest);
}

TEST(BrentRoot, FindsTheDottieNumber) {
  // cos x = x at x = 0.739085133215160641655... (the Dottie number; Kaplan, Math. Mag. 80, 2007).
  int calls = 0;
  const auto f = [&](double x) { ++calls; return std::cos(x) - x; };
  const double root = brent_root(f, 0.0, 1.0, f(0.0), f(1.0), 1e-12);
  EXPECT_NEAR(root, 0.7390851332151607, 2e-12);
  EXPECT_LT(calls, 12);  // superlinear: bisection alone needs 40 halvings
}

TEST(BrentRoot, ConvergesToTheJumpOfAStepFunction) {
  // A monotone function with a jump and no zero: the bracket closes on the jump (Brent 1973, ch. 4).
  const auto step = [](double x) { return x < 0.3 ? -1.0 : 2.0; };
  EXPECT_NEAR(brent_root(step, 0.0, 1.0, -1.0, 2.0, 1e-9), 0.3, 1e-9);
}

}  // namespace
}  // namespace hv::onset
