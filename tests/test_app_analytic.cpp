// The whole pipeline (case file -> mesh -> P2 solve -> recovered surface fields) against closed-form
// electrostatics, on the bundled analytic cases at their default mesh settings.
#include <gtest/gtest.h>

#include <cmath>

#include "app_fixture.h"
#include "solver/elements.h"

namespace hv {
namespace {

using testing::bundled_case;
using testing::worst_relative_error;

std::unique_ptr<RunOutcome> run(const Case& the_case) { return compute_case(the_case); }

int region_index(const Mesh& mesh, const std::string& name) {
  for (size_t i = 0; i < mesh.regions.size(); ++i) {
    if (mesh.regions[i].name == name) return static_cast<int>(i);
  }
  return -1;
}

// Isolated sphere of radius R at potential U: E = U / R on the surface and C = 4 pi eps0 R
// (Gauss's law; any electrostatics text, e.g. Jackson, Classical Electrodynamics, 3rd ed., sec. 1.11).
TEST(IsolatedSphere, SurfaceFieldAndCapacitanceMatchClosedForm) {
  const Case the_case = read_case(bundled_case("sphere-isolated.yaml"));
  const auto outcome = run(the_case);
  const double U = 100e3, R = 0.05;
  EXPECT_LT(worst_relative_error(outcome->results, "sphere", [&](const SurfaceSample&) { return U / R; }), 2e-3);
  const double C = 4 * kPi * kEpsilon0 * R;
  EXPECT_NEAR(outcome->results.capacitance_F(0, 0), C, 2e-3 * C);
}

// The far-field condition makes the result independent of where the domain is cut off: doubling the
// truncation radius must not move the field beyond the 0.2 % tolerance (methods.md, open boundary).
TEST(IsolatedSphere, TruncationRadiusDoesNotMatter) {
  Case the_case = read_case(bundled_case("sphere-isolated.yaml"));
  const double near_field = run(the_case)->results.max_field_V_per_m;
  the_case.geometry.domain.radius *= 2.0;
  const double far_field = run(the_case)->results.max_field_V_per_m;
  EXPECT_NEAR(far_field, near_field, 2e-3 * near_field);
}

// Concentric spheres a < b: E(a) = U b / (a (b - a)) (spherical capacitor, e.g. Jackson sec. 1.11).
TEST(ConcentricSpheres, InnerSurfaceFieldMatchesClosedForm) {
  const auto outcome = run(read_case(bundled_case("concentric-spheres.yaml")));
  const double U = 100e3, a = 0.05, b = 0.15;
  const double expected = U * b / (a * (b - a));
  EXPECT_LT(worst_relative_error(outcome->results, "inner", [&](const SurfaceSample&) { return expected; }), 1e-3);
}

// Coaxial cylinders: E(r) = U / (r ln(b/a)) (cylindrical capacitor, e.g. Jackson sec. 1.11).
double coaxial_error(const RunResults& results, double a, double b) {
  const double U = 100e3;
  return worst_relative_error(results, "inner", [&](const SurfaceSample&) { return U / (a * std::log(b / a)); });
}

TEST(Coaxial, SurfaceFieldOnBothConductorsMatchesClosedForm) {
  const auto outcome = run(read_case(bundled_case("coaxial.yaml")));
  const double U = 100e3, a = 0.02, b = 0.1;
  EXPECT_LT(coaxial_error(outcome->results, a, b), 1e-3);
  EXPECT_LT(worst_relative_error(outcome->results, "outer",
                                 [&](const SurfaceSample&) { return U / (b * std::log(b / a)); }),
            1e-3);
}

// Halving the element size must cut the P2 surface-field error by at least 3x (second order or better;
// observed order as in Roache, Verification and Validation in Computational Science and Engineering).
TEST(Coaxial, P2ErrorFallsAtLeastThreefoldPerHalving) {
  Case the_case = read_case(bundled_case("coaxial.yaml"));
  const double a = 0.02, b = 0.1;
  auto error_at = [&](double h) {
    the_case.geometry.mesh.surface_size = h;
    the_case.geometry.mesh.max_size = h;
    return coaxial_error(run(the_case)->results, a, b);
  };
  const double coarse = error_at(0.02), fine = error_at(0.01);
  EXPECT_GT(coarse / fine, 3.0) << "coarse " << coarse << ", fine " << fine;
}

// At (nearly) equal numbers of unknowns, curved P2 elements beat P1 elements: P2 at size h has about
// as many nodes as P1 at size h/2 (common practice for comparing element orders).
TEST(Coaxial, P2BeatsP1AtEqualUnknowns) {
  Case the_case = read_case(bundled_case("coaxial.yaml"));
  const double a = 0.02, b = 0.1;
  auto run_with = [&](int order, double h) {
    the_case.geometry.mesh.order = order;
    the_case.geometry.mesh.surface_size = h;
    the_case.geometry.mesh.max_size = h;
    return run(the_case);
  };
  const auto p2 = run_with(2, 0.01);
  const auto p1 = run_with(1, 0.005);
  EXPECT_LT(std::abs(p2->results.solve_report.dofs - p1->results.solve_report.dofs),
            0.3 * p2->results.solve_report.dofs);
  EXPECT_LT(coaxial_error(p2->results, a, b), coaxial_error(p1->results, a, b));
}

// Two dielectric layers in series: D = Q / (2 pi r) is continuous, E = D / (eps0 eps_r) in each
// (Gauss's law with dielectrics, e.g. Jackson sec. 4.4). At the interface r = c: E_gas = eps_r E_epoxy.
TEST(CoaxialTwoLayer, FieldOnBothSidesOfTheInterfaceMatchesClosedForm) {
  const auto outcome = run(read_case(bundled_case("coaxial-two-layer.yaml")));
  const double U = 100e3, a = 0.02, c = 0.04, b = 0.1, eps = 4.0;
  const double D_over_eps0_times_r = U / (std::log(c / a) / eps + std::log(b / c));  // E_gas * r
  const Mesh& mesh = *outcome->results.mesh;
  const int gas = region_index(mesh, "gas"), epoxy = region_index(mesh, "epoxy");
  ASSERT_GE(gas, 0);
  ASSERT_GE(epoxy, 0);
  int sides_checked = 0;
  for (const SurfaceField& surface : outcome->results.surfaces) {
    if (surface.kind != BoundaryKind::Interface) continue;
    const double expected = surface.region == gas ? D_over_eps0_times_r / c : D_over_eps0_times_r / (eps * c);
    for (const auto& contour : surface.contours) {
      for (const SurfaceSample& sample : contour) {
        EXPECT_NEAR(sample.E_abs, expected, 2e-3 * expected) << "region " << surface.region << " at z " << sample.at.z;
      }
    }
    ++sides_checked;
  }
  EXPECT_EQ(sides_checked, 2);
  EXPECT_LT(worst_relative_error(outcome->results, "inner",
                                 [&](const SurfaceSample&) { return D_over_eps0_times_r / (eps * a); }),
            2e-3);
}

// A floating tube between coaxial conductors: two cylindrical capacitors in series, so
// U_float = U ln(b/t2) / (ln(t1/a) + ln(b/t2)) (charge neutrality of the isolated tube).
TEST(CoaxialFloating, FloatingTubeTakesItsAnalyticPotential) {
  const auto outcome = run(read_case(bundled_case("coaxial-floating.yaml")));
  const double U = 100e3, a = 0.02, t1 = 0.04, t2 = 0.06, b = 0.1;
  const double expected = U * std::log(b / t2) / (std::log(t1 / a) + std::log(b / t2));
  ASSERT_EQ(outcome->results.electrodes.size(), 3u);
  EXPECT_NEAR(outcome->results.electrodes[1].potential_V, expected, 1e-3 * expected);
  EXPECT_NEAR(outcome->results.electrodes[1].charge_C, 0.0, 1e-9 * std::abs(outcome->results.electrodes[0].charge_C));
}

// Sphere (radius R, potential U) with its centre at height h above a grounded plane: the method of
// images gives an infinite series of point charges (Jackson, Classical Electrodynamics, 3rd ed.,
// sec. 2.2 for the sphere image; repeated imaging in the sphere and the plane). Charge q_0 = 4 pi eps0
// R U at the centre; each image -q_n at the mirror point below the plane is compensated inside the
// sphere by q_{n+1} = q_n R / (2h - d_n) at distance d_{n+1} = R^2 / (2h - d_n) below the centre.
// The field is highest at the sphere's lowest point.
double sphere_above_plane_max_field(double U, double R, double h) {
  double q = 1.0, d = 0.0, sum = 0.0;  // q in units of q_0
  for (int n = 0; n < 200; ++n) {
    sum += q * (1.0 / ((R - d) * (R - d)) + 1.0 / ((2 * h - R - d) * (2 * h - R - d)));
    const double next_q = q * R / (2 * h - d);
    d = R * R / (2 * h - d);
    q = next_q;
  }
  return U * R * sum;  // q_0 / (4 pi eps0) = U R
}

TEST(SphereAbovePlane, MaximumFieldMatchesImageSeries) {
  const auto outcome = run(read_case(bundled_case("sphere-above-plane.yaml")));
  const double U = 100e3, R = 0.05, h = 0.1;
  const double expected = sphere_above_plane_max_field(U, R, h);
  EXPECT_NEAR(outcome->results.max_field_V_per_m, expected, 3e-3 * expected);
  EXPECT_NEAR(outcome->results.max_field_at.r, 0.0, 1e-3 * R);
  EXPECT_NEAR(outcome->results.max_field_at.z, h - R, 1e-3 * R);
}

// The field varies along the sphere's surface (it is highest at the pole on the axis), so smoothing
// the surface flux over an element would err by O(h^2) whatever the element order; the recovery fits a
// local polynomial instead (postproc/surface_fields.cpp), and cubic elements then converge at their
// own order or better. Measured errors at the pole against the image series: P3 2.7e-4, 1.8e-5, 1.4e-6
// at surface sizes 4, 2, 1 mm (15x and 13x per halving; the smoothing recovery gave 1.0e-3, 2.6e-4,
// 6.4e-5, 4x); P2 3.7e-4, 6.4e-5, 4.4e-5.
TEST(SphereAbovePlane, CubicElementsConvergeAtTheirOrderAtThePole) {
  const double U = 100e3, R = 0.05, h = 0.1;
  const double expected = sphere_above_plane_max_field(U, R, h);
  std::vector<double> errors;
  for (double size : {4e-3, 2e-3, 1e-3}) {
    Case the_case = read_case(bundled_case("sphere-above-plane.yaml"));
    the_case.geometry.mesh.order = 3;
    the_case.geometry.mesh.surface_size = size, the_case.geometry.mesh.max_size = 20 * size;
    errors.push_back(std::abs(run(the_case)->results.max_field_V_per_m / expected - 1));
  }
  EXPECT_GT(errors[0] / errors[1], 8.0);  // 2^3 for a cubic rate
  EXPECT_GT(errors[1] / errors[2], 8.0);
  EXPECT_LT(errors[2], 5e-6);
}

// Electrostatics scales exactly: shrinking every length by 1e-3 at the same voltage multiplies fields
// by 1e3 and capacitances by 1e-3 (Laplace's equation has no length scale; common practice).
TEST(SphereAbovePlane, ResultsScaleExactlyWithLength) {
  const auto large = run(read_case(bundled_case("sphere-above-plane.yaml")));
  const auto small = run(read_case(bundled_case("sphere-above-plane.yaml"), {"R=0.05 mm", "height=0.1 mm"}));
  EXPECT_NEAR(small->results.max_field_V_per_m * 1e-3, large->results.max_field_V_per_m,
              1e-9 * large->results.max_field_V_per_m);
  EXPECT_NEAR(small->results.capacitance_F(0, 0) * 1e3, large->results.capacitance_F(0, 0),
              1e-9 * large->results.capacitance_F(0, 0));
  EXPECT_EQ(small->results.solve_report.dofs, large->results.solve_report.dofs);
}

// Gauss's law: a grounded enclosure around everything holds the opposite of the enclosed charge, so
// the charges of all conductors sum to zero.
TEST(GroundedEnclosure, ChargesSumToZero) {
  const Case the_case = parse_case(R"(
hvstress: 1
units: {length: mm, voltage: kV}
electrodes:
  ball: {potential: 50}
  ring: {floating: true}
  enclosure: {potential: 0}
shapes:
  - name: ball
    circle: {center: [0, 100], radius: 30}
    electrode: ball
  - name: ring
    circle: {center: [80, 60], radius: 10}
    electrode: ring
domain: {outer: box, r_max: 200, z: [0, 250], sides: {top: enclosure, right: enclosure, bottom: enclosure}}
)",
                                   "enclosure.yaml");
  const auto outcome = run(the_case);
  double sum = 0.0, scale = 0.0;
  for (const ElectrodeResult& electrode : outcome->results.electrodes) {
    sum += electrode.charge_C;
    scale = std::max(scale, std::abs(electrode.charge_C));
  }
  EXPECT_GT(scale, 0.0);
  EXPECT_NEAR(sum, 0.0, 1e-9 * scale);
}

}  // namespace
}  // namespace hv
