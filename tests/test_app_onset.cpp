// Discharge onset through the whole pipeline (case file -> field -> field lines -> inception voltage)
// against the empirical laws of the trade, and the onset's bad input and exit codes.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "app_fixture.h"
#include "cli_fixture.h"

namespace hv {
namespace {

using testing::Sandbox;

// An isolated sphere of radius R (mm) in air at relative density delta, streamer criterion.
std::string isolated_sphere_case(double radius_mm, double pressure_kPa) {
  return "hvstress: 1\nunits: {length: mm, voltage: kV}\nelectrodes:\n  ball: {potential: 10}\n"
         "shapes:\n  - name: ball\n    circle: {center: [0, 0], radius: " +
         std::to_string(radius_mm) + "}\n    electrode: ball\ndomain: {outer: open, radius: " +
         std::to_string(20 * radius_mm) + "}\ngas: {name: air, pressure: " + std::to_string(pressure_kPa) +
         " kPa, temperature: 20 degC}\nonset: {criterion: streamer}\n";
}

// Peek's law for the onset field of spheres, E_c = 27.2 delta (1 + 0.54 / sqrt(delta R)) kV/cm with R
// in cm (Peek 1929 as given by Kuffel, Zaengl & Kuffel; recalled from memory, physics.md). The
// streamer integral with the attachment-corrected air model lands 8-12 % above it (physics.md [calc]):
// Peek's sphere data were visual corona on spheres in the laboratory, a later stage than the first
// streamer, and the law is a fit of limited range; hence the 15 % band the issue sets.
TEST(OnsetSphere, OnsetFieldFollowsPeeksSphereLawWithin15Percent) {
  for (double radius_mm : {5.0, 15.0, 50.0}) {
    const double delta = 1.0;
    const auto outcome = compute_case(parse_case(isolated_sphere_case(radius_mm, 101.3 * 293.15 / 293.0), "sphere.yaml"));
    const OnsetResult& onset = outcome->results.onset;
    ASSERT_TRUE(onset.evaluated);
    ASSERT_NE(onset.inception_V, kNoInception);
    // An isolated sphere's surface field is U / R (Gauss's law).
    const double onset_field_kV_per_cm = onset.inception_V / (radius_mm * 1e-3) / 1e5;
    const double R_cm = radius_mm / 10.0;
    const double peek = 27.2 * delta * (1 + 0.54 / std::sqrt(delta * R_cm));
    EXPECT_NEAR(onset_field_kV_per_cm, peek, 0.15 * peek) << "R = " << radius_mm << " mm";
  }
}

// Common practice: air breaks down near 3 MV/m over centimetre distances, so an isolated sphere of
// 1 cm radius cannot be raised much beyond about 30 kV (V = E R). The streamer criterion gives a higher
// onset field for so small a radius (Peek's law: 4.2 MV/m), so the check is a band: above the 30 kV of
// the rule and below 1.6 times it.
TEST(OnsetSphere, CentimetreSphereRuleOfThumb) {
  const auto outcome = compute_case(parse_case(isolated_sphere_case(10.0, 101.325), "sphere.yaml"));
  const double inception_kV = outcome->results.onset.inception_V / 1e3;
  EXPECT_GT(inception_kV, 30.0);
  EXPECT_LT(inception_kV, 1.6 * 30.0);
}

// Doubling the gas density doubles the onset field of a large electrode (the criterion depends on
// E/N only, physics.md "Units and gas density"), apart from the radius term of Peek's law and the
// three-body attachment: the ratio must lie between 1.6 and 2.0 for a 50 mm sphere (Peek: 1.87).
TEST(OnsetSphere, DenserGasRaisesTheInceptionVoltage) {
  const double at_1_bar = compute_case(parse_case(isolated_sphere_case(50.0, 100.0), "a.yaml"))->results.onset.inception_V;
  const double at_2_bar = compute_case(parse_case(isolated_sphere_case(50.0, 200.0), "b.yaml"))->results.onset.inception_V;
  EXPECT_GT(at_2_bar / at_1_bar, 1.6);
  EXPECT_LT(at_2_bar / at_1_bar, 2.0);
}

// The bundled pair: the same terminal at the same voltage passes with a large ring and misses its
// required margin with a small one; `run` exits with 3 for the miss (spec/cli.md).
TEST(OnsetCases, SmallRingMissesItsMarginAndExitsWithThree) {
  Sandbox box;
  const auto fails = box.hvstress("run '" + testing::bundled_case("ring-too-small.yaml") + "' -o small --quiet");
  EXPECT_EQ(fails.exit_code, 3) << fails.err;
  EXPECT_NE(fails.out.find("NOT MET"), std::string::npos) << fails.out;
  EXPECT_TRUE(std::filesystem::exists(box.root() / "small" / "onset.csv"));
  EXPECT_TRUE(std::filesystem::exists(box.root() / "small" / "fieldlines.vtp"));
  const auto passes = box.hvstress("run '" + testing::bundled_case("ring-large-enough.yaml") + "' -o large --quiet");
  EXPECT_EQ(passes.exit_code, 0) << passes.err;
}

// Bad onset input: exit 2, a message naming the place, no output folder.
struct BadOnset {
  const char* label;
  const char* gas_and_onset;
  const char* must_name;
};
std::ostream& operator<<(std::ostream& out, const BadOnset& bad) { return out << bad.label; }

class OnsetBadInput : public ::testing::TestWithParam<BadOnset> {};

TEST_P(OnsetBadInput, ExitsWithTwoAndWritesNothing) {
  Sandbox box;
  box.write("table.csv", "E/N Td,alpha/N m2,eta/N m2\n100,1e-22,2e-22\n90,2e-22,1e-22\n200,5e-21,1e-22\n");
  box.write("case.yaml", std::string("hvstress: 1\nunits: {length: mm, voltage: kV}\nelectrodes:\n  ball: {potential: 10}\n"
                                     "shapes:\n  - name: ball\n    circle: {center: [0, 0], radius: 10}\n"
                                     "    electrode: ball\n") + GetParam().gas_and_onset);
  const auto result = box.hvstress("run case.yaml -o results --quiet");
  EXPECT_EQ(result.exit_code, 2) << result.err;
  EXPECT_NE(result.err.find(GetParam().must_name), std::string::npos) << result.err;
  EXPECT_FALSE(std::filesystem::exists(box.root() / "results"));
}

INSTANTIATE_TEST_SUITE_P(
    Malformed, OnsetBadInput,
    ::testing::Values(BadOnset{"unknown_gas", "gas: {name: helium}\nonset: {}\n", "case.yaml:9:"},
                      BadOnset{"unsorted_table", "gas: {name: table, table: table.csv}\nonset: {}\n", "table.csv:3"},
                      BadOnset{"missing_table", "gas: {name: table, table: none.csv}\nonset: {}\n", "none.csv"},
                      BadOnset{"zero_K", "onset: {K: 0}\n", "case.yaml:9:"},
                      BadOnset{"negative_K", "onset: {K: -9}\n", "case.yaml:9:"},
                      BadOnset{"polarity_typo", "onset: {polarity: postive}\n", "positive"},
                      BadOnset{"criterion_typo", "onset: {criterion: streamers}\n", "streamer"},
                      BadOnset{"gamma_out_of_range", "onset: {criterion: townsend, gamma: 2}\n", "case.yaml:9:"}),
    [](const ::testing::TestParamInfo<BadOnset>& param) { return std::string(param.param.label); });

}  // namespace
}  // namespace hv
