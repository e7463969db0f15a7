// Reading whole case files: the example of the case-format contract to SI values, parameters in
// file order with --set, default units, box domains, gas tables, and the places kept for later layers.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <unistd.h>

#include "tools/case/case.h"

namespace hv {
namespace {

// The example of spec/case-format.md (an invented design).
const char* const kExampleCase = R"(hvstress: 1
title: Grading study, 300 kV hall terminal (invented example)
units: {length: mm, voltage: kV}

parameters:
  U: 300 kV * sqrt(2)
  ring_R: 350 mm
  tube_r: 45 mm

materials:
  epoxy: {permittivity: 4.4}

electrodes:
  terminal: {potential: U}
  shield: {floating: true}
  earth: {potential: 0}

shapes:
  - name: stem
    rect: {r: [0, 40], z: [0, 1500], round: 10}
    electrode: terminal
  - name: ring
    circle: {center: [ring_R, 1450], radius: tube_r}
    electrode: terminal
  - name: post
    polygon: {points: [[0, 0], [120, 0], [120, 1400], [0, 1400]], round: 5}
    material: epoxy
  - name: profile
    path:
      start: [0, 1550]
      segments:
        - line: [200, 1550]
        - arc: {to: [240, 1590], radius: 40}
        - line: [240, 1700]
        - line: [0, 1700]
    electrode: terminal

ground_plane: {z: 0}

domain:
  outer: open
  radius: 6 m

mesh:
  order: 2
  surface_size: 2 mm
  max_size: 200 mm
  growth: 1.3

gas: {name: air, pressure: 101.325 kPa, temperature: 20 degC}

onset:
  criterion: streamer
  K: 9.15
  polarity: positive
  operating: U
  required_margin: 1.2

output: {dir: out, vtk: true, csv: true, report: true}
)";

// 300 kV rms of a sine wave has the peak 300 kV * sqrt(2).
const double kPeak = 300e3 * std::sqrt(2.0);

TEST(CaseReader, ExampleCaseGivesSiValues) {
  const Case c = parse_case(kExampleCase, "example.yaml");
  EXPECT_EQ(c.format, 1);
  EXPECT_EQ(c.title, "Grading study, 300 kV hall terminal (invented example)");
  ASSERT_EQ(c.parameters.size(), 3u);
  EXPECT_EQ(c.parameters[0].name, "U");
  EXPECT_DOUBLE_EQ(c.parameters[0].value, kPeak);
  EXPECT_EQ(c.parameters[0].unit, "V");
  EXPECT_DOUBLE_EQ(c.parameters[1].value, 0.35);
  EXPECT_EQ(c.parameters[1].unit, "m");
  EXPECT_DOUBLE_EQ(c.parameters[2].value, 0.045);

  const GeometrySpec& g = c.geometry;
  ASSERT_EQ(g.materials.size(), 1u);
  EXPECT_EQ(g.materials[0].name, "epoxy");
  EXPECT_DOUBLE_EQ(g.materials[0].permittivity, 4.4);

  ASSERT_EQ(g.electrodes.size(), 3u);
  EXPECT_EQ(g.electrodes[0].name, "terminal");
  EXPECT_DOUBLE_EQ(g.electrodes[0].potential_V, kPeak);
  EXPECT_FALSE(g.electrodes[0].floating);
  EXPECT_TRUE(g.electrodes[1].floating);
  EXPECT_EQ(g.electrodes[2].potential_V, 0.0);

  ASSERT_EQ(g.shapes.size(), 4u);
  const auto& stem = std::get<RectShape>(g.shapes[0].outline);
  EXPECT_EQ(g.shapes[0].name, "stem");
  EXPECT_EQ(g.shapes[0].electrode, "terminal");
  EXPECT_DOUBLE_EQ(stem.r0, 0.0);
  EXPECT_DOUBLE_EQ(stem.r1, 0.04);
  EXPECT_DOUBLE_EQ(stem.z1, 1.5);
  EXPECT_DOUBLE_EQ(stem.round, 0.01);

  const auto& ring = std::get<CircleShape>(g.shapes[1].outline);
  EXPECT_DOUBLE_EQ(ring.center.r, 0.35);
  EXPECT_DOUBLE_EQ(ring.center.z, 1.45);
  EXPECT_DOUBLE_EQ(ring.radius, 0.045);

  const auto& post = std::get<PolygonShape>(g.shapes[2].outline);
  EXPECT_EQ(g.shapes[2].material, "epoxy");
  EXPECT_TRUE(g.shapes[2].electrode.empty());
  ASSERT_EQ(post.points.size(), 4u);
  EXPECT_DOUBLE_EQ(post.points[2].r, 0.12);
  EXPECT_DOUBLE_EQ(post.points[2].z, 1.4);
  EXPECT_DOUBLE_EQ(post.round, 0.005);

  const auto& profile = std::get<PathShape>(g.shapes[3].outline);
  EXPECT_DOUBLE_EQ(profile.start.z, 1.55);
  ASSERT_EQ(profile.segments.size(), 4u);
  EXPECT_EQ(profile.segments[0].kind, PathSegment::Kind::Line);
  EXPECT_DOUBLE_EQ(profile.segments[0].to.r, 0.2);
  EXPECT_EQ(profile.segments[1].kind, PathSegment::Kind::Arc);
  EXPECT_DOUBLE_EQ(profile.segments[1].to.r, 0.24);
  EXPECT_DOUBLE_EQ(profile.segments[1].to.z, 1.59);
  EXPECT_DOUBLE_EQ(profile.segments[1].radius, 0.04);

  EXPECT_TRUE(g.ground_plane.present);
  EXPECT_EQ(g.ground_plane.z, 0.0);
  EXPECT_EQ(g.domain.outer, DomainSpec::Outer::Open);
  EXPECT_DOUBLE_EQ(g.domain.radius, 6.0);
  EXPECT_EQ(g.mesh.order, 2);
  EXPECT_DOUBLE_EQ(g.mesh.surface_size, 0.002);
  EXPECT_DOUBLE_EQ(g.mesh.max_size, 0.2);
  EXPECT_DOUBLE_EQ(g.mesh.growth, 1.3);

  EXPECT_EQ(c.gas.name, "air");
  EXPECT_EQ(c.gas.model, "morrow-lowke");
  EXPECT_DOUBLE_EQ(c.gas.pressure_Pa, 101325.0);
  EXPECT_DOUBLE_EQ(c.gas.temperature_K, 293.15);  // 20 degC + 273.15 K (SI brochure 2.3.1)

  EXPECT_TRUE(c.onset.present);
  EXPECT_EQ(c.onset.criterion, "streamer");
  EXPECT_DOUBLE_EQ(c.onset.K, 9.15);
  EXPECT_TRUE(std::isnan(c.onset.gamma));
  EXPECT_EQ(c.onset.polarity, "positive");
  EXPECT_DOUBLE_EQ(c.onset.operating_V, kPeak);
  EXPECT_DOUBLE_EQ(c.onset.required_margin, 1.2);

  EXPECT_EQ(c.output.dir, "out");
  EXPECT_TRUE(c.output.vtk && c.output.csv && c.output.report);
  EXPECT_EQ(c.text, kExampleCase);
}

TEST(CaseReader, PlacesAreKeptForLaterLayers) {
  const Case c = parse_case(kExampleCase, "example.yaml");
  const SourceLocation& ring = c.geometry.shapes[1].where;
  EXPECT_EQ(ring.file, "example.yaml");
  EXPECT_EQ(ring.line, 22);  // `- name: ring`: the map starts at its first key
  EXPECT_EQ(ring.column, 5);
  EXPECT_EQ(ring.key_path, "shapes[1]");
  const SourceLocation& shield = c.geometry.electrodes[1].where;
  EXPECT_EQ(shield.line, 15);
  EXPECT_EQ(shield.column, 3);
  EXPECT_EQ(shield.key_path, "electrodes.shield");
  EXPECT_EQ(c.geometry.materials[0].where.key_path, "materials.epoxy");
  EXPECT_EQ(c.geometry.domain.where.line, 40);
  EXPECT_EQ(c.geometry.mesh.where.key_path, "mesh");
  EXPECT_EQ(c.gas.where.line, 50);
  EXPECT_EQ(c.onset.where.line, 52);
}

const char* const kParameterCase = R"(hvstress: 1
parameters:
  gap: 20 mm
  r: gap / 4
  U: 10 kV
  E: U / gap
  n: 3
electrodes:
  a: {potential: U}
shapes:
  - circle: {center: [0, gap + r], radius: r}
    electrode: a
)";

