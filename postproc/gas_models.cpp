// The built-in gas models in reduced form (see gas_models.h). Each coefficient is written in the units
// of its source and converted to SI at the boundary of the function, so the published constants can be
// compared with the source digit by digit. Status marks as in physics.md: [pub] published (source
// confirmed in a public reproduction), [mem] recalled from memory of the named source, [practice]
// common practice without a source.
#include "postproc/gas_models.h"

#include <algorithm>
#include <cmath>

namespace hv {

namespace {

// p20 / N = k_B x 293 K: the 20 degC-equivalent pressure per molecule (Pa m^3), which turns an E/p fit
// at 20 degC into a function of E/N.
constexpr double kP20PerN = kBoltzmann * kReferenceTemperature_K;

// Unit changes for the E/p fits: 1 V/(m Pa) = 1e-3 kV / (1e3 mm x 1e-5 bar) = 0.1 kV/(mm bar), and
// 1/(mm bar) = 1e3 / (m x 1e5 Pa) = 1e-2 1/(m Pa).
constexpr double kKvPerMmBar_per_VPerMPa = 0.1;
constexpr double kPerMPa_per_PerMmBar = 1e-2;

// E/p20 in kV/(mm bar) and back.
double E_over_p20_kV_per_mm_bar(double E_over_N) { return E_over_N / kP20PerN * kKvPerMmBar_per_VPerMPa; }
double E_over_N_from_kV_per_mm_bar(double E_over_p20) { return E_over_p20 / kKvPerMmBar_per_VPerMPa * kP20PerN; }

// A fit that gives only alpha_eff: ionization where it is positive, attachment where it is negative,
// so that alpha - eta = alpha_eff everywhere and alpha = 0 below the critical field.
ReducedCoefficients split_effective(double alpha_eff_over_N) {
  return {std::max(0.0, alpha_eff_over_N), std::max(0.0, -alpha_eff_over_N)};
}

// ---- Dry air, Morrow & Lowke, J. Phys. D 30, 614-627 (1997) [pub: coefficients as reproduced in
// public streamer codes; page details mem]. In the paper's units: E/N in V cm^2, N in cm^-3,
// alpha/N and eta/N in cm^2.
class MorrowLowkeAir : public ReducedGasModel {
 public:
  // Validity 50-1000 Td [practice]: the E/N range of the swarm data behind the fit is not confirmed
  // here; below about 47.5 Td the two-body attachment fit reaches zero, and 1000 Td is several times
  // any field at which a gas gap in air still holds.
  MorrowLowkeAir() : ReducedGasModel(50.0 * kTownsend, 1000.0 * kTownsend) {}

  ReducedCoefficients at(double E_over_N, double N) const override {
    // Below 1 Td (far outside the validity range) the coefficients are held at their 1 Td values, so
    // that a zero field gives finite numbers (the three-body term grows as (E/N)^-1.2749) [practice].
    const double x = std::max(E_over_N, kTownsend) * kCm2PerM2;  // E/N, V cm^2
    const double n = N * kCm3PerM3;                               // N, cm^-3
    const double alpha = x > 1.5e-15 ? 2.0e-16 * std::exp(-7.248e-15 / x) : 6.619e-17 * std::exp(-5.593e-15 / x);
    const double eta2 = std::max(0.0, x > 1.05e-15 ? 8.889e-5 * x + 2.567e-19 : 6.089e-4 * x - 2.893e-19);
    const double eta3 = n * 4.7778e-59 * std::pow(x, -1.2749);  // three-body attachment, grows with N
    return {alpha / kCm2PerM2, (eta2 + eta3) / kCm2PerM2};
  }

