// The user table of reduced coefficients: interpolation against the formula it was sampled from
// (Morrow & Lowke, J. Phys. D 30, 614-627, 1997, as physics.md gives it), and every input error
// naming the file, the line and the fix.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "postproc/gas.h"

namespace {

using hv::GasModel;
using hv::GasSpec;

constexpr double kTd = 1e-21;  // V m^2

std::string write_table(const std::string& name, const std::string& contents) {
  // Named after the running test too: ctest runs tests in parallel processes, which must not share a file.
  const std::string test = ::testing::UnitTest::GetInstance()->current_test_info()->name();
  const std::string path = ::testing::TempDir() + "hvstress_gas_table_" + test + "_" + name + ".csv";
  std::ofstream(path) << contents;
  return path;
}

GasModel table_gas(const std::string& path, double pressure_Pa = 101325.0, double temperature_K = 293.15) {
  GasSpec spec;
  spec.name = "table";
  spec.table = path;
  spec.pressure_Pa = pressure_Pa;
  spec.temperature_K = temperature_K;
  spec.where = {"case.yaml", 7, 3, "gas"};
  return GasModel::from_spec(spec);
}

// A small valid table: attachment wins at 80 Td, ionization from 120 Td on.
const char* const kSmallTable =
    "# invented test data\n"
    "E/N (Td), alpha/N (m^2), eta/N (m^2)\n"
    "80, 1e-23, 4e-22\n"
    "100, 1e-22, 2e-22\n"
    "120, 4e-22, 1e-22\n"
    "200, 2e-21, 0\n";

// Morrow & Lowke's reduced coefficients in m^2 at E/N in Td and N in 1/m^3, from the formula in the
// paper's units (E/N in V cm^2, N in cm^-3, coefficients/N in cm^2).
struct Reduced {
  double alpha, eta;
};

Reduced morrow_lowke_reduced(double td, double N) {
  const double x = td * 1e-17, n = N * 1e-6;
  const double alpha = x > 1.5e-15 ? 2.0e-16 * std::exp(-7.248e-15 / x) : 6.619e-17 * std::exp(-5.593e-15 / x);
  const double eta2 = std::max(0.0, x > 1.05e-15 ? 8.889e-5 * x + 2.567e-19 : 6.089e-4 * x - 2.893e-19);
  const double eta3 = n * 4.7778e-59 * std::pow(x, -1.2749);
  return {alpha * 1e-4, (eta2 + eta3) * 1e-4};  // cm^2 -> m^2
}

// Rows 3 % apart from 50 to 1000 Td, plus the fit's break points 105 Td (eta2) and 150 Td (alpha),
// so that no table segment straddles a kink of the formula.
std::vector<double> sample_rows_Td() {
  std::vector<double> rows = {105.0, 150.0};
  for (double td = 50.0; td <= 1000.0; td *= 1.03) rows.push_back(td);
  std::sort(rows.begin(), rows.end());
  return rows;
}

TEST(GasTable, ReproducesMorrowLowkeBetweenRows) {
  const double N = 101325.0 / (1.380649e-23 * 293.15);
  const std::vector<double> rows = sample_rows_Td();
  std::string csv = "# sampled from Morrow & Lowke (1997) at 101.325 kPa, 20 degC\nE/N (Td),alpha/N (m^2),eta/N (m^2)\n";
  for (double td : rows) {
    char line[96];
    const Reduced c = morrow_lowke_reduced(td, N);
    std::snprintf(line, sizeof line, "%.17g,%.17g,%.17g\n", td, c.alpha, c.eta);
    csv += line;
  }
  const GasModel table = table_gas(write_table("morrow_lowke", csv));
  // Log-linear interpolation of alpha/N = A exp(-B/x) errs by about (r - 1)^2 B / (4 x) for rows a
  // factor r apart: 0.25 % at 50 Td for r = 1.03 (0.24 % found). eta/N errs most near 50 Td, where the
  // two-body part heads for its zero at 47.5 Td (0.20 % found; below 0.06 % above 70 Td).
  for (size_t i = 0; i + 1 < rows.size(); ++i) {
    const double td = 0.5 * (rows[i] + rows[i + 1]);
    const Reduced expected = morrow_lowke_reduced(td, N);
    const hv::IonizationCoefficients got = table.coefficients(td * kTd * N);
    EXPECT_NEAR(got.alpha / N, expected.alpha, 3e-3 * expected.alpha) << td << " Td";
    EXPECT_NEAR(got.eta / N, expected.eta, 3e-3 * expected.eta) << td << " Td";
  }
  // The critical field of the table against the formula's at the same density (107.7 Td): 4e-5 apart.
  const double formula_critical = GasModel::from_spec(GasSpec{}).critical_field();
  EXPECT_NEAR(table.critical_field() / formula_critical, 1.0, 1e-4);
}

TEST(GasTable, HoldsEndValuesOutsideAndSaysNotValid) {
  const GasModel table = table_gas(write_table("small", kSmallTable));
  const double N = table.number_density();
  EXPECT_NEAR(table.coefficients(50 * kTd * N).alpha / N, 1e-23, 1e-36);
  EXPECT_NEAR(table.coefficients(50 * kTd * N).eta / N, 4e-22, 1e-35);
  EXPECT_NEAR(table.coefficients(500 * kTd * N).alpha / N, 2e-21, 1e-34);
  EXPECT_FALSE(table.is_valid_at(50 * kTd * N));
  EXPECT_FALSE(table.is_valid_at(500 * kTd * N));
  EXPECT_TRUE(table.is_valid_at(150 * kTd * N));
  EXPECT_NEAR(table.valid_min_field(), 80 * kTd * N, 1e-9 * table.valid_min_field());
  EXPECT_NEAR(table.valid_max_field(), 200 * kTd * N, 1e-9 * table.valid_max_field());
}

TEST(GasTable, InterpolatesLogLinearlyAndLinearlyNextToZero) {
  const GasModel table = table_gas(write_table("small", kSmallTable));
  const double N = table.number_density();
  // Halfway between 100 and 120 Td: geometric means, sqrt(1e-22 x 4e-22) = 2e-22 and sqrt(2e-22 x 1e-22).
  const hv::IonizationCoefficients middle = table.coefficients(110 * kTd * N);
  EXPECT_NEAR(middle.alpha / N, 2e-22, 1e-12 * 2e-22);
  EXPECT_NEAR(middle.eta / N, std::sqrt(2e-44), 1e-12 * std::sqrt(2e-44));
  // Between 120 Td (1e-22) and 200 Td (0) eta/N falls linearly: 0.5e-22 at 160 Td.
  EXPECT_NEAR(table.coefficients(160 * kTd * N).eta / N, 0.5e-22, 1e-12 * 0.5e-22);
  // The crossing lies between 100 and 120 Td, where alpha/N = 1e-22 4^t and eta/N = 2e-22 2^-t meet
  // at 2^(3t) = 2, t = 1/3: E/N = 106.67 Td.
  EXPECT_NEAR(table.critical_field() / N / kTd, 100.0 + 20.0 / 3.0, 1e-8);
}

TEST(GasTable, RecordsPathAndNotesInItsInfo) {
  const std::string path = write_table("small", kSmallTable);
  const GasModel table = table_gas(path);
  EXPECT_EQ(table.info().key, "table");
  EXPECT_NE(table.info().source.find(path), std::string::npos);
  EXPECT_NE(table.info().source.find("invented test data"), std::string::npos);
  EXPECT_NE(table.info().valid_range.find("80-200 Td"), std::string::npos);
  EXPECT_EQ(table.info().default_K, 9.15);  // the air value (Schumann's, recalled from memory)
}

// The InputError of a bad table, or a failure when the table is accepted.
hv::InputError table_error(const std::string& name, const std::string& contents) {
  const std::string path = write_table(name, contents);
  try {
    table_gas(path);
  } catch (const hv::InputError& error) {
    EXPECT_EQ(error.where().file, path);
    EXPECT_EQ(error.where().key_path, "gas.table");
    EXPECT_NE(std::string(error.what()).find(path + ":"), std::string::npos);
    EXPECT_FALSE(error.hint().empty());
    return error;
  }
  ADD_FAILURE() << name << ": the table was accepted";
  return hv::InputError({}, "");
}

const std::string kHeader = "E/N (Td), alpha/N (m^2), eta/N (m^2)\n";

TEST(GasTableErrors, TooFewRows) {
  const hv::InputError error = table_error("two_rows", kHeader + "80, 1e-23, 4e-22\n120, 4e-22, 1e-22\n");
  EXPECT_EQ(error.where().line, 3);
  EXPECT_NE(error.problem().find("at least 3"), std::string::npos);
}

TEST(GasTableErrors, UnsortedRows) {
  const hv::InputError error =
      table_error("unsorted", kHeader + "80, 1e-23, 4e-22\n120, 4e-22, 1e-22\n100, 1e-22, 2e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 4);
  EXPECT_EQ(error.where().column, 1);
  EXPECT_NE(error.problem().find("increase strictly"), std::string::npos);
}

TEST(GasTableErrors, RepeatedEOverN) {
  const hv::InputError error = table_error("repeated", kHeader + "80, 1e-23, 4e-22\n80, 1e-23, 4e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 3);
}

TEST(GasTableErrors, NegativeCoefficient) {
  const hv::InputError error = table_error("negative", kHeader + "80, 1e-23, 4e-22\n100, 1e-22, -2e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 3);
  EXPECT_EQ(error.where().column, 13);  // the field "-2e-22"
  EXPECT_NE(error.problem().find("eta/N"), std::string::npos);
}

TEST(GasTableErrors, NonPositiveEOverN) {
  const hv::InputError error = table_error("zero_field", kHeader + "0, 0, 4e-22\n100, 1e-22, 2e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 2);
}

TEST(GasTableErrors, UnparsableNumber) {
  const hv::InputError error = table_error("unparsable", kHeader + "80, 1e-23, 4e-22\n100, 1e-22x, 2e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 3);
  EXPECT_EQ(error.where().column, 6);
  EXPECT_NE(error.problem().find("column 2 (alpha/N"), std::string::npos);
}

TEST(GasTableErrors, WrongNumberOfFields) {
  const hv::InputError error = table_error("fields", kHeader + "80, 1e-23, 4e-22\n100, 1e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 3);
}

TEST(GasTableErrors, MissingHeader) {
  const hv::InputError error = table_error("no_header", "80, 1e-23, 4e-22\n100, 1e-22, 2e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 1);
  EXPECT_NE(error.hint().find("header"), std::string::npos);
}

TEST(GasTableErrors, CriticalFieldOutsideTheTable) {
  // Ionization wins already in the first row: the table starts above the critical field.
  const hv::InputError error = table_error("no_crossing", kHeader + "120, 4e-22, 1e-22\n150, 8e-22, 1e-22\n200, 2e-21, 0\n");
  EXPECT_EQ(error.where().line, 2);
  EXPECT_NE(error.hint().find("lower E/N"), std::string::npos);
}

TEST(GasTableErrors, MissingFileIsReportedAtTheCaseFile) {
  const std::string path = ::testing::TempDir() + "hvstress_gas_table_does_not_exist.csv";
  std::remove(path.c_str());
  try {
    table_gas(path);
    FAIL() << "a missing table was accepted";
  } catch (const hv::InputError& error) {
    // The fix belongs in the case file: its place (case.yaml:7), key gas.table, and the table's path.
    EXPECT_EQ(error.where().file, "case.yaml");
    EXPECT_EQ(error.where().line, 7);
    EXPECT_EQ(error.where().key_path, "gas.table");
    EXPECT_NE(error.problem().find(path), std::string::npos);
  }
}

}  // namespace
