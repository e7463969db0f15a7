// The adaptive loop with a discharge-onset section (tools/app/adaptive.h): onset is evaluated only
// once the fields are close to settled, yet the inception voltage it reports is checked over the last
// meshes and agrees with a fine fixed mesh of the same design.
#include <gtest/gtest.h>

#include <cmath>

#include "app_fixture.h"

namespace hv {
namespace {

using testing::bundled_case;

// Sphere above a plane in a grounded box, streamer onset in air (cases/bench-sphere-box.yaml).
Case sphere_in_box() { return read_case(bundled_case("bench-sphere-box.yaml")); }

TEST(AdaptiveOnset, OnsetStartsLateAndIsCheckedOverTheLastMeshes) {
  const auto outcome = compute_case(sphere_in_box());
  const RunResults& results = outcome->results;
  const Accuracy& accuracy = results.accuracy;
  ASSERT_TRUE(accuracy.converged) << accuracy.stop_reason;
  ASSERT_GE(accuracy.steps.size(), 3u);
  EXPECT_TRUE(std::isnan(accuracy.steps.front().inception_V));  // the coarse first mesh skips onset
  const size_t n = accuracy.steps.size();
  EXPECT_FALSE(std::isnan(accuracy.steps[n - 2].inception_V));  // the stop rule compared two meshes
  ASSERT_TRUE(results.onset.evaluated);
  EXPECT_EQ(accuracy.steps.back().inception_V, results.onset.inception_V);
  EXPECT_LT(accuracy.inception_error, accuracy.tolerance);
}

// The same design on one fixed mesh, ten times finer on the sphere than the fixed default (2 pi R / 61):
// an independent path to the inception voltage (no size map, no deferred onset).
TEST(AdaptiveOnset, InceptionAgreesWithAFineFixedMesh) {
  const auto adaptive = compute_case(sphere_in_box());
  ASSERT_TRUE(adaptive->results.accuracy.adaptive);
  Case fixed = sphere_in_box();
  fixed.geometry.mesh.surface_size = 0.5e-3;  // 628 elements around the sphere
  const auto reference = compute_case(fixed);
  ASSERT_TRUE(adaptive->results.onset.evaluated);
  ASSERT_TRUE(reference->results.onset.evaluated);
  const double tolerance = adaptive->results.accuracy.tolerance;
  EXPECT_NEAR(adaptive->results.onset.inception_V / reference->results.onset.inception_V, 1.0, 2 * tolerance);
}

}  // namespace
}  // namespace hv
