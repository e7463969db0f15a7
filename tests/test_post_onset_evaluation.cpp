// The onset evaluation's bookkeeping on solved structured meshes: settings and their errors, the
// Townsend criterion on the cathode only (closed form of the uniform gap), start points on curved
// surfaces, margins, regions below the required margin, marked surface samples, validity warnings.
#include <cmath>
#include <string>

#include <gtest/gtest.h>

#include "test_post_onset_fixture.h"

namespace hv {
namespace {

constexpr double kSolvedVolts = 10e3;

test::SolvedDesign coax_design(double a, int nz) {
  test::CoaxSpec coax;
  coax.a = a, coax.b = 4 * a, coax.L = 0.5 * a, coax.nr = 48, coax.nz = nz;
  return test::solve_design(test::coax_mesh(coax), {{"inner", false, kSolvedVolts}, {"outer", false, 0.0}});
}

TEST(OnsetSettings, DefaultsComeFromTheGasAndTheSolvedVoltage) {
  // Air: K = 9.15 (Schumann's value, recalled from memory) and gamma = 1e-3 (physics.md).
  const GasModel air = test::gas_at_density("air", 1.0);
  const OnsetSettings defaults = resolve_onset_settings(OnsetSpec{}, air, 5e3);
  EXPECT_EQ(defaults.K, 9.15);
  EXPECT_EQ(defaults.gamma, 1e-3);
  EXPECT_EQ(defaults.operating_V, 5e3);
  EXPECT_EQ(defaults.solved_V, 5e3);
  EXPECT_TRUE(std::isnan(defaults.required_margin));
  OnsetSpec spec;
  spec.K = 18, spec.operating_V = 4e3, spec.required_margin = 1.2;
  const OnsetSettings given = resolve_onset_settings(spec, air, 5e3);
  EXPECT_EQ(given.K, 18.0);
  EXPECT_EQ(given.operating_V, 4e3);
  EXPECT_EQ(given.required_margin, 1.2);
}

TEST(OnsetSettings, BadInputNamesItsPlace) {
  const GasModel air = test::gas_at_density("air", 1.0);
  OnsetSpec spec;
  spec.where = {"case.yaml", 12, 3, "onset"};
  try {
    resolve_onset_settings(spec, air, 0.0);  // nothing drives the field
    FAIL() << "no InputError for an undriven design";
  } catch (const InputError& e) {
    EXPECT_EQ(e.where().line, 12);
    EXPECT_EQ(e.where().key_path, "onset");
  }
  spec.K = -1;
  try {
    resolve_onset_settings(spec, air, 1e3);
    FAIL() << "no InputError for K < 0";
  } catch (const InputError& e) {
    EXPECT_EQ(e.where().key_path, "onset.K");
  }
}

// gamma (alpha / alpha_eff) (exp(alpha_eff d) - 1) = 1 in a uniform field E = U / d, by bisection in U:
// the Townsend generation integral in closed form (physics.md, "Onset criteria").
double townsend_breakdown_V(const GasModel& gas, double gamma, double d) {
  double lo = gas.critical_field() * d, hi = 3 * lo;
  for (int k = 0; k < 200; ++k) {
    const double U = 0.5 * (lo + hi);
    const IonizationCoefficients c = gas.coefficients(U / d);
    (gamma * c.alpha / c.effective() * std::expm1(c.effective() * d) < 1 ? lo : hi) = U;
  }
  return lo;
}

TEST(OnsetTownsend, HoldsOnTheCathodeOfEachPolarity) {
  // The driven plate (E_n > 0 at the solved positive voltage) is the cathode at negative polarity,
  // the earthed plate at positive polarity; the anode's lines report no inception.
  const double d = 0.01;
  test::SolvedDesign gap = test::solve_design(test::plate_gap_mesh(d, 0.2 * d, 2, 4), {{"plate", false, kSolvedVolts}, {"earth", false, 0.0}});
  const GasModel air = test::gas_at_density("air", 1.0);
  const double expected = townsend_breakdown_V(air, 1e-3, d);
  OnsetSpec spec;
  spec.criterion = "townsend";
  for (const std::string polarity : {"negative", "positive", "both"}) {
    spec.polarity = polarity;
    const OnsetResult onset = test::evaluate(gap, air, spec);
    EXPECT_NEAR(onset.inception_V / expected, 1.0, 1e-5) << polarity;
    for (const OnsetStart& start : onset.starts) {
      const std::string cathode_at = start.electrode == "plate" ? "negative" : "positive";
      if (polarity == "both" || polarity == cathode_at) {
        EXPECT_NEAR(start.inception_V / expected, 1.0, 1e-5);
        EXPECT_EQ(start.polarity, cathode_at);
      } else {
        EXPECT_EQ(start.inception_V, kNoInception);
        EXPECT_EQ(start.integral_operating, 0.0);
      }
    }
  }
}

TEST(OnsetEvaluation, StartsLieOnTheCurvedSurfaceInArcLengthOrder) {
  // Concentric spheres (P2, mid nodes on the circle): every start on the inner sphere, |p| = a to the
  // geometric accuracy of the quadratic edge; at least the number asked for; one line per start.
  const double a = 0.01;
  test::SolvedDesign design = test::solve_design(test::shell_mesh(2, a, 4 * a, 16, 24, BoundaryKind::Electrode),
                                                 {{"sphere", false, kSolvedVolts}, {"shell", false, 0.0}});
  OnsetSpec spec;
  spec.start_points = 300;
  const OnsetResult onset = test::evaluate(design, test::gas_at_density("air", 1.0), spec);
  ASSERT_GE(onset.starts.size(), 300u);
  ASSERT_EQ(onset.lines.size(), onset.starts.size());
  for (size_t k = 0; k < onset.starts.size(); ++k) {
    const OnsetStart& start = onset.starts[k];
    EXPECT_EQ(start.line, static_cast<int>(k));
    if (start.electrode != "sphere") continue;
    EXPECT_NEAR(std::hypot(start.at.r, start.at.z), a, 1e-6 * a);
    if (k > 0 && onset.starts[k - 1].contour == start.contour && onset.starts[k - 1].surface == start.surface) {
      EXPECT_GT(start.s, onset.starts[k - 1].s);
    }
    const Point first = onset.lines[k].points.front().at;
    EXPECT_NEAR(std::hypot(first.r - start.at.r, first.z - start.at.z), 0.0, 1e-6 * a);
  }
  // The sphere's field is the same everywhere, and so is its inception voltage.
  for (const OnsetStart& start : onset.starts) {
    if (start.electrode != "sphere") continue;
    EXPECT_NEAR(start.inception_V / onset.inception_V, 1.0, 2e-3);
  }
}

TEST(OnsetEvaluation, MarginsRegionsAndSurfaceSamples) {
  // Coaxial cylinders: the field is the same all along the inner cylinder, so at an operating voltage
  // above its inception voltage the whole inner contour is one region, and below it none.
  test::SolvedDesign design = coax_design(1e-3, 4);
  const GasModel air = test::gas_at_density("air", 1.0);
  const double inception_V = test::evaluate(design, air).inception_V;
  OnsetSpec spec;
  spec.operating_V = 1.25 * inception_V;
  const OnsetResult over = test::evaluate(design, air, spec);
  EXPECT_NEAR(over.margin, 0.8, 1e-6);
  ASSERT_EQ(over.regions.size(), 1u);
  EXPECT_EQ(over.regions[0].electrode, "inner");
  EXPECT_EQ(over.regions[0].s_from, 0.0);
  EXPECT_NEAR(over.regions[0].s_to, 0.5e-3, 1e-12);
  EXPECT_NEAR(over.regions[0].lowest_margin, 0.8, 1e-6);
  ASSERT_EQ(over.electrodes.size(), 2u);
  EXPECT_EQ(over.electrodes[0].electrode, "inner");  // case order
  EXPECT_GT(over.electrodes[1].inception_V, over.electrodes[0].inception_V);
  for (const SurfaceField& field : design.surfaces) {
    if (field.name != "inner") continue;
    for (const SurfaceSample& sample : field.contours.at(0)) EXPECT_NEAR(sample.margin, 0.8, 1e-4);
  }
  // A zone of ionization reaches out at the operating voltage above inception.
  EXPECT_GT(over.starts.front().integral_operating, 9.15);
  EXPECT_GT(over.starts.front().zone_length_operating, 0.0);

  spec.operating_V = 0.9 * inception_V;
  EXPECT_TRUE(test::evaluate(design, air, spec).regions.empty());
  spec.required_margin = 1.2;  // 1.11 < 1.2: the design falls short
  const OnsetResult short_of = test::evaluate(design, air, spec);
  EXPECT_EQ(short_of.regions.size(), 1u);
  EXPECT_FALSE(short_of.meets_required_margin());
}

TEST(OnsetEvaluation, WarnsOnceWhereTheGasFitLeavesItsRange) {
  // SF6's linear fit holds only near the critical field, up to about 1.4 (E/p)_cr (physics.md, SF6):
  // a 0.5 mm wire at 1 bar needs about 1.45 (E/p)_cr at its surface by the same fit.
  test::SolvedDesign design = coax_design(0.5e-3, 2);
  GasSpec sf6;
  sf6.name = "sf6", sf6.pressure_Pa = 1e5, sf6.temperature_K = 293.0;
  const OnsetResult onset = test::evaluate(design, GasModel::from_spec(sf6));
  ASSERT_EQ(onset.warnings.size(), 1u);
  EXPECT_NE(onset.warnings[0].find("above"), std::string::npos);
}

}  // namespace
}  // namespace hv
