// `hvstress optimize`: the search methods on closed-form functions, then the command on a grading
// ring whose smallest tube radius meeting the margin is found independently by a scan of runs.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "app_fixture.h"
#include "cli_fixture.h"
#include "tools/app/optimize.h"
#include "tools/app/optimize_methods.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::read_text;
using testing::Sandbox;

// ---- the methods ----

// A parabola (x - 0.3)^2 + 1 has its minimum at 0.3. Golden-section search shrinks the bracket by
// 1/phi = 0.618 per evaluation (Kiefer 1953), so a bracket of 3 reaches 1e-6 in
// 2 + ceil(ln(3e6) / ln(phi)) = 33 evaluations.
TEST(GoldenSection, FindsTheMinimumOfAParabola) {
  const auto parabola = [](double x) { return (x - 0.3) * (x - 0.3) + 1.0; };
  const LineSearchResult result = golden_section_minimize(parabola, -1.0, 2.0, 1e-6, 100);
  EXPECT_TRUE(result.converged);
  EXPECT_NEAR(result.x, 0.3, 1e-6);
  EXPECT_NEAR(result.value, 1.0, 1e-12);
  EXPECT_EQ(result.evaluations, 2 + static_cast<int>(std::ceil(std::log(3e6) / std::log((1 + std::sqrt(5.0)) / 2))));
}

// A minimum on the bound (f = x on [0, 1]) is approached to within the tolerance.
TEST(GoldenSection, ApproachesAMinimumOnTheBound) {
  const LineSearchResult result = golden_section_minimize([](double x) { return x; }, 0.0, 1.0, 1e-4, 100);
  EXPECT_LT(result.x, 1e-4);
  EXPECT_GT(result.x, 0.0);
}

// Rosenbrock's valley (Rosenbrock, Comput. J. 3, 1960), 100 (y - x^2)^2 + (1 - x)^2, minimum 0 at
// (1, 1): the classic hard case for the simplex, solved within a budget of 400 evaluations.
TEST(NelderMead, FindsRosenbrocksMinimumInABox) {
  const auto rosenbrock = [](const std::vector<double>& p) {
    return 100 * std::pow(p[1] - p[0] * p[0], 2) + std::pow(1 - p[0], 2);
  };
  const SimplexResult result = nelder_mead_minimize(rosenbrock, {-2.0, -1.0}, {2.0, 3.0}, 1e-7, 400);
  EXPECT_TRUE(result.converged);
  EXPECT_LE(result.evaluations, 400);
  EXPECT_NEAR(result.x[0], 1.0, 1e-3);
  EXPECT_NEAR(result.x[1], 1.0, 2e-3);
}

// The unconstrained minimum (3, -1) lies outside the box [0, 2]^2; the minimum over the box is its
// projection (2, 0), and no evaluated point leaves the box.
TEST(NelderMead, StaysInTheBoxAndFindsTheConstrainedMinimum) {
  bool left_the_box = false;
  const auto bowl = [&](const std::vector<double>& p) {
    left_the_box |= p[0] < 0 || p[0] > 2 || p[1] < 0 || p[1] > 2;
    return std::pow(p[0] - 3, 2) + std::pow(p[1] + 1, 2);
  };
  const SimplexResult result = nelder_mead_minimize(bowl, {0.0, 0.0}, {2.0, 2.0}, 1e-6, 300);
  EXPECT_FALSE(left_the_box);
  EXPECT_NEAR(result.x[0], 2.0, 1e-5);
  EXPECT_NEAR(result.x[1], 0.0, 1e-5);
}

// The budget stops the search: at most one step (n + 2 evaluations for n = 3: reflection, expansion
// or contraction, or a shrink of n vertices plus the two) beyond it.
TEST(NelderMead, StopsAtTheBudget) {
  const auto sphere = [](const std::vector<double>& p) { return p[0] * p[0] + p[1] * p[1] + p[2] * p[2]; };
  const SimplexResult result = nelder_mead_minimize(sphere, {-1, -2, -3}, {4, 3, 2}, 1e-12, 20);
  EXPECT_FALSE(result.converged);
  EXPECT_GE(result.evaluations, 20);
  EXPECT_LE(result.evaluations, 20 + 3 + 2);
}

// A step predicate x >= 0.37: bisection brackets the step to the tolerance, halving [0, 1] in
// ceil(log2(1e4)) = 14 steps after the two end points.
TEST(Bisection, FindsTheStepOfAPredicate) {
  const ThresholdResult result = bisect_smallest_feasible([](double x) { return x >= 0.37; }, 0.0, 1.0, 1e-4, 100);
  ASSERT_TRUE(result.found);
  EXPECT_TRUE(result.converged);
  EXPECT_GE(result.smallest_feasible, 0.37);
  EXPECT_LT(result.largest_infeasible, 0.37);
  EXPECT_LE(result.smallest_feasible - result.largest_infeasible, 1e-4);
  EXPECT_EQ(result.evaluations, 2 + 14);
}