 private:
  static constexpr double kCm2PerM2 = 1e4;
  static constexpr double kCm3PerM3 = 1e-6;  // 1/m^3 -> 1/cm^3
};

// ---- Dry air, quadratic fit in E/p [mem: HV-engineering fit credited to Sarma & Janischewskyj
// (1969), used with Schumann's criterion; constants not confirmed here]:
//   alpha_eff/p = 1.6053 (E/p - 2.165)^2 - 0.2873,  E/p in kV/(mm bar), alpha_eff/p in 1/(mm bar),
// p the 20 degC-equivalent pressure p20. The parabola rises again below its vertex, which is an
// artefact of the fit: below the vertex alpha_eff is held at its vertex value -0.2873, so every E/p
// below the zero crossing 2.165 + sqrt(0.2873 / 1.6053) is non-ionizing and attachment-dominated.
class QuadraticFitAir : public ReducedGasModel {
 public:
  // Validity 2.0-6.0 kV/(mm bar) (about 81-243 Td) [practice]: the data range of the fit is not
  // confirmed here. Against Morrow & Lowke at 1 bar its critical field is 2.8 % lower, its alpha_eff
  // up to 20 % higher over 3-4.5 kV/(mm bar) and within 2 % above 4.6 [calc]
  // (tests/test_post_gas_models.cpp).
  QuadraticFitAir() : ReducedGasModel(E_over_N_from_kV_per_mm_bar(2.0), E_over_N_from_kV_per_mm_bar(6.0)) {}

  ReducedCoefficients at(double E_over_N, double /*N*/) const override {
    const double E_over_p = std::max(E_over_p20_kV_per_mm_bar(E_over_N), kVertex);
    const double alpha_eff_over_p = 1.6053 * (E_over_p - kVertex) * (E_over_p - kVertex) - 0.2873;  // 1/(mm bar)
    return split_effective(alpha_eff_over_p * kPerMPa_per_PerMmBar * kP20PerN);
  }

 private:
  static constexpr double kVertex = 2.165;  // kV/(mm bar)
};

// ---- SF6, linear fit near the critical field [mem: Kuffel, Zaengl & Kuffel, High Voltage
// Engineering: Fundamentals, 2nd ed., 2000; Pedersen; Niemeyer 1995]:
//   alpha_eff/p = k (E/p - (E/p)_cr),  k = 27.7 /kV,  (E/p)_cr = 88.8 kV/(cm bar) at 20 degC.
// Since k has the unit 1/kV, the fit reads alpha_eff/N = k (E/N - (E/N)_cr) with (E/N)_cr =
// (E/p)_cr x p20/N: the pressure drops out.
class LinearFitSf6 : public ReducedGasModel {
 public:
  // Validity 0.6-1.4 (E/p)_cr: the fit is linear only near the critical field; above 1.4 (E/p)_cr
  // physics.md [mem] warns; the lower end is [practice].
  LinearFitSf6() : ReducedGasModel(0.6 * critical(), 1.4 * critical()) {}

  ReducedCoefficients at(double E_over_N, double /*N*/) const override {
    return split_effective(kSlope_per_V * (E_over_N - critical()));
  }