TEST(CaseReader, ParametersUseEarlierOnesInFileOrder) {
  const Case c = parse_case(kParameterCase, "p.yaml");
  ASSERT_EQ(c.parameters.size(), 5u);
  EXPECT_DOUBLE_EQ(c.parameters[1].value, 0.005);
  EXPECT_DOUBLE_EQ(c.parameters[3].value, 5e5);
  EXPECT_EQ(c.parameters[3].unit, "V/m");
  EXPECT_DOUBLE_EQ(c.parameters[4].value, 3.0);
  EXPECT_EQ(c.parameters[4].unit, "");  // a bare number stays a pure number
  const auto& circle = std::get<CircleShape>(c.geometry.shapes[0].outline);
  EXPECT_DOUBLE_EQ(circle.center.z, 0.025);
  EXPECT_DOUBLE_EQ(circle.radius, 0.005);
  EXPECT_EQ(c.geometry.shapes[0].name, "shapes[0]");
}

TEST(CaseReader, SetReplacesAParameterBeforeLaterOnesUseIt) {
  const Case c = parse_case(kParameterCase, "p.yaml", {"gap=40 mm", " U = 2*10 kV"});
  EXPECT_DOUBLE_EQ(c.parameters[0].value, 0.04);
  EXPECT_DOUBLE_EQ(c.parameters[1].value, 0.01);  // r = gap / 4 follows the new gap
  EXPECT_DOUBLE_EQ(c.parameters[3].value, 5e5);   // E = 20 kV / 40 mm
  EXPECT_DOUBLE_EQ(c.geometry.electrodes[0].potential_V, 2e4);
  const Case later = parse_case(kParameterCase, "p.yaml", {"r=gap/2"});  // may use earlier ones
  EXPECT_DOUBLE_EQ(later.parameters[1].value, 0.01);
}

