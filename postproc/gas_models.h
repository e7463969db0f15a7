// Private to the gas models (postproc/gas*.cpp): the coefficients of each gas as pure functions of the
// reduced field E/N, so that pressure and temperature enter only through the number density N
// (physics.md, "Units and gas density"). All quantities SI: E/N in V m^2 (1 Td = 1e-21 V m^2),
// N in 1/m^3, reduced coefficients alpha/N and eta/N in m^2.
#pragma once

#include <memory>
#include <vector>

#include "postproc/gas.h"

namespace hv {

// Defaults of the onset criteria, with their status (physics.md, "Onset criteria").
constexpr double kAirStreamerK = 9.15;   // Schumann's value [mem]; ~9.2 by Mikropoulos & Zagkanas, ISH 2009 [pub]
constexpr double kSf6StreamerK = 10.5;   // Pedersen 1970; Nitta & Shibuya 1971; Niemeyer 1995 [mem]
constexpr double kDefaultGamma = 1e-3;   // a sensitivity case, not a measured value [practice]

// The reference temperature of the IEC 60060-1 standard atmosphere, to which the "E/p" fits of the HV
// literature refer: they are evaluated at p20 = N k_B 293 K, the pressure the gas would have at 20 degC.
constexpr double kReferenceTemperature_K = 293.0;
constexpr double kReferencePressure_Pa = 101.3e3;  // IEC 60060-1 standard atmosphere

// alpha/N (ionization) and eta/N (attachment), m^2.
struct ReducedCoefficients {
  double alpha_over_N = 0.0;
  double eta_over_N = 0.0;
  double effective() const { return alpha_over_N - eta_over_N; }
};

// One gas model in reduced form.
class ReducedGasModel {
 public:
  ReducedGasModel(double valid_min_E_over_N, double valid_max_E_over_N)
      : valid_min_(valid_min_E_over_N), valid_max_(valid_max_E_over_N) {}
  virtual ~ReducedGasModel() = default;

  // alpha/N and eta/N (m^2) at the reduced field E_over_N >= 0 (V m^2) and number density N (1/m^3);
  // N matters only for three-body processes.
  virtual ReducedCoefficients at(double E_over_N, double N) const = 0;

  // Increasing E/N values (V m^2) so close together that alpha_eff changes sign at most once between
  // neighbours, the last of them in the ionizing range: the brackets for the critical field.
  virtual std::vector<double> bracket_points() const;

  // The range of validity, E/N in V m^2.
  double valid_min() const { return valid_min_; }
  double valid_max() const { return valid_max_; }

 private:
  double valid_min_, valid_max_;
};

// Dry air after Morrow & Lowke (J. Phys. D 30, 614-627, 1997), with three-body attachment.
std::unique_ptr<ReducedGasModel> make_morrow_lowke_air();
GasModelInfo morrow_lowke_air_info();

// Dry air, quadratic fit of alpha_eff/p in E/p (credited to Sarma & Janischewskyj, 1969) [mem].
std::unique_ptr<ReducedGasModel> make_quadratic_fit_air();
GasModelInfo quadratic_fit_air_info();

// SF6, linear fit of alpha_eff/p in E/p near the critical field [mem].
std::unique_ptr<ReducedGasModel> make_linear_fit_sf6();
GasModelInfo linear_fit_sf6_info();

}  // namespace hv
