// The command line as a user meets it (spec/cli.md): exit codes, messages that name the place of bad
// input, output folders that are complete or absent, and every bundled case running end to end.
#include <gtest/gtest.h>

#include <filesystem>
#include <vector>

#include "cli_fixture.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Sandbox;

// A small valid case; the bad-input cases below each change one thing in it.
const char* kSphereCase = R"(hvstress: 1
title: sphere over ground
units: {length: mm, voltage: kV}
parameters:
  U: 50 kV
  R: 20 mm
electrodes:
  hot: {potential: U}
shapes:
  - name: ball
    circle: {center: [0, 60], radius: R}
    electrode: hot
ground_plane: {z: 0}
domain: {outer: open}
mesh: {max_size: 100 mm}
)";

TEST(Cli, RunWritesEveryOutputAndPrintsTheTable) {
  Sandbox box;
  box.write("case.yaml", kSphereCase);
  const auto result = box.hvstress("run case.yaml -o results --quiet");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  for (const char* name : {"summary.json", "field.vtu", "surfaces.vtp", "surface-field.csv", "report.md"}) {
    EXPECT_TRUE(fs::exists(box.root() / "results" / name)) << name;
  }
  EXPECT_NE(result.out.find("hot"), std::string::npos);
  EXPECT_NE(result.out.find("results"), std::string::npos);
  // Run again: an earlier result of ours is replaced, and no temporary folder is left behind.
  ASSERT_EQ(box.hvstress("run case.yaml -o results --quiet").exit_code, 0);
  for (const auto& entry : fs::directory_iterator(box.root())) {
    EXPECT_EQ(entry.path().filename().string().find(".tmp-"), std::string::npos) << entry.path();
  }
}

TEST(Cli, JsonPrintsTheSummary) {
  Sandbox box;
  box.write("case.yaml", kSphereCase);
  const auto result = box.hvstress("run case.yaml -o results --quiet --json");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  EXPECT_NE(result.out.find("\"format\": \"hvstress-summary/1\""), std::string::npos) << result.out;
}

TEST(Cli, RefusesToReplaceAFolderThatIsNotAResult) {
  Sandbox box;
  box.write("case.yaml", kSphereCase);
  fs::create_directory(box.root() / "precious");
  box.write("precious/notes.txt", "mine");
  const auto result = box.hvstress("run case.yaml -o precious --quiet");
  EXPECT_EQ(result.exit_code, 2);
  EXPECT_NE(result.err.find("precious"), std::string::npos);
  EXPECT_EQ(testing::read_text(box.root() / "precious" / "notes.txt"), "mine");
}

TEST(Cli, CheckValidatesAndWritesNothing) {
  Sandbox box;
  box.write("case.yaml", kSphereCase);
  const auto result = box.hvstress("check case.yaml");
  EXPECT_EQ(result.exit_code, 0) << result.err;
  EXPECT_TRUE(box.holds_only("case.yaml"));
}

TEST(Cli, MeshWritesTheMesh) {
  Sandbox box;
  box.write("case.yaml", kSphereCase);
  const auto result = box.hvstress("mesh case.yaml -o meshed --quiet");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  EXPECT_TRUE(fs::exists(box.root() / "meshed" / "mesh.vtu"));
}

TEST(Cli, VersionAndHelpWithCaution) {
  Sandbox box;
  const auto version = box.hvstress("--version");
  EXPECT_EQ(version.exit_code, 0);
  EXPECT_NE(version.out.find("hvstress " HV_VERSION), std::string::npos);
  const auto help = box.hvstress("--help");
  EXPECT_EQ(help.exit_code, 0);
  EXPECT_NE(help.out.find("high voltage can kill"), std::string::npos);
}

TEST(Cli, GasesListsEveryModelWithItsSource) {
  Sandbox box;
  const auto result = box.hvstress("gases");
  EXPECT_EQ(result.exit_code, 0);
  for (const char* expected : {"Morrow & Lowke", "quadratic", "SF6", "table", "source:"})
    EXPECT_NE(result.out.find(expected), std::string::npos) << expected;
}

// One malformed input: what to change in the valid case (or the command line), and what the message
// must name. Each must exit with 2 and leave no output folder behind.
struct BadInput {
  const char* label;
  const char* find;       // text of the valid case to replace; "" with a `replace`: the whole case
  const char* replace;
  const char* extra_args;
  const char* must_name;  // the place the message must name
};

std::ostream& operator<<(std::ostream& out, const BadInput& bad) { return out << bad.label; }

class CliBadInput : public ::testing::TestWithParam<BadInput> {};

TEST_P(CliBadInput, ExitsWithTwoNamesThePlaceAndWritesNothing) {
  const BadInput& bad = GetParam();
  std::string text = kSphereCase;
  if (*bad.find == '\0' && *bad.replace != '\0') {
    text = bad.replace;
  } else if (*bad.find != '\0') {
    const size_t at = text.find(bad.find);
    ASSERT_NE(at, std::string::npos) << bad.find;
    text.replace(at, std::string(bad.find).size(), bad.replace);
  }
  Sandbox box;
  box.write("case.yaml", text);
  const auto result = box.hvstress(std::string("run case.yaml -o results --quiet ") + bad.extra_args);
  EXPECT_EQ(result.exit_code, 2) << result.err;
  EXPECT_NE(result.err.find(bad.must_name), std::string::npos) << "message: " << result.err;
  EXPECT_TRUE(box.holds_only("case.yaml")) << "an output was written";
}

