// Finite outputs (tools/app/finite_results.h): a NaN or an infinity planted anywhere a number must be
// finite stops the writing with a RunError that names the quantity, before any file exists; the
// values documented as possibly non-finite (no inception found, a sample without a start point) are
// written in their documented forms, never as "nan" or "inf" in the text files.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <limits>
#include <memory>
#include <regex>
#include <string>

#include "cli_fixture.h"
#include "tools/app/run_case.h"
#include "tools/case/case.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Sandbox;

class FiniteOutputs : public ::testing::Test {
 protected:
  // One solved case shared by the suite (a solve is the slow part).
  static void SetUpTestSuite() {
    box_ = std::make_unique<Sandbox>();
    case_ = std::make_unique<Case>(read_case(box_->write("sphere.yaml", testing::kSphereWithOnsetCase).string()));
    outcome_ = compute_case(*case_);
  }
  static void TearDownTestSuite() {
    outcome_.reset();
    case_.reset();
    box_.reset();
  }

  // The message of the RunError that writing the outcome gives, "" when it writes; checks that a
  // refused outcome left no file.
  static std::string writing_error(const std::string& folder_name) {
    const fs::path folder = box_->root() / folder_name;
    fs::create_directory(folder);
    try {
      write_run_outputs(*outcome_, *case_, folder.string());
    } catch (const RunError& error) {
      EXPECT_TRUE(fs::is_empty(folder)) << "a refused result must leave no file";
      return error.what();
    }
    return "";
  }

  // Plants `value` in `target`, returns the writing error, and puts the original back.
  static std::string error_with(double& target, double value, const std::string& folder_name) {
    const double original = target;
    target = value;
    const std::string message = writing_error(folder_name);
    target = original;
    return message;
  }

  static std::unique_ptr<Sandbox> box_;
  static std::unique_ptr<Case> case_;
  static std::unique_ptr<RunOutcome> outcome_;
};

std::unique_ptr<Sandbox> FiniteOutputs::box_;
std::unique_ptr<Case> FiniteOutputs::case_;
std::unique_ptr<RunOutcome> FiniteOutputs::outcome_;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInfinity = std::numeric_limits<double>::infinity();

TEST_F(FiniteOutputs, TheUntouchedResultsAreWritten) { EXPECT_EQ(writing_error("untouched"), ""); }

TEST_F(FiniteOutputs, APlantedNaNIsARunErrorNamingTheQuantity) {
  RunResults& results = outcome_->results;
  ASSERT_FALSE(results.electrodes.empty());
  ASSERT_FALSE(results.surfaces.empty());
  ASSERT_FALSE(results.onset.starts.empty());
  EXPECT_NE(error_with(results.electrodes[0].charge_C, kNaN, "charge").find("electrode sphere charge_C"), std::string::npos);
  EXPECT_NE(error_with(results.energy_J, kInfinity, "energy").find("energy_J"), std::string::npos);
  EXPECT_NE(error_with(results.capacitance_F(0, 0), kNaN, "capacitance").find("capacitance_matrix_F[0][0]"),
            std::string::npos);
  EXPECT_NE(error_with(results.potential[3], kNaN, "potential").find("potential_V at node[3]"), std::string::npos);
  EXPECT_NE(error_with(results.surfaces[0].contours[0][2].E_n, kNaN, "normal").find("sample 2 E_n_V_per_m"),
            std::string::npos);
  EXPECT_NE(error_with(results.onset.starts[1].E_operating, kNaN, "start").find("onset start[1] E_operating"),
            std::string::npos);
  EXPECT_NE(error_with(results.onset.settings.operating_V, kNaN, "operating").find("onset operating_V"),
            std::string::npos);
}

TEST_F(FiniteOutputs, AnInceptionMayBeNoneFoundButNotMinusInfinityOrNaN) {
  OnsetResult& onset = outcome_->results.onset;
  // kNoInception (+inf) is documented (onset.h): written as null beside "inception_found": false.
  EXPECT_EQ(error_with(onset.starts[0].inception_V, kNoInception, "none-found"), "");
  EXPECT_NE(error_with(onset.starts[0].inception_V, -kInfinity, "minus").find("onset start[0] inception_V"),
            std::string::npos);
  EXPECT_NE(error_with(onset.inception_V, kNaN, "nan").find("onset inception_voltage_V"), std::string::npos);
}

TEST_F(FiniteOutputs, ASampleWithoutAStartPointKeepsItsNaN) {
  // results.h: a surface sample's inception voltage and margin are NaN where no start point lies.
  SurfaceSample& sample = outcome_->results.surfaces[0].contours[0][0];
  const double inception = sample.inception_V, margin = sample.margin;
  sample.inception_V = kNaN;
  sample.margin = kNaN;
  EXPECT_EQ(writing_error("sample-nan"), "");
  sample.inception_V = inception;
  sample.margin = margin;
}

TEST_F(FiniteOutputs, TextFilesHoldNoNonFiniteNumbers) {
  OnsetResult& onset = outcome_->results.onset;
  const double inception = onset.inception_V, margin = onset.margin;
  onset.inception_V = onset.margin = kNoInception;  // none found: the documented non-finite value
  ASSERT_EQ(writing_error("text"), "");
  onset.inception_V = inception;
  onset.margin = margin;
  // How printf and to_chars spell non-finite numbers, as a word of its own.
  const std::regex non_finite("(^|[^A-Za-z_])[-+]?(nan|inf)([^A-Za-z_]|$)", std::regex::icase);
  for (const char* name : {"summary.json", "surface-field.csv", "onset.csv", "report.md"}) {
    const std::string text = testing::read_text(box_->root() / "text" / name);
    ASSERT_FALSE(text.empty()) << name;
    EXPECT_FALSE(std::regex_search(text, non_finite)) << name;
  }
  const std::string summary = testing::read_text(box_->root() / "text" / "summary.json");
  EXPECT_NE(summary.find("\"inception_found\": false,\n    \"inception_voltage_V\": null"), std::string::npos);
}

}  // namespace
}  // namespace hv