TEST(CaseReader, SetOfAnUnknownParameterSuggestsTheNearest) {
  try {
    parse_case(kParameterCase, "p.yaml", {"gapp=30 mm"});
    FAIL() << "unknown parameter accepted";
  } catch (const InputError& error) {
    EXPECT_EQ(error.where().key_path, "--set gapp");
    EXPECT_EQ(error.problem(), "the case has no parameter `gapp`");
    EXPECT_EQ(error.hint(), "Did you mean `gap`?");
  }
  EXPECT_THROW(parse_case(kParameterCase, "p.yaml", {"gap 30 mm"}), InputError);
  EXPECT_THROW(parse_case(kParameterCase, "p.yaml", {"gap=1 mm", "gap=2 mm"}), InputError);
  try {
    parse_case(kParameterCase, "p.yaml", {"U=10 kV + 1 mm"});
    FAIL() << "bad --set value accepted";
  } catch (const InputError& error) {
    EXPECT_EQ(error.where().key_path, "--set U");
    EXPECT_NE(error.problem().find("at character 7"), std::string::npos) << error.what();
  }
}

TEST(CaseReader, DefaultUnitsApplyToBareNumbersOnly) {
  const Case c = parse_case(R"(hvstress: 1
units: {length: cm, voltage: kV, pressure: bar, temperature: degC}
electrodes:
  a: {potential: 12}
shapes:
  - circle: {center: [0, 10], radius: 2 mm}
    electrode: a
gas: {pressure: 2, temperature: -10}
)",
                            "u.yaml");
  EXPECT_DOUBLE_EQ(c.geometry.electrodes[0].potential_V, 12e3);
  const auto& circle = std::get<CircleShape>(c.geometry.shapes[0].outline);
  EXPECT_DOUBLE_EQ(circle.center.z, 0.1);
  EXPECT_DOUBLE_EQ(circle.radius, 0.002);
  EXPECT_DOUBLE_EQ(c.gas.pressure_Pa, 2e5);
  EXPECT_DOUBLE_EQ(c.gas.temperature_K, 263.15);
}

TEST(CaseReader, MinimalCaseTakesTheDocumentedDefaults) {
  const Case c = parse_case("hvstress: 1\nelectrodes: {a: {potential: 1 kV}}\n"
                            "shapes: [{circle: {center: [0, 1], radius: 0.1}, electrode: a}]\n",
                            "m.yaml");
  EXPECT_EQ(c.title, "");
  EXPECT_TRUE(c.parameters.empty());
  EXPECT_FALSE(c.geometry.ground_plane.present);
  EXPECT_EQ(c.geometry.domain.outer, DomainSpec::Outer::Open);
  EXPECT_EQ(c.geometry.domain.radius, 0.0);
  EXPECT_EQ(c.geometry.mesh.order, 2);
  EXPECT_EQ(c.geometry.mesh.growth, 1.3);
  EXPECT_EQ(c.gas.name, "air");
  EXPECT_EQ(c.gas.model, "morrow-lowke");
  EXPECT_EQ(c.gas.pressure_Pa, 101325.0);
  EXPECT_EQ(c.gas.temperature_K, 293.15);
  EXPECT_FALSE(c.onset.present);
  EXPECT_EQ(c.output.dir, "out");
}

