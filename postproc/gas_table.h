// Private to the gas models: a gas given by the user as a table of reduced coefficients.
//
// File format (CSV, comma-separated, UTF-8 or ASCII):
//   - lines starting with '#' are notes (e.g. the source of the data; they are kept and shown with
//     the results), blank lines are skipped;
//   - the first other line is a header naming the three columns;
//   - then at least 3 rows: E/N in Td (> 0, strictly increasing), alpha/N in m^2 (>= 0), eta/N in m^2
//     (>= 0); the table must contain the critical field (attachment at least as large as ionization
//     at some row, ionization larger in the last row).
#pragma once

#include <string>
#include <vector>

#include "postproc/gas_models.h"

namespace hv {

class GasTable : public ReducedGasModel {
 public:
  // Reads and validates the table at `path`. InputError at file:line:column of the table (key path
  // "gas.table") with the fix; a table that cannot be opened is reported at `case_place`, the place
  // of the gas in the case file.
  static GasTable read(const std::string& path, const SourceLocation& case_place);

  // Interpolated log-linearly: log of each coefficient linear in E/N, or linearly in E/N where a
  // bracketing value is 0. Outside the table the end values are held (and is_valid_at says so).
  ReducedCoefficients at(double E_over_N, double N) const override;
  // The rows themselves: alpha_eff changes sign at most once between rows.
  std::vector<double> bracket_points() const override { return E_over_N_; }

  // The catalogue entry for this table: its path, notes and rows.
  GasModelInfo info() const;

 private:
  GasTable(std::string path, std::vector<std::string> notes, std::vector<double> E_over_N,
           std::vector<double> alpha_over_N, std::vector<double> eta_over_N);

  std::string path_;
  std::vector<std::string> notes_;
  std::vector<double> E_over_N_, alpha_over_N_, eta_over_N_;  // V m^2, m^2, m^2
};

// The generic catalogue entry of the user table.
GasModelInfo gas_table_catalogue_info();

}  // namespace hv