TEST(Bisection, ReportsNothingFeasibleAndAFeasibleLowEnd) {
  const ThresholdResult none = bisect_smallest_feasible([](double) { return false; }, 0.0, 1.0, 1e-3, 100);
  EXPECT_FALSE(none.found);
  EXPECT_EQ(none.evaluations, 1);
  const ThresholdResult all = bisect_smallest_feasible([](double) { return true; }, 0.0, 1.0, 1e-3, 100);
  EXPECT_TRUE(all.found);
  EXPECT_EQ(all.smallest_feasible, 0.0);
  EXPECT_EQ(all.evaluations, 2);
}

// ---- the command ----

// A rod end with a grading ring (the geometry of cases/ring-study.yaml, without VTK files to keep it
// quick), at tube radius TUBE_R and major radius RING_R (mm).
std::string ring_case(double tube_r_mm = 40, double ring_R_mm = 150, const std::string& onset =
                          "onset: {criterion: streamer, polarity: both, operating: U, required_margin: 1.2}\n") {
  return "hvstress: 1\nunits: {length: mm, voltage: kV}\nparameters:\n  U: 185 kV * sqrt(2)\n"
         "  ring_R: " + std::to_string(ring_R_mm) + " mm\n  tube_r: " + std::to_string(tube_r_mm) + " mm\n"
         "electrodes:\n  lead: {potential: U}\nshapes:\n"
         "  - name: lead\n    rect: {r: [0, 20], z: [900, 1800], round: 8}\n    electrode: lead\n"
         "  - name: top\n    circle: {center: [0, 1800], radius: 150}\n    electrode: lead\n"
         "  - name: grading ring\n    circle: {center: [ring_R, 910], radius: tube_r}\n    electrode: lead\n"
         "ground_plane: {z: 0}\ndomain: {outer: open}\nmesh: {surface_size: 4 mm, max_size: 300 mm, growth: 1.5}\n"
         "gas: {name: air, pressure: 101.325 kPa, temperature: 20 degC}\n" + onset +
         "output: {dir: ring, vtk: false, csv: false, report: false}\n";
}

// The number after `"key": ` in a JSON text.
double json_value(const std::string& json, const std::string& key) {
  const size_t at = json.find("\"" + key + "\": ");
  return at == std::string::npos ? NAN : std::stod(json.substr(at + key.size() + 4));
}

OptimizeOptions ring_options(const Sandbox& box, const std::string& output, const std::string& vary) {
  OptimizeOptions options;
  options.case_path = box.write("ring.yaml", ring_case()).string();
  options.output_dir = (box.root() / output).string();
  options.varies = {vary};
  options.goal = "min-size-with-margin";
  options.quiet = true;
  return options;
}

// optimize_command with its table on stdout captured (tests are silent unless they fail).
int optimize_silently(const OptimizeOptions& options) {
  ::testing::internal::CaptureStdout();
  try {
    const int exit_code = optimize_command(options);
    ::testing::internal::GetCapturedStdout();
    return exit_code;
  } catch (...) {
    ::testing::internal::GetCapturedStdout();
    throw;
  }
}

// The smallest tube radius meeting the margin, by bisection to 1 % of a 20 mm range (0.2 mm), against
// an independent scan of full runs in 0.25 mm steps across the threshold (the scan also checks that
// the margin rises with the tube radius there, the premise of bisection).
TEST(OptimizeCommand, SmallestTubeMatchesAnIndependentScan) {
  Sandbox box;
  OptimizeOptions options = ring_options(box, "optimized", "tube_r=20 mm:40 mm");
  options.tolerance = 0.01;
  ASSERT_EQ(optimize_silently(options), 0);
  const double found_mm = 1e3 * json_value(read_text(box.root() / "optimized" / "summary.json"), "tube_r");

  double last_missing_mm = NAN, first_meeting_mm = NAN;
  for (double tube_mm = 26.5; tube_mm <= 30.01; tube_mm += 0.25) {
    const bool meets = compute_case(parse_case(ring_case(tube_mm), "scan.yaml"))->results.onset.meets_required_margin();
    if (meets && std::isnan(first_meeting_mm)) first_meeting_mm = tube_mm;
    if (!meets) {
      EXPECT_TRUE(std::isnan(first_meeting_mm)) << "margin not monotone at " << tube_mm << " mm";
      last_missing_mm = tube_mm;
    }
  }
  ASSERT_FALSE(std::isnan(last_missing_mm));
  ASSERT_FALSE(std::isnan(first_meeting_mm));
  // The optimizer's answer meets the margin and lies at most one tolerance (0.2 mm) above the threshold.
  EXPECT_TRUE(compute_case(parse_case(ring_case(found_mm), "found.yaml"))->results.onset.meets_required_margin());
  EXPECT_GT(found_mm, last_missing_mm);
  EXPECT_LT(found_mm, first_meeting_mm + 0.2);
  EXPECT_TRUE(fs::exists(box.root() / "optimized" / "best" / "summary.json"));
  EXPECT_TRUE(fs::exists(box.root() / "optimized" / "history.csv"));
}

