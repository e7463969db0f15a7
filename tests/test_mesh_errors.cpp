// The mesher's input checks: every kind of bad geometry is an InputError that names the shape and
// its place in the case file.
#include <gtest/gtest.h>

#include "mesh/meshing.h"
#include "test_mesh_cases.h"

namespace hv {
namespace {

using namespace hv::test;

// Expects check_geometry(spec) to throw an InputError whose message contains every one of `words`.
void expect_input_error(const GeometrySpec& spec, const std::vector<std::string>& words) {
  try {
    check_geometry(spec);
    ADD_FAILURE() << "no InputError; expected one mentioning " << words.front();
  } catch (const InputError& error) {
    const std::string message = error.what();
    for (const std::string& word : words) EXPECT_NE(message.find(word), std::string::npos) << message;
    EXPECT_NE(message.find("case.yaml:10"), std::string::npos) << message;
  }
}

GeometrySpec two_electrodes(decltype(ShapeSpec::outline) first, decltype(ShapeSpec::outline) second) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.electrodes = {fixed_electrode("hv", 1.0), fixed_electrode("earth", 0.0)};
  spec.shapes = {electrode_shape("upper", std::move(first), "hv"),
                 electrode_shape("lower", std::move(second), "earth")};
  return spec;
}

TEST(GeometryErrors, TouchingElectrodesOfDifferentPotential) {
  expect_input_error(two_electrodes(RectShape{0, 0.1, 0.0, 0.1, 0}, RectShape{0, 0.1, -0.1, 0.0, 0}),
                     {"touches", "upper", "lower"});
  // Touching at one point only (corner to corner) is touching too.
  expect_input_error(two_electrodes(RectShape{0.1, 0.2, 0.0, 0.1, 0}, RectShape{0.2, 0.3, -0.1, 0.0, 0}),
                     {"touches", "upper", "lower"});
}

TEST(GeometryErrors, TouchingIsFineAtEqualPotential) {
  GeometrySpec spec = two_electrodes(RectShape{0, 0.1, 0.0, 0.1, 0}, RectShape{0, 0.1, -0.1, 0.0, 0});
  spec.electrodes[1].potential_V = 1.0;
  EXPECT_NO_THROW(check_geometry(spec));
}

TEST(GeometryErrors, FloatingElectrodeTouchingAnother) {
  GeometrySpec spec = two_electrodes(RectShape{0, 0.1, 0.0, 0.1, 0}, RectShape{0, 0.1, -0.1, 0.0, 0});
  spec.electrodes[1].floating = true;
  expect_input_error(spec, {"touches"});
}

TEST(GeometryErrors, OverlappingElectrodesOfDifferentPotential) {
  expect_input_error(two_electrodes(CircleShape{{0, 0.0}, 0.1}, CircleShape{{0, 0.15}, 0.1}),
                     {"overlaps", "upper", "lower"});
}

TEST(GeometryErrors, OpenPathElectrode) {
  GeometrySpec spec = sphere_in_box(0.1);
  PathShape path;
  path.start = {0.05, 0.0};
  path.segments = {{PathSegment::Kind::Line, {0.1, 0.0}, 0}, {PathSegment::Kind::Line, {0.1, 0.1}, 0}};
  spec.shapes = {electrode_shape("hook", path, "hv")};
  expect_input_error(spec, {"not closed", "hook"});
}

TEST(GeometryErrors, ElectrodeOutsideTheDomain) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.shapes = {electrode_shape("ball", CircleShape{{0.45, 0.0}, 0.1}, "hv")};  // crosses r_max = 0.5
  expect_input_error(spec, {"outside the domain", "ball"});
  spec.domain.outer = DomainSpec::Outer::Open;
  spec.domain.radius = 0.3;
  // Open centre at the model's z centre 0.25: both balls reach 0.35 from it.
  spec.shapes = {electrode_shape("ball", CircleShape{{0, 0.0}, 0.1}, "hv"),
                 electrode_shape("top ball", CircleShape{{0, 0.5}, 0.1}, "hv")};
  expect_input_error(spec, {"outside the domain", "ball", "domain.radius"});
}