TEST(CaseReader, BoxDomainWithGroundPlane) {
  const Case c = parse_case(R"(hvstress: 1
electrodes:
  hv: {potential: 50 kV}
  lid: {potential: 0}
shapes:
  - rect: {r: [0, 10 mm], z: [100 mm, 200 mm]}
    electrode: hv
ground_plane: {z: 0}
domain:
  outer: BOX
  r_max: 1 m
  z: [0, 2 m]
  sides: {top: lid, right: symmetry}
)",
                            "box.yaml");
  const DomainSpec& d = c.geometry.domain;
  EXPECT_EQ(d.outer, DomainSpec::Outer::Box);
  EXPECT_DOUBLE_EQ(d.r_max, 1.0);
  EXPECT_DOUBLE_EQ(d.z_min, 0.0);
  EXPECT_DOUBLE_EQ(d.z_max, 2.0);
  EXPECT_EQ(d.top.electrode, "lid");
  EXPECT_TRUE(d.right.is_symmetry());
  EXPECT_TRUE(d.bottom.is_symmetry());
}

TEST(CaseReader, GasNamesIgnoreCaseAndTablesResolveAgainstTheCaseFolder) {
  namespace fs = std::filesystem;
  const fs::path folder = fs::temp_directory_path() / ("hv-case-test-" + std::to_string(::getpid()));
  fs::create_directories(folder / "gases");
  std::ofstream(folder / "gases" / "mix.csv") << "E_over_N_Td,alpha_over_N_m2\n100,1e-22\n";
  const fs::path case_path = folder / "case.yaml";
  std::ofstream(case_path) << "hvstress: 1\nelectrodes: {a: {potential: 1 kV}}\n"
                              "shapes: [{circle: {center: [0, 1], radius: 0.1}, electrode: a}]\n"
                              "gas: {name: Table, table: gases/mix.csv, pressure: 4 bar}\n";
  const Case c = read_case(case_path.string());
  EXPECT_EQ(c.gas.name, "table");
  EXPECT_EQ(c.gas.model, "");
  EXPECT_TRUE(fs::equivalent(c.gas.table, folder / "gases" / "mix.csv"));
  EXPECT_DOUBLE_EQ(c.gas.pressure_Pa, 4e5);
  fs::remove_all(folder);

  const Case sf6 = parse_case("hvstress: 1\nelectrodes: {a: {potential: 1 kV}}\n"
                              "shapes: [{circle: {center: [0, 1], radius: 0.1}, electrode: a}]\n"
                              "gas: {name: SF6}\n",
                              "g.yaml");
  EXPECT_EQ(sf6.gas.name, "sf6");
  EXPECT_EQ(sf6.gas.model, "");
}

TEST(CaseReader, DocumentationExampleParses) {
  // The first YAML block of docs/case-file.md: a sphere of radius 25 mm whose bottom is one gap
  // (2 radii) above the plane.
  std::ifstream doc(std::string(HV_SOURCE_DIR) + "/docs/case-file.md");
  std::stringstream text;
  text << doc.rdbuf();
  const std::string markdown = text.str();
  const std::size_t start = markdown.find("```yaml\n");
  ASSERT_NE(start, std::string::npos);
  const std::size_t body = start + 8;
  const Case c = parse_case(markdown.substr(body, markdown.find("```", body) - body), "docs/case-file.md");
  const auto& ball = std::get<CircleShape>(c.geometry.shapes[0].outline);
  EXPECT_DOUBLE_EQ(ball.center.z, 0.075);
  EXPECT_DOUBLE_EQ(ball.radius, 0.025);
  EXPECT_DOUBLE_EQ(c.geometry.electrodes[0].potential_V, 1e5);
  EXPECT_DOUBLE_EQ(c.gas.pressure_Pa, 1e5);
  EXPECT_DOUBLE_EQ(c.onset.required_margin, 1.2);
}

TEST(CaseReader, MissingFileIsAnInputError) {
  try {
    read_case("/nonexistent/folder/case.yaml");
    FAIL() << "no error";
  } catch (const InputError& error) {
    EXPECT_EQ(error.where().file, "/nonexistent/folder/case.yaml");
    EXPECT_EQ(error.problem(), "cannot read the case file");
  }
}

}  // namespace
}  // namespace hv
