// The same case gives the same results, bit for bit apart from the clock readings: run after run,
// whatever the OpenMP and OpenBLAS thread counts, and a sweep's variants whatever --jobs (which
// changes the thread settings of the variants). Only summary.json's timings_s and "seconds..."
// members may differ; the CSV files must match byte for byte.
#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_fixture.h"
#include "result_checks.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Sandbox;

// The demo case: a dielectric, a ground plane and discharge onset (OpenMP field-line tracing, and a
// factorization large enough for OpenBLAS to use its threads).
const char* kTerminalCase = HV_SOURCE_DIR "/cases/hv-terminal.yaml";

// The results of `folder` as compared here: summary.json without the clock, then the CSV files.
std::string results_of(const fs::path& folder) {
  return testing::without_timings(testing::read_text(folder / "summary.json")) +
         testing::read_text(folder / "surface-field.csv") + testing::read_text(folder / "onset.csv");
}

TEST(Determinism, RunsAgreeBitForBitAcrossRunsAndThreadCounts) {
  Sandbox box;
  const std::string run = std::string("run '") + kTerminalCase + "' --quiet -o ";
  ASSERT_EQ(testing::hvstress_with_environment(box.root(), "OMP_NUM_THREADS=2 OPENBLAS_NUM_THREADS=2", run + "two"), 0);
  ASSERT_EQ(testing::hvstress_with_environment(box.root(), "OMP_NUM_THREADS=2 OPENBLAS_NUM_THREADS=2", run + "again"), 0);
  ASSERT_EQ(testing::hvstress_with_environment(box.root(), "-u OPENBLAS_NUM_THREADS OMP_NUM_THREADS=1", run + "one"), 0);
  const std::string reference = results_of(box.root() / "two");
  ASSERT_NE(reference.find("\"inception_voltage_V\""), std::string::npos) << "the case should evaluate onset";
  EXPECT_EQ(results_of(box.root() / "again"), reference) << "the same run twice";
  EXPECT_EQ(results_of(box.root() / "one"), reference) << "one thread against two";
}


TEST(Determinism, SweepVariantsAgreeAcrossJobCounts) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  const std::string sweep = "sweep sphere.yaml --vary R=20mm:50mm:3 --quiet -o ";
  // Unset thread variables: with --jobs 1 the variant uses every core, with --jobs 2 one thread each.
  ASSERT_EQ(testing::hvstress_with_environment(box.root(), "-u OMP_NUM_THREADS -u OPENBLAS_NUM_THREADS",
                                               sweep + "serial --jobs 1"),
            0);
  ASSERT_EQ(testing::hvstress_with_environment(box.root(), "-u OMP_NUM_THREADS -u OPENBLAS_NUM_THREADS",
                                               sweep + "parallel --jobs 2"),
            0);
  int compared = 0;
  for (const auto& entry : fs::directory_iterator(box.root() / "serial" / "variants")) {
    if (!entry.is_directory()) continue;
    const fs::path twin = box.root() / "parallel" / "variants" / entry.path().filename();
    ASSERT_TRUE(fs::exists(twin)) << "the same variant key in both sweeps: " << twin;
    EXPECT_EQ(results_of(entry.path()), results_of(twin)) << entry.path().filename();
    ++compared;
  }
  EXPECT_EQ(compared, 3);
}

}  // namespace
}  // namespace hv