TEST(GeometryErrors, ElectrodeTouchingABoxSideOfAnotherElectrode) {
  GeometrySpec spec = two_electrodes(RectShape{0, 0.1, 0.4, 0.5, 0}, CircleShape{{0, -0.3}, 0.05});
  spec.domain.top.electrode = "earth";
  expect_input_error(spec, {"touches the top", "upper"});
  spec.domain.top.electrode = "hv";
  EXPECT_NO_THROW(check_geometry(spec));
}

TEST(GeometryErrors, GroundPlaneCuttingAnElectrode) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.ground_plane.present = true;
  spec.ground_plane.z = -0.05;  // through the sphere
  spec.domain.outer = DomainSpec::Outer::Open;
  expect_input_error(spec, {"ground plane", "ball"});
}

TEST(GeometryErrors, GroundPlaneTouchingALiveElectrode) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.ground_plane.present = true;
  spec.ground_plane.z = 0.0;
  spec.domain.outer = DomainSpec::Outer::Open;
  spec.shapes = {electrode_shape("plinth", RectShape{0, 0.1, 0.0, 0.1, 0.01}, "hv")};
  expect_input_error(spec, {"ground_plane", "plinth", "not 0 V"});
  spec.electrodes[0].potential_V = 0.0;
  EXPECT_NO_THROW(check_geometry(spec));
}

TEST(GeometryErrors, RoundTooBigForAnEdge) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.shapes = {electrode_shape("stem", RectShape{0, 0.05, -0.1, 0.1, 0.06}, "hv")};
  expect_input_error(spec, {"does not fit", "stem", "largest corner radius that fits this edge is 0.05"});
  spec.shapes = {electrode_shape("plate", PolygonShape{{{0.1, 0}, {0.2, 0}, {0.2, 0.01}, {0.1, 0.01}}, 0.006}, "hv")};
  expect_input_error(spec, {"does not fit", "plate", "0.005"});
}

TEST(GeometryErrors, ArcRadiusSmallerThanHalfTheChord) {
  GeometrySpec spec = sphere_in_box(0.1);
  PathShape path;
  path.start = {0, 0.1};
  path.segments = {{PathSegment::Kind::Line, {0.05, 0.1}, 0},
                   {PathSegment::Kind::Arc, {0.05, 0.0}, 0.049},  // chord 0.1: needs |radius| >= 0.05
                   {PathSegment::Kind::Line, {0, 0.0}, 0}};
  spec.shapes = {electrode_shape("cap", path, "hv")};
  expect_input_error(spec, {"half its chord", "cap"});
}

TEST(GeometryErrors, NonPositiveSizes) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.shapes = {electrode_shape("ball", CircleShape{{0, 0.0}, 0.0}, "hv")};
  expect_input_error(spec, {"radius", "ball"});
  spec = sphere_in_box(0.1);
  spec.shapes = {electrode_shape("slab", RectShape{0, 0.1, 0.1, 0.1, 0}, "hv")};
  expect_input_error(spec, {"z1 > z0", "slab"});
  spec = sphere_in_box(0.1);
  spec.mesh.growth = 1.0;
  spec.mesh.where = {"case.yaml", 10, 3, "mesh.growth"};
  expect_input_error(spec, {"growth"});
}

TEST(GeometryErrors, UnknownElectrodeOrMaterial) {
  GeometrySpec spec = sphere_in_box(0.1);
  spec.shapes.front().electrode = "hvv";
  expect_input_error(spec, {"no electrode 'hvv'", "ball"});
  spec.shapes.front() = dielectric_shape("ball", CircleShape{{0, 0.0}, 0.1}, "glass");
  expect_input_error(spec, {"no material 'glass'", "ball"});
}

}  // namespace
}  // namespace hv