 private:
  static constexpr double kSlope_per_V = 27.7e-3;  // k = 27.7 /kV
  // (E/p)_cr = 88.8 kV/(cm bar) = 88.8 V/(m Pa) (1e3 V / (1e-2 m x 1e5 Pa)), times p20/N.
  static double critical() { return 88.8 * kP20PerN; }
};

std::string gamma_source() {
  return "gamma = 1e-3: a sensitivity default [practice]; measured values for air on metals are about "
         "0.02-0.04 [pub: Beroual & Fofana 2016, as reproduced]";
}

}  // namespace

std::vector<double> ReducedGasModel::bracket_points() const {
  // A geometric grid of 5 % steps over 1 Td - 10 kTd: the analytic models change sign once, smoothly.
  std::vector<double> points;
  for (double x = 1.0 * kTownsend; x <= 1e4 * kTownsend; x *= 1.05) points.push_back(x);
  return points;
}

std::unique_ptr<ReducedGasModel> make_morrow_lowke_air() { return std::make_unique<MorrowLowkeAir>(); }
std::unique_ptr<ReducedGasModel> make_quadratic_fit_air() { return std::make_unique<QuadraticFitAir>(); }
std::unique_ptr<ReducedGasModel> make_linear_fit_sf6() { return std::make_unique<LinearFitSf6>(); }

GasModelInfo morrow_lowke_air_info() {
  GasModelInfo info;
  info.key = "air";
  info.title = "dry air, Morrow & Lowke (1997)";
  info.formula =
      "x = E/N in V cm^2, coefficients/N in cm^2, N in cm^-3: "
      "alpha/N = 2.0e-16 exp(-7.248e-15/x) for x > 1.5e-15, else 6.619e-17 exp(-5.593e-15/x); "
      "eta2/N = 8.889e-5 x + 2.567e-19 for x > 1.05e-15, else 6.089e-4 x - 2.893e-19, never below 0; "
      "eta3/N = N 4.7778e-59 x^-1.2749 (three-body); alpha_eff = alpha - eta2 - eta3";
  info.valid_range = "E/N 50-1000 Td [practice: the data range of the fit is not confirmed here]";
  info.source =
      "Morrow & Lowke, J. Phys. D 30, 614-627 (1997) [pub: coefficients as reproduced in public "
      "streamer codes; page details from memory]. K = 9.15: Schumann's value [mem]; Mikropoulos & "
      "Zagkanas, ISH 2009, found about 9.2 for positive corona in coaxial cylinders [pub]. " +
      gamma_source();
  info.default_K = kAirStreamerK;
  info.default_gamma = kDefaultGamma;
  return info;
}

GasModelInfo quadratic_fit_air_info() {
  GasModelInfo info;
  info.key = "air (model: quadratic)";
  info.title = "dry air, quadratic fit in E/p";
  info.formula =
      "alpha_eff/p20 = 1.6053 (E/p20 - 2.165)^2 - 0.2873, E/p20 in kV/(mm bar), alpha_eff/p20 in "
      "1/(mm bar), p20 = delta x 101.3 kPa; non-ionizing (alpha = 0, eta = -alpha_eff) below the zero "
      "crossing 2.588 kV/(mm bar), alpha_eff held at -0.2873 below the vertex 2.165 kV/(mm bar)";
  info.valid_range = "E/p20 2.0-6.0 kV/(mm bar), about 81-243 Td [practice: data range not confirmed here]";
  info.source =
      "fit credited to Sarma & Janischewskyj (1969), used with Schumann's criterion [mem: constants "
      "recalled from memory, not confirmed here]. K = 9.15: Schumann's value [mem]. " +
      gamma_source();
  info.default_K = kAirStreamerK;
  info.default_gamma = kDefaultGamma;
  return info;
}

GasModelInfo linear_fit_sf6_info() {
  GasModelInfo info;
  info.key = "sf6";
  info.title = "SF6, linear fit near the critical field";
  info.formula =
      "alpha_eff/p20 = k (E/p20 - (E/p)_cr), k = 27.7 /kV, (E/p)_cr = 88.8 kV/(cm bar) (about 359 Td); "
      "alpha = max(0, alpha_eff), eta = max(0, -alpha_eff)";
  info.valid_range = "E/p20 0.6-1.4 (E/p)_cr, 53-124 kV/(cm bar) [upper end mem, lower end practice]";
  info.source =
      "Kuffel, Zaengl & Kuffel, High Voltage Engineering: Fundamentals, 2nd ed. (2000); Pedersen; "
      "Niemeyer 1995 [mem: recalled from memory, not confirmed here]. K = 10.5: Pedersen 1970; Nitta & "
      "Shibuya 1971; Niemeyer 1995 [mem]. " +
      gamma_source();
  info.default_K = kSf6StreamerK;
  info.default_gamma = kDefaultGamma;
  return info;
}

}  // namespace hv
