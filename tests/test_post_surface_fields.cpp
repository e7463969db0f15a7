// Recovered surface fields (consistent boundary flux) against closed-form fields: coaxial cylinders,
// a two-layer dielectric, concentric spheres (the axis pole), and a uniform field across a plate gap
// with two dielectrics side by side.
#include <cmath>

#include <gtest/gtest.h>

#include "postproc/surface_fields.h"
#include "solver/elements.h"
#include "solver/field_solver.h"
#include "structured_mesh.h"

namespace hv {
namespace {

Eigen::VectorXd potential(const Mesh& mesh, std::vector<Conductor> conductors) {
  FieldProblem problem;
  problem.mesh = &mesh;
  problem.conductors = std::move(conductors);
  return solve_field(problem).potential;
}

// The field of `name` seen from `region`; fails the test if there is none.
const SurfaceField& field_named(const std::vector<SurfaceField>& fields, const std::string& name, int region) {
  for (const SurfaceField& f : fields)
    if (f.name == name && f.region == region) return f;
  ADD_FAILURE() << "no surface field " << name << " seen from region " << region;
  return fields.front();
}

// Worst |E_n / exact - 1| over every sample of a field.
double worst_normal_error(const SurfaceField& field, double exact) {
  double worst = 0;
  for (const auto& contour : field.contours)
    for (const SurfaceSample& s : contour) worst = std::max(worst, std::abs(s.E_n / exact - 1));
  return worst;
}

// Coaxial cylinders: E(r) = V / (r ln(b/a)), radially outward for V > 0 on the inner one (Jackson,
// Classical Electrodynamics, 3rd ed.; any electrostatics text).
constexpr double kVolts = 1000.0;
double coax_field(const test::CoaxSpec& c, double r) { return kVolts / (r * std::log(c.b / c.a)); }

double inner_electrode_error(int order, int nr, int nz) {
  test::CoaxSpec coax;
  coax.order = order, coax.nr = nr, coax.nz = nz;
  const Mesh mesh = test::coax_mesh(coax);
  const auto fields = surface_fields(mesh, potential(mesh, {{"inner", false, kVolts}, {"outer", false, 0.0}}));
  return worst_normal_error(field_named(fields, "inner", 0), coax_field(coax, coax.a));
}

TEST(SurfaceField, CoaxialElectrodesCarryTheAnalyticField) {
  // h = a/16 at the inner electrode.
  test::CoaxSpec coax;
  coax.nr = 32, coax.nz = 4;
  const Mesh mesh = test::coax_mesh(coax);
  const auto fields = surface_fields(mesh, potential(mesh, {{"inner", false, kVolts}, {"outer", false, 0.0}}));
  ASSERT_EQ(fields.size(), 2u);
  const SurfaceField& inner = field_named(fields, "inner", 0);
  const SurfaceField& outer = field_named(fields, "outer", 0);
  EXPECT_EQ(inner.conductor, 0);
  EXPECT_EQ(outer.conductor, 1);
  // Away from the conductor: outward at the inner one, inward (negative) at the outer one.
  EXPECT_LT(worst_normal_error(inner, coax_field(coax, coax.a)), 3e-4);   // measured 1.1e-6 (smoothing flux: 1.6e-4)
  EXPECT_LT(worst_normal_error(outer, -coax_field(coax, coax.b)), 1e-4);  // measured 3.0e-7 (smoothing flux: 2.1e-5)
  for (const SurfaceField* f : {&inner, &outer})
    for (const SurfaceSample& s : f->contours.at(0)) {
      EXPECT_NEAR(s.sigma, kEpsilon0 * s.E_n, 1e-12 * std::abs(s.sigma));  // sigma = D_n = eps0 E_n
      EXPECT_NEAR(s.E_t, 0.0, 1e-9 * s.E_abs);                             // a conductor is equipotential
      EXPECT_NEAR(s.E_abs, std::abs(s.E_n), 1e-9 * s.E_abs);
    }
  // One sample per node, arc length along the side (L long), 2 nz edges of 3 nodes.
  const auto& samples = inner.contours.at(0);
  ASSERT_EQ(samples.size(), 2u * static_cast<size_t>(coax.nz) + 1);
  EXPECT_NEAR(samples.back().s, coax.L, 1e-15);
  EXPECT_NEAR(samples[1].s, coax.L / (2 * coax.nz), 1e-15);
}

TEST(SurfaceField, P2BeatsP1AtEqualUnknowns) {
  // Same node grid (33 x 5): P1 with twice the cells in each direction.
  const double p1 = inner_electrode_error(1, 32, 4), p2 = inner_electrode_error(2, 16, 2);
  EXPECT_LT(10 * p2, p1);  // measured 6.3e-5 against 4.1e-3
}

TEST(SurfaceField, P2ErrorFallsAtLeastThreefoldWhenTheMeshSizeHalves) {
  const double coarse = inner_electrode_error(2, 8, 2), fine = inner_electrode_error(2, 16, 4);
  EXPECT_GT(coarse / fine, 3.0);  // measured 4.8e-4 -> 9.0e-6 (smoothing flux: 2.8e-3 -> 7.9e-4)
}

TEST(SurfaceField, TwoLayerInterfaceSidesFollowTheSeriesFormula) {
  // D = eps0 V / (r S), S = ln(c/a)/eps1 + ln(b/c)/eps2, continuous across r = c; E_i = D/(eps0 eps_i).
  test::CoaxSpec coax;
  coax.nr = 16;
  const double c = 0.015, eps1 = 4.4, eps2 = 1.0;
  coax.layers = {c};
  coax.eps = {eps1, eps2};
  const Mesh mesh = test::coax_mesh(coax);
  const auto fields = surface_fields(mesh, potential(mesh, {{"inner", false, kVolts}, {"outer", false, 0.0}}));
  const double S = std::log(c / coax.a) / eps1 + std::log(coax.b / c) / eps2;
  // Seen from the inner layer the normal points inward (-r), from the outer layer outward (+r).
  const SurfaceField& side1 = field_named(fields, "layer0|layer1", 0);
  const SurfaceField& side2 = field_named(fields, "layer1|layer0", 1);
  EXPECT_EQ(side1.kind, BoundaryKind::Interface);
  EXPECT_EQ(side1.conductor, -1);
  EXPECT_LT(worst_normal_error(side1, -kVolts / (c * S * eps1)), 5e-4);  // measured 1.8e-5
  EXPECT_LT(worst_normal_error(side2, kVolts / (c * S * eps2)), 5e-4);
  for (size_t k = 0; k < side1.contours[0].size(); ++k) {
    EXPECT_NEAR(eps1 * side1.contours[0][k].E_n, -eps2 * side2.contours[0][k].E_n, 1e-6 * eps2 * side2.contours[0][k].E_n);
    EXPECT_EQ(side1.contours[0][k].sigma, 0.0);  // no free charge on an interface
  }
  EXPECT_LT(worst_normal_error(field_named(fields, "inner", 0), kVolts / (coax.a * S * eps1)), 1e-3);  // 6.7e-5
}

TEST(SurfaceField, SpherePoleOnTheAxisIsAccurate) {
  // Concentric spheres: E(a) = V / (a^2 (1/a - 1/b)) everywhere on the inner sphere, including its
  // poles on the axis where the surface weight 2 pi r vanishes (Jackson, 3rd ed., section 1.13).
  const double a = 0.05, b = 0.2;
  const Mesh mesh = test::shell_mesh(2, a, b, 16, 48, BoundaryKind::Electrode);
  const auto fields = surface_fields(mesh, potential(mesh, {{"sphere", false, kVolts}, {"shell", false, 0.0}}));
  const double exact = kVolts / (a * a * (1 / a - 1 / b));
  const auto& samples = field_named(fields, "sphere", 0).contours.at(0);
  ASSERT_EQ(samples.size(), 2u * 48 + 1);
  EXPECT_EQ(samples.front().at.r, 0.0);
  EXPECT_EQ(samples.back().at.r, 0.0);
  const double pole = std::abs(samples.front().E_n / exact - 1), equator = std::abs(samples[48].E_n / exact - 1);
  const double other_pole = std::abs(samples.back().E_n / exact - 1);
  EXPECT_LT(equator, 1e-4);     // measured 1.7e-5 (h = 0.375 a radially)
  EXPECT_LT(pole, 1e-3);        // measured 3.7e-4
  EXPECT_LT(other_pole, 1e-3);  // measured 3.4e-4
  EXPECT_NEAR(samples.back().s, kPi * a, 1e-6 * a);  // half a great circle
}

// A plate gap r < R, 0 < z < L: grounded bottom (conductor 0), top at V (conductor 1), symmetric
// right side; gas for r < c, a dielectric for r > c. The field is uniform, E = (0, -V/L), which P1 and
// P2 represent exactly, so every recovered value must be exact to round-off, also where the
// interface meets the plates.
TEST(SurfaceField, UniformGapFieldIsExactOnPlatesInterfaceAndJunctions) {
  const double R = 0.1, L = 0.02, c = 0.04, eps2 = 3.0;
  for (int order : {1, 2}) {
    test::GridSpec spec;
    spec.order = order;
    spec.u = test::join(test::lines(0, c, 2), test::lines(c, R, 3));
    spec.v = test::lines(0, L, 2);
    spec.regions = {{"gas", 1.0, true}, {"resin", eps2, false}};
    spec.cell_region = [](int i, int) { return i < 2 ? 0 : 1; };
    const Mesh mesh = test::grid_mesh(spec, {
        {BoundaryKind::Electrode, "bottom", 0, 0, -1, {{{0, 0}, {5, 0}}}},
        {BoundaryKind::Electrode, "top", 1, 0, -1, {{{0, 2}, {5, 2}}}},
        {BoundaryKind::Interface, "gas|resin", -1, 0, 1, {{{2, 0}, {2, 2}}}},
        {BoundaryKind::Axis, "axis", -1, -1, -1, {{{0, 0}, {0, 2}}}},
        {BoundaryKind::Symmetry, "right", -1, -1, -1, {{{5, 0}, {5, 2}}}},
    });
    const auto fields = surface_fields(mesh, potential(mesh, {{"bottom", false, 0.0}, {"top", false, kVolts}}));
    ASSERT_EQ(fields.size(), 6u);  // each plate and the interface, seen from both regions
    const double E = kVolts / L;
    for (int region : {0, 1}) {
      const double eps = region == 0 ? 1.0 : eps2;
      // Out of the plate into the gap: +z at the bottom (E_n = -E), -z at the top (E_n = +E).
      for (const auto& [plate, E_n] : {std::pair<std::string, double>{"bottom", -E}, {"top", E}})
        for (const SurfaceSample& s : field_named(fields, plate, region).contours.at(0)) {
          EXPECT_NEAR(s.E_n, E_n, 1e-9 * E) << plate << " at r = " << s.at.r;
          EXPECT_NEAR(s.sigma, kEpsilon0 * eps * E_n, 1e-9 * kEpsilon0 * eps * E);
        }
      // The interface runs upward: E_t = -du/dz = -E, no normal component.
      const std::string name = region == 0 ? "gas|resin" : "resin|gas";
      for (const SurfaceSample& s : field_named(fields, name, region).contours.at(0)) {
        EXPECT_NEAR(s.E_t, -E, 1e-9 * E);
        EXPECT_NEAR(s.E_n, 0.0, 1e-9 * E);
        EXPECT_NEAR(s.E_abs, E, 1e-9 * E);
      }
    }
    // The gas stretch of a plate is r in [0, c]: arc length c, starting on the axis.
    const auto& gas_bottom = field_named(fields, "bottom", 0).contours.at(0);
    EXPECT_NEAR(gas_bottom.back().s, c, 1e-15);
    EXPECT_NEAR(gas_bottom.back().at.r, c, 1e-15);

    for (const auto& E_node : nodal_field(mesh, potential(mesh, {{"bottom", false, 0.0}, {"top", false, kVolts}}))) {
      EXPECT_NEAR(E_node[0], 0.0, 1e-9 * E);
      EXPECT_NEAR(E_node[1], -E, 1e-9 * E);
    }
  }
}

TEST(NodalField, ApproachesTheCoaxialFieldInside) {
  // Averaged element gradients at nodes: first-order accurate at worst, so a loose check.
  test::CoaxSpec coax;
  coax.nr = 16;
  const Mesh mesh = test::coax_mesh(coax);
  const auto E = nodal_field(mesh, potential(mesh, {{"inner", false, kVolts}, {"outer", false, 0.0}}));
  for (int k = 0; k < mesh.n_nodes(); ++k) {
    const Point& p = mesh.nodes[static_cast<size_t>(k)];
    EXPECT_NEAR(E[static_cast<size_t>(k)][0], coax_field(coax, p.r), 5e-3 * coax_field(coax, p.r)) << p.r;
    EXPECT_NEAR(E[static_cast<size_t>(k)][1], 0.0, 5e-3 * coax_field(coax, p.r));
  }
}

}  // namespace
}  // namespace hv
