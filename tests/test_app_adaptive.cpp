// Adaptive refinement (tools/app/adaptive.h) on the bundled closed-form cases: the loop reaches the
// tolerance against the closed form, and the estimated error it reports is at least half the true
// error. Also the case keys that steer it.
#include <gtest/gtest.h>

#include <cmath>

#include "app_fixture.h"
#include "solver/elements.h"
#include "tools/app/adaptive.h"

namespace hv {
namespace {

using testing::bundled_case;

constexpr double kU = 100e3;

// Checks one electrode's maximum field against its closed form `exact`.
void expect_certified(const RunResults& results, size_t electrode, double exact) {
  const Accuracy& accuracy = results.accuracy;
  ASSERT_TRUE(accuracy.adaptive);
  ASSERT_TRUE(accuracy.converged) << accuracy.stop_reason;
  ASSERT_LT(electrode, accuracy.max_field_error.size());
  const double true_error = std::abs(results.electrodes[electrode].max_field_V_per_m / exact - 1);
  const double estimate = accuracy.max_field_error[electrode];
  EXPECT_LE(true_error, accuracy.tolerance) << results.electrodes[electrode].name;
  EXPECT_GE(estimate, 0.5 * true_error) << results.electrodes[electrode].name;
  EXPECT_LT(estimate, accuracy.tolerance) << results.electrodes[electrode].name;
}

// Isolated sphere: E = U / R on the whole surface (Gauss's law; Jackson, Classical Electrodynamics,
// 3rd ed., sec. 1.11).
TEST(Adaptive, IsolatedSphereReachesTheToleranceAgainstTheClosedForm) {
  const Case the_case = read_case(bundled_case("sphere-isolated.yaml"));
  ASSERT_TRUE(the_case.geometry.mesh.adaptive());  // no sizes given: adaptive by default
  const auto outcome = compute_case(the_case);
  expect_certified(outcome->results, 0, kU / 0.05);
}

// At a tight tolerance, a case that does not give mesh.order is refined with cubic elements, and the
// result is still certified against the closed form.
TEST(Adaptive, TightToleranceChoosesCubicElementsAndStillCertifies) {
  Case the_case = read_case(bundled_case("sphere-isolated.yaml"));
  the_case.geometry.mesh.adapt.tolerance = 1e-5;
  const auto outcome = compute_case(the_case);
  for (const AccuracyStep& step : outcome->results.accuracy.steps) EXPECT_EQ(step.order, 3);
  expect_certified(outcome->results, 0, kU / 0.05);
}

// Coaxial cylinders: E(a) = U / (a ln(b/a)), E(b) = U / (b ln(b/a)) (Jackson sec. 1.11).
TEST(Adaptive, CoaxialReachesTheToleranceOnBothConductors) {
  const auto outcome = compute_case(read_case(bundled_case("coaxial.yaml")));
  const double a = 0.02, b = 0.1;
  expect_certified(outcome->results, 0, kU / (a * std::log(b / a)));
  expect_certified(outcome->results, 1, kU / (b * std::log(b / a)));
}

// Sphere above a grounded plane: the image-charge series (Jackson sec. 2.2, charges imaged
// repeatedly in the sphere and the plane), as in test_app_analytic.cpp.
double sphere_above_plane_max_field(double U, double R, double h) {
  double q = 1.0, d = 0.0, sum = 0.0;
  for (int n = 0; n < 200; ++n) {
    sum += q * (1.0 / ((R - d) * (R - d)) + 1.0 / ((2 * h - R - d) * (2 * h - R - d)));
    const double next_q = q * R / (2 * h - d);
    d = R * R / (2 * h - d);
    q = next_q;
  }
  return U * R * sum;
}

TEST(Adaptive, SphereAbovePlaneReachesTheToleranceAgainstTheImageSeries) {
  const auto outcome = compute_case(read_case(bundled_case("sphere-above-plane.yaml")));
  expect_certified(outcome->results, 0, sphere_above_plane_max_field(kU, 0.05, 0.1));
  // Each step records its mesh and result; the last one is the answer.
  const Accuracy& accuracy = outcome->results.accuracy;
  ASSERT_GE(accuracy.steps.size(), 2u);
  EXPECT_EQ(accuracy.steps.back().dofs, outcome->results.solve_report.dofs);
  EXPECT_EQ(accuracy.steps.back().max_field_V_per_m[0], outcome->results.electrodes[0].max_field_V_per_m);
  EXPECT_GT(accuracy.steps.back().dofs, accuracy.steps.front().dofs);
}

// A step limit short of the tolerance is reported plainly: not converged, with a warning.
TEST(Adaptive, StepLimitShortOfTheToleranceSaysSo) {
  Case the_case = read_case(bundled_case("sphere-isolated.yaml"));
  the_case.geometry.mesh.adapt.tolerance = 1e-7;
  the_case.geometry.mesh.adapt.max_steps = 2;
  const auto outcome = compute_case(the_case);
  const Accuracy& accuracy = outcome->results.accuracy;
  EXPECT_FALSE(accuracy.converged);
  EXPECT_EQ(accuracy.steps.size(), 2u);
  ASSERT_FALSE(outcome->results.warnings.empty());
  EXPECT_NE(outcome->results.warnings.back().find("adaptive mesh refinement stopped"), std::string::npos);
}

// Explicit sizes mean one fixed mesh, with only the energy-norm estimate.
TEST(Adaptive, ExplicitSizesMeshOnce) {
  Case the_case = read_case(bundled_case("sphere-isolated.yaml"));
  the_case.geometry.mesh.surface_size = 0.005;
  ASSERT_FALSE(the_case.geometry.mesh.adaptive());
  const auto outcome = compute_case(the_case);
  const Accuracy& accuracy = outcome->results.accuracy;
  EXPECT_FALSE(accuracy.adaptive);
  EXPECT_TRUE(accuracy.steps.empty());
  EXPECT_GT(accuracy.energy_error, 0.0);
  EXPECT_LT(accuracy.energy_error, 0.1);
  EXPECT_TRUE(std::isnan(accuracy.max_field_error[0]));
}

const char* const kSphere = R"(
hvstress: 1
units: {length: mm, voltage: kV}
electrodes: {ball: {potential: 10}}
shapes: [{circle: {center: [0, 0], radius: 10}, electrode: ball}]
)";

Case with_mesh(const std::string& mesh_lines) {
  return parse_case(std::string(kSphere) + mesh_lines + "\n", "adapt.yaml");
}

TEST(AdaptKeys, ValuesAreRead) {
  const Case c = with_mesh("mesh: {surface_size: 1, adapt: {enabled: true, tolerance: 1e-4, max_steps: 5}}");
  EXPECT_TRUE(c.geometry.mesh.adaptive());
  EXPECT_DOUBLE_EQ(c.geometry.mesh.adapt.tolerance, 1e-4);
  EXPECT_EQ(c.geometry.mesh.adapt.max_steps, 5);
  EXPECT_FALSE(with_mesh("mesh: {adapt: {enabled: false}}").geometry.mesh.adaptive());
  EXPECT_FALSE(with_mesh("mesh: {max_size: 5}").geometry.mesh.adaptive());
  EXPECT_TRUE(with_mesh("").geometry.mesh.adaptive());
  EXPECT_DOUBLE_EQ(with_mesh("").geometry.mesh.adapt.tolerance, 1e-3);  // the documented default
}

TEST(AdaptiveOrder, TheCaseDecidesWhenItGivesAnOrder) {
  EXPECT_EQ(adaptive_order(with_mesh("").geometry.mesh), 2);
  EXPECT_EQ(adaptive_order(with_mesh("mesh: {adapt: {tolerance: 1e-5}}").geometry.mesh), 3);
  EXPECT_EQ(adaptive_order(with_mesh("mesh: {order: 2, adapt: {tolerance: 1e-5}}").geometry.mesh), 2);
  EXPECT_EQ(adaptive_order(with_mesh("mesh: {order: 3}").geometry.mesh), 3);
}

TEST(AdaptKeys, BadValuesNameTheKey) {
  for (const char* bad : {"mesh: {adapt: {tolerance: 0}}", "mesh: {adapt: {tolerance: 0.5}}",
                          "mesh: {adapt: {max_steps: 1}}", "mesh: {adapt: {enabled: maybe}}",
                          "mesh: {adapt: {tolerence: 0.01}}"}) {
    try {
      with_mesh(bad);
      ADD_FAILURE() << "accepted: " << bad;
    } catch (const InputError& error) {
      EXPECT_NE(std::string(error.what()).find("mesh.adapt."), std::string::npos) << error.what();
    }
  }
}

}  // namespace
}  // namespace hv