// Two parameters take the Nelder-Mead path; two runs give the same history, byte for byte.
TEST(OptimizeCommand, TwoRunsGiveTheSameHistory) {
  Sandbox box;
  OptimizeOptions options = ring_options(box, "first", "ring_R=100 mm:200 mm");
  options.varies.push_back("tube_r=20 mm:50 mm");
  options.goal = "min-field";
  options.max_evaluations = 6;
  ASSERT_EQ(optimize_silently(options), 0);
  options.output_dir = (box.root() / "second").string();
  ASSERT_EQ(optimize_silently(options), 0);
  const std::string first = read_text(box.root() / "first" / "history.csv");
  EXPECT_EQ(first, read_text(box.root() / "second" / "history.csv"));
  EXPECT_EQ(first.rfind("evaluation,ring_R_m,tube_r_m,objective,", 0), 0u) << first;
  // The budget of 6 ends the search after at most one step (up to n + 2 = 4 evaluations) beyond it.
  const double evaluations = json_value(read_text(box.root() / "first" / "summary.json"), "evaluations");
  EXPECT_GE(evaluations, 4.0);
  EXPECT_LE(evaluations, 9.0);
}

// A design that is bad input (tube radius 0 at the low end) is an infeasible point with its message,
// not the end of the search.
TEST(OptimizeCommand, BadInputDesignIsAnInfeasiblePoint) {
  Sandbox box;
  OptimizeOptions options = ring_options(box, "optimized", "tube_r=0 mm:40 mm");
  options.tolerance = 0.1;
  ASSERT_EQ(optimize_silently(options), 0);
  const std::string history = read_text(box.root() / "optimized" / "history.csv");
  const size_t second_row = history.find("\n2,");
  ASSERT_NE(second_row, std::string::npos) << history;
  const std::string row = history.substr(second_row + 1, history.find('\n', second_row + 1) - second_row - 1);
  EXPECT_NE(row.find(",false,"), std::string::npos) << row;
  EXPECT_NE(row.find("greater than zero"), std::string::npos) << row;
}

// When even the largest size misses the margin, the command says so and exits with 3 (spec/cli.md),
// still writing the closest design.
TEST(OptimizeCli, NoDesignMeetingTheMarginExitsWithThree) {
  Sandbox box;
  box.write("ring.yaml", ring_case());
  const auto result = box.hvstress("optimize ring.yaml --vary 'tube_r=10 mm:15 mm' --goal min-size-with-margin -q");
  EXPECT_EQ(result.exit_code, 3) << result.err;
  EXPECT_NE(result.out.find("NO design"), std::string::npos) << result.out;
  EXPECT_TRUE(fs::exists(box.root() / "ring-optimize" / "best" / "summary.json"));
}

// Bad options: exit 2, a message naming the option, and nothing written.
TEST(OptimizeCli, BadOptionsExitWithTwo) {
  Sandbox box;
  box.write("ring.yaml", ring_case());
  box.write("no-onset.yaml", ring_case(40, 150, ""));
  box.write("no-margin.yaml", ring_case(40, 150, "onset: {criterion: streamer}\n"));
  const std::vector<std::pair<std::string, std::string>> cases{
      {"ring.yaml --vary 'tube_r=40 mm:20 mm' --goal min-field", "--vary tube_r"},
      {"ring.yaml --vary 'tube_r=20 mm' --goal min-field", "--vary tube_r"},
      {"ring.yaml --vary 'tube_r=20mm:30mm:5' --goal min-field", "--vary tube_r"},
      {"ring.yaml --vary 'tube_r=20 mm:30 kV' --goal min-field", "--vary tube_r"},
      {"ring.yaml --vary 'tube_r=20 kV:30 kV' --goal min-field", "--vary tube_r"},
      {"ring.yaml --vary 'tube=20 mm:30 mm' --goal min-field", "--vary tube"},
      {"ring.yaml --vary 'tube_r=20 mm:30 mm' --set 'tube_r=25 mm' --goal min-field", "--vary tube_r"},
      {"ring.yaml --vary 'tube_r=20 mm:30 mm' --goal smallest", "--goal"},
      {"no-onset.yaml --vary 'tube_r=20 mm:30 mm' --goal max-inception", "onset"},
      {"no-margin.yaml --vary 'tube_r=20 mm:30 mm' --goal min-size-with-margin", "required_margin"},
  };
  for (const auto& [arguments, named] : cases) {
    const auto result = box.hvstress("optimize " + arguments + " -q -o out");
    EXPECT_EQ(result.exit_code, 2) << arguments << "\n" << result.err;
    EXPECT_NE(result.err.find(named), std::string::npos) << arguments << "\n" << result.err;
    EXPECT_FALSE(fs::exists(box.root() / "out")) << arguments;
  }
}

}  // namespace
}  // namespace hv
