// The onset evaluation with the real gas models on solved structured meshes, against the empirical
// laws of physics.md ("Empirical laws for checks"): uniform-field breakdown of air, Peek's coaxial
// and spherical onset fields, and the uniform-field breakdown of SF6.
#include <cmath>

#include <gtest/gtest.h>

#include "test_post_onset_fixture.h"

namespace hv {
namespace {

constexpr double kSolvedVolts = 10e3;

TEST(OnsetLaws, UniformGapBreakdownOfAirFollowsSchumannForm) {
  // U_b = 24.36 (delta d) + 6.72 sqrt(delta d) kV, d in cm (Schumann form as given by Kuffel, Zaengl &
  // Kuffel, High Voltage Engineering: Fundamentals, 2000, and Dakin et al., Electra 32, 1974;
  // recalled from memory). physics.md expects the streamer integral with K = 9.15 within 5 %.
  for (double d_cm : {0.2, 0.5, 1.0, 2.0, 5.0}) {
    test::SolvedDesign gap = test::solve_design(test::plate_gap_mesh(d_cm / 100, 0.2 * d_cm / 100, 2, 4),
                                                {{"plate", false, kSolvedVolts}, {"earth", false, 0.0}});
    for (double delta : {1.0, 0.8}) {
      const GasModel air = test::gas_at_density("air", delta);
      const OnsetResult onset = test::evaluate(gap, air);
      const double dd = air.relative_density() * d_cm;
      const double law_V = (24.36 * dd + 6.72 * std::sqrt(dd)) * 1e3;
      EXPECT_NEAR(onset.inception_V / law_V, 1.0, 0.05) << "d = " << d_cm << " cm, delta = " << delta;
    }
  }
}

TEST(OnsetLaws, CoaxialOnsetFieldFollowsPeek) {
  // E_c = 31 delta (1 + 0.308 / sqrt(delta r)) kV/cm, r in cm (Peek, Dielectric Phenomena in
  // High-Voltage Engineering, 1929, as given by Kuffel, Zaengl & Kuffel; recalled from memory).
  // physics.md finds the streamer integral within -3..+5 % of it: 6 % at delta = 1; 8 % at 0.8,
  // where Peek's density scaling is itself an approximation.
  for (double a_mm : {0.5, 1.0, 2.5, 5.0, 10.0, 25.0}) {
    test::CoaxSpec coax;
    coax.a = a_mm / 1000, coax.b = 4 * coax.a, coax.L = 0.5 * coax.a, coax.nr = 48, coax.nz = 2;
    test::SolvedDesign design = test::solve_design(test::coax_mesh(coax), {{"inner", false, kSolvedVolts}, {"outer", false, 0.0}});
    for (double delta : {1.0, 0.8}) {
      const GasModel air = test::gas_at_density("air", delta);
      const OnsetResult onset = test::evaluate(design, air);
      ASSERT_EQ(onset.electrode, "inner");
      // Surface field at the inception voltage: E(a) = U / (a ln(b/a)).
      const double onset_field = onset.inception_V / (coax.a * std::log(coax.b / coax.a));
      const double dr = air.relative_density() * a_mm / 10;
      const double peek = 31e5 * air.relative_density() * (1 + 0.308 / std::sqrt(dr));
      EXPECT_NEAR(onset_field / peek, 1.0, delta == 1.0 ? 0.06 : 0.08) << "a = " << a_mm << " mm, delta = " << delta;
    }
  }
}

TEST(OnsetLaws, SphereOnsetFieldFollowsPeekWithinFifteenPercent) {
  // E_c = 27.2 delta (1 + 0.54 / sqrt(delta R)) kV/cm, R in cm (Peek 1929, as given by Kuffel, Zaengl
  // & Kuffel; recalled from memory). physics.md finds the streamer integral 8-12 % above it: Peek's
  // sphere law comes from a different discharge regime, so the test allows 15 %.
  for (double R_cm : {0.5, 1.0, 2.5}) {
    const double a = R_cm / 100, b = 4 * a;
    test::SolvedDesign design = test::solve_design(test::shell_mesh(2, a, b, 32, 24, BoundaryKind::Electrode),
                                                   {{"sphere", false, kSolvedVolts}, {"shell", false, 0.0}});
    const GasModel air = test::gas_at_density("air", 1.0);
    const OnsetResult onset = test::evaluate(design, air);
    // Concentric spheres: E(a) = U b / (a (b - a)) (Jackson, Classical Electrodynamics, 3rd ed., 1.13).
    const double onset_field = onset.inception_V * b / (a * (b - a));
    const double peek = 27.2e5 * (1 + 0.54 / std::sqrt(R_cm));
    EXPECT_NEAR(onset_field / peek, 1.0, 0.15) << "R = " << R_cm << " cm";
  }
}

TEST(OnsetLaws, UniformGapBreakdownOfSf6IsCriticalFieldPlusKOverSlope) {
  // alpha_eff = k p (E/p - (E/p)_cr) with k = 27.7 /kV and (E/p)_cr = 88.8 kV/(cm bar) (Kuffel,
  // Zaengl & Kuffel; recalled from memory); alpha_eff d = K = 10.5 gives U_b = (E/p)_cr p d + K / k
  // exactly (physics.md [calc]). At 293 K the 20 degC-equivalent pressure is the pressure itself.
  for (const auto& [bar, d_cm] : {std::pair{1.0, 1.0}, std::pair{4.0, 0.5}}) {
    test::SolvedDesign gap = test::solve_design(test::plate_gap_mesh(d_cm / 100, 0.2 * d_cm / 100, 2, 4),
                                                {{"plate", false, kSolvedVolts}, {"earth", false, 0.0}});
    GasSpec spec;
    spec.name = "sf6", spec.pressure_Pa = bar * 1e5, spec.temperature_K = 293.0;
    const OnsetResult onset = test::evaluate(gap, GasModel::from_spec(spec));
    const double law_V = (88.8 * bar * d_cm + 10.5 / 27.7) * 1e3;
    EXPECT_NEAR(onset.inception_V / law_V, 1.0, 0.02) << bar << " bar";
    EXPECT_TRUE(onset.warnings.empty());  // E/p stays near the critical value, inside the fit's range
  }
}

}  // namespace
}  // namespace hv