INSTANTIATE_TEST_SUITE_P(
    Malformed, CliBadInput,
    ::testing::Values(
        BadInput{"yaml_syntax", "center: [0, 60]", "center: [0, 60", "", "case.yaml:"},
        BadInput{"unknown_key", "radius: R}", "raduis: R}", "", "radius"},
        BadInput{"wrong_unit", "radius: R}", "radius: 20 kV}", "", "case.yaml:11:"},
        BadInput{"dimension_mismatch", "R: 20 mm", "R: 20 mm + 3 kV", "", "case.yaml:6:"},
        BadInput{"unknown_unit", "R: 20 mm", "R: 20 mmm", "", "case.yaml:6:"},
        BadInput{"negative_radius", "radius: R}", "radius: -R}", "", "case.yaml:11:"},
        BadInput{"missing_potential", "hot: {potential: U}", "hot: {}", "", "case.yaml:8:"},
        BadInput{"undefined_electrode", "electrode: hot", "electrode: hto", "", "hot"},
        BadInput{"undefined_parameter", "potential: U}", "potential: V0}", "", "case.yaml:8:"},
        BadInput{"missing_version", "hvstress: 1\n", "", "", "hvstress"},
        BadInput{"wrong_version", "hvstress: 1", "hvstress: 7", "", "case.yaml:1:"},
        BadInput{"zero_surface_size", "max_size: 100 mm}", "max_size: 100 mm, surface_size: 0}", "", "case.yaml:15:"},
        BadInput{"bad_order", "max_size: 100 mm}", "max_size: 100 mm, order: 4}", "", "case.yaml:15:"},
        BadInput{"bad_growth", "max_size: 100 mm}", "max_size: 100 mm, growth: 0.8}", "", "case.yaml:15:"},
        BadInput{"touching_electrodes", "",
                 "hvstress: 1\nunits: {length: mm, voltage: kV}\nelectrodes:\n  hot: {potential: 50}\n"
                 "  cold: {potential: 0}\nshapes:\n  - name: hot ball\n    circle: {center: [0, 60], radius: 20}\n"
                 "    electrode: hot\n  - name: cold ball\n    circle: {center: [0, 100], radius: 20}\n"
                 "    electrode: cold\n",
                 "", "cold ball"},
        BadInput{"ground_plane_cuts", "center: [0, 60]", "center: [0, 10]", "", "ball"},
        BadInput{"open_path_electrode", "circle: {center: [0, 60], radius: R}",
                 "path: {start: [10, 40], segments: [{line: [30, 40]}, {line: [30, 80]}]}", "", "ball"},
        BadInput{"outside_domain", "domain: {outer: open}", "domain: {outer: box, r_max: 10 mm, z: [0, 200]}", "",
                 "ball"},
        BadInput{"unknown_override", "", "", "--set Q=3", "--set"},
        BadInput{"override_wrong_dimension", "", "", "--set \"R=5 kV\"", "R"},
        BadInput{"unknown_option", "", "", "--frobnicate", "frobnicate"}),
    [](const ::testing::TestParamInfo<BadInput>& param) { return std::string(param.param.label); });

TEST(Cli, MissingCaseFileIsBadInput) {
  Sandbox box;
  const auto result = box.hvstress("run no-such-case.yaml -o results --quiet");
  EXPECT_EQ(result.exit_code, 2);
  EXPECT_NE(result.err.find("no-such-case.yaml"), std::string::npos);
  EXPECT_TRUE(box.holds_only(""));
}

TEST(Cli, DemoRunsTheBundledDemo) {
  Sandbox box;
  const auto result = box.hvstress("demo -o demo-results --quiet");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  EXPECT_TRUE(fs::exists(box.root() / "demo-results" / "report.md"));
  EXPECT_NE(result.out.find("demo-results"), std::string::npos);
}

// Every bundled case is a tutorial that must run as its opening comment says.
class BundledCase : public ::testing::TestWithParam<std::string> {};

// The exit code a case's opening comment announces ("# Exit code: 3"), else 0.
int announced_exit_code(const std::string& case_text) {
  const std::string marker = "# Exit code: ";
  const size_t at = case_text.find(marker);
  return at == std::string::npos ? 0 : std::stoi(case_text.substr(at + marker.size()));
}

TEST_P(BundledCase, RunsToCompletion) {
  Sandbox box;
  const std::string path = std::string(HV_SOURCE_DIR) + "/cases/" + GetParam();
  const auto result = box.hvstress("run '" + path + "' -o results --quiet");
  ASSERT_EQ(result.exit_code, announced_exit_code(testing::read_text(path))) << result.err;
  EXPECT_TRUE(fs::exists(box.root() / "results" / "summary.json"));
}

std::vector<std::string> bundled_cases() {
  std::vector<std::string> names;
  for (const auto& entry : fs::directory_iterator(std::string(HV_SOURCE_DIR) + "/cases")) {
    if (entry.path().extension() == ".yaml") names.push_back(entry.path().filename().string());
  }
  return names;
}

INSTANTIATE_TEST_SUITE_P(Cases, BundledCase, ::testing::ValuesIn(bundled_cases()),
                         [](const ::testing::TestParamInfo<std::string>& param) {
                           std::string name = fs::path(param.param).stem().string();
                           for (char& c : name) if (c == '-') c = '_';
                           return name;
                         });

}  // namespace
}  // namespace hv
