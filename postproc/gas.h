// The gas around the electrodes: its state (pressure, temperature) and its ionization and attachment
// coefficients as pure functions of the reduced field E/N (physics.md, "Effective ionization
// coefficient"). Pressure and temperature enter only through the number density N = p / (k_B T).
// Models: dry air after Morrow & Lowke (J. Phys. D 30, 1997; default), dry air by a quadratic fit in
// E/p, SF6 by a linear fit, and a user table (CSV of E/N, alpha/N, eta/N).
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "mesh/base.h"

namespace hv {

constexpr double kBoltzmann = 1.380649e-23;  // J/K (SI 2019, exact)
constexpr double kTownsend = 1e-21;          // 1 Td = 1e-21 V m^2

// The gas the case asks for (filled by the case reader).
struct GasSpec {
  std::string name = "air";   // air | sf6 | table (stored lower case)
  std::string model;          // air: "morrow-lowke" (default) or "quadratic"; empty otherwise
  std::string table;          // table: path of the CSV, resolved against the case file's folder
  double pressure_Pa = 101325.0;
  double temperature_K = 293.15;
  SourceLocation where;
};

// What `hvstress gases` lists about one built-in model.
struct GasModelInfo {
  std::string key;          // how a case selects it: "air", "air (model: quadratic)", "sf6", "table"
  std::string title;        // e.g. "dry air, Morrow & Lowke (1997)"
  std::string formula;      // the formula as text
  std::string valid_range;  // e.g. "E/N 50-1000 Td" (as text)
  std::string source;       // the published source and the status of its values
  double default_K = 0.0;   // streamer criterion constant for this gas, with its source in `source`
  double default_gamma = 0.0;  // Townsend secondary coefficient default
};

// Every built-in model (and the user table), in the order `hvstress gases` prints them.
const std::vector<GasModelInfo>& gas_model_catalogue();

// alpha (ionization) and eta (attachment) coefficients, 1/m.
struct IonizationCoefficients {
  double alpha = 0.0;
  double eta = 0.0;
  double effective() const { return alpha - eta; }
};

// One gas in one state. Cheap to copy; thread-safe to evaluate.
class GasModel {
 public:
  // Builds the model of `spec`; a user table is read and validated here (InputError naming the table
  // file, its line and the fix: columns E/N in Td, alpha/N and eta/N in m^2, sorted by E/N, positive,
  // at least 3 rows).
  static GasModel from_spec(const GasSpec& spec);

  const GasModelInfo& info() const;
  double pressure_Pa() const;
  double temperature_K() const;
  double number_density() const;    // N, 1/m^3
  // delta = (p / 101.3 kPa)(293 K / T), the relative air density of IEC 60060-1.
  double relative_density() const;

  // alpha and eta at field magnitude E (V/m) in this gas state.
  IonizationCoefficients coefficients(double E_V_per_m) const;
  double alpha_eff(double E_V_per_m) const { return coefficients(E_V_per_m).effective(); }
  // The field (V/m) at which alpha_eff crosses zero in this state (the critical field); above it the
  // gas ionizes.
  double critical_field() const;
  // Whether E (V/m) lies inside the model's range of validity; the onset evaluation warns otherwise.
  bool is_valid_at(double E_V_per_m) const;
  // The validity range as fields in this state, V/m.
  double valid_min_field() const;
  double valid_max_field() const;

 private:
  struct Model;
  std::shared_ptr<const Model> model_;
  GasModelInfo info_;
  double pressure_Pa_ = 0.0, temperature_K_ = 0.0;
};

}  // namespace hv
