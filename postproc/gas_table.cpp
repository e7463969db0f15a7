#include "postproc/gas_table.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <optional>
#include <utility>

namespace hv {

namespace {

constexpr int kColumns = 3;
const char* const kColumnNames[kColumns] = {"E/N (Td)", "alpha/N (m^2)", "eta/N (m^2)"};
const char* const kKeyPath = "gas.table";
const char* const kRowHint = "each row reads 'E/N in Td, alpha/N in m^2, eta/N in m^2', e.g. '120, 4.1e-22, 3.6e-22'";

std::string format_number(double value) {
  char text[32];
  std::snprintf(text, sizeof text, "%g", value);
  return text;
}

// One comma-separated field, trimmed, with the 1-based column of its first character.
struct Field {
  std::string text;
  int column = 0;
};

bool is_blank(char c) { return c == ' ' || c == '\t'; }

std::vector<Field> split_fields(const std::string& line) {
  std::vector<Field> fields;
  size_t start = 0;
  while (true) {
    const size_t comma = std::min(line.find(',', start), line.size());
    size_t first = start, last = comma;
    while (first < last && is_blank(line[first])) ++first;
    while (last > first && is_blank(line[last - 1])) --last;
    fields.push_back({line.substr(first, last - first), static_cast<int>(first) + 1});
    if (comma == line.size()) return fields;
    start = comma + 1;
  }
}

// The whole text as a finite number, or nothing.
std::optional<double> parse_number(const std::string& text) {
  if (text.empty()) return std::nullopt;
  char* end = nullptr;
  const double value = std::strtod(text.c_str(), &end);
  if (end != text.c_str() + text.size() || !std::isfinite(value)) return std::nullopt;
  return value;
}

// Log-linear between a and b (log of the value linear in t in [0, 1]); linear where either is 0,
// since the logarithm of 0 does not exist.
double interpolate_log_linear(double a, double b, double t) {
  if (a <= 0.0 || b <= 0.0) return a + t * (b - a);
  return a * std::pow(b / a, t);
}

struct TableRows {
  std::vector<std::string> notes;
  std::vector<double> E_over_N, alpha_over_N, eta_over_N;  // SI: V m^2, m^2, m^2
};

// Reads the table line by line and checks every value as it comes; every failure names the line and
// column and says how to fix it.
class TableReader {
 public:
  explicit TableReader(std::string path) : path_(std::move(path)) {}

  void read_line(int line_number, std::string line) {
    last_line_ = line_number;
    if (!line.empty() && line.back() == '\r') line.pop_back();  // files written on Windows
    const size_t first = line.find_first_not_of(" \t");
    if (first == std::string::npos) return;
    if (line[first] == '#') {
      notes_.push_back(trimmed_note(line.substr(first + 1)));
      return;
    }
    const std::vector<Field> fields = split_fields(line);
    if (!header_seen_)
      read_header(line_number, fields);
    else
      read_row(line_number, line, fields);
  }

  // The checks that need the whole table (enough rows, the critical field inside it), then its rows.
  TableRows finish() {
    if (!header_seen_)
      fail(std::max(last_line_, 1), 1, "the table is empty", "write a header line, then at least 3 rows; " + std::string(kRowHint));
    if (E_over_N_.size() < 3)
      fail(last_line_, 1, "the table has " + std::to_string(E_over_N_.size()) + " rows, at least 3 are needed",
           std::string(kRowHint) + "; cover E/N from below to above the critical field");
    check_contains_critical_field();
    return TableRows{std::move(notes_), std::move(E_over_N_), std::move(alpha_over_N_), std::move(eta_over_N_)};
  }

 private:
  static std::string trimmed_note(const std::string& text) {
    const size_t first = text.find_first_not_of(" \t");
    return first == std::string::npos ? std::string() : text.substr(first);
  }

  [[noreturn]] void fail(int line, int column, const std::string& problem, const std::string& hint) const {
    throw InputError(SourceLocation{path_, line, column, kKeyPath}, problem, hint);
  }

  void read_header(int line_number, const std::vector<Field>& fields) {
    if (parse_number(fields.front().text))
      fail(line_number, fields.front().column, "the first line of the table must be a header, found the number '" + fields.front().text + "'",
           "add a header line such as 'E/N (Td), alpha/N (m^2), eta/N (m^2)'");
    if (fields.size() != kColumns)
      fail(line_number, 1, "the header has " + std::to_string(fields.size()) + " columns, expected 3",
           "name the columns 'E/N (Td), alpha/N (m^2), eta/N (m^2)'");
    header_seen_ = true;
  }

  void read_row(int line_number, const std::string& line, const std::vector<Field>& fields) {
    if (fields.size() != kColumns) {
      const int column = fields.size() > kColumns ? fields[kColumns].column : static_cast<int>(line.size()) + 1;
      fail(line_number, column, "the row has " + std::to_string(fields.size()) + " fields, expected 3", kRowHint);
    }
    double values[kColumns];
    for (int c = 0; c < kColumns; ++c) {
      const Field& field = fields[static_cast<size_t>(c)];
      const std::optional<double> value = parse_number(field.text);
      if (!value)
        fail(line_number, field.column,
             "column " + std::to_string(c + 1) + " (" + kColumnNames[c] + "): '" + field.text + "' is not a number",
             "write a plain decimal number such as 1.5e-20");
      values[c] = *value;
    }
    check_row(line_number, fields, values);
    E_over_N_.push_back(values[0] * kTownsend);
    alpha_over_N_.push_back(values[1]);
    eta_over_N_.push_back(values[2]);
    row_lines_.push_back(line_number);
  }

  void check_row(int line_number, const std::vector<Field>& fields, const double* values) const {
    if (!(values[0] > 0.0))
      fail(line_number, fields[0].column, "E/N must be greater than 0, got " + fields[0].text + " Td",
           "give the reduced field in Td (1 Td = 1e-21 V m^2)");
    if (!E_over_N_.empty() && !(values[0] * kTownsend > E_over_N_.back()))
      fail(line_number, fields[0].column,
           "E/N must increase strictly from row to row: " + fields[0].text + " Td follows " +
               format_number(E_over_N_.back() / kTownsend) + " Td on line " + std::to_string(row_lines_.back()),
           "sort the rows by E/N and remove repeated E/N values");
    for (int c = 1; c < kColumns; ++c)
      if (values[c] < 0.0)
        fail(line_number, fields[static_cast<size_t>(c)].column,
             std::string(kColumnNames[c]) + " must not be negative, got " + fields[static_cast<size_t>(c)].text,
             "ionization and attachment coefficients are magnitudes; write 0 where there is none");
  }

  // The critical field (alpha = eta) must lie inside the table, since the end values are held
  // outside it: some row with eta/N >= alpha/N, and ionization winning in the last row.
  void check_contains_critical_field() const {
    const size_t last = E_over_N_.size() - 1;
    if (!(alpha_over_N_[last] > eta_over_N_[last]))
      fail(row_lines_[last], 1,
           "attachment is at least as large as ionization up to the last row (E/N " + format_number(E_over_N_[last] / kTownsend) +
               " Td): the table does not reach the critical field",
           "add rows at higher E/N, up to where alpha/N exceeds eta/N");
    size_t first_attaching = 0;
    while (first_attaching <= last && alpha_over_N_[first_attaching] > eta_over_N_[first_attaching]) ++first_attaching;
    if (first_attaching > last)
      fail(row_lines_[0], 1,
           "ionization exceeds attachment already in the first row (E/N " + format_number(E_over_N_[0] / kTownsend) +
               " Td): the table does not reach down to the critical field",
           "add rows at lower E/N, down to where eta/N is at least alpha/N");
  }

  std::string path_;
  bool header_seen_ = false;
  int last_line_ = 0;
  std::vector<std::string> notes_;
  std::vector<double> E_over_N_, alpha_over_N_, eta_over_N_;  // SI: V m^2, m^2, m^2
  std::vector<int> row_lines_;
};

}  // namespace

GasTable::GasTable(std::string path, std::vector<std::string> notes, std::vector<double> E_over_N,
                   std::vector<double> alpha_over_N, std::vector<double> eta_over_N)
    : ReducedGasModel(E_over_N.front(), E_over_N.back()),
      path_(std::move(path)),
      notes_(std::move(notes)),
      E_over_N_(std::move(E_over_N)),
      alpha_over_N_(std::move(alpha_over_N)),
      eta_over_N_(std::move(eta_over_N)) {}

GasTable GasTable::read(const std::string& path, const SourceLocation& case_place) {
  std::ifstream in(path);
  if (!in) {
    SourceLocation where = case_place;
    where.key_path = kKeyPath;
    throw InputError(where, "cannot open the gas table '" + path + "'",
                     "check the file name; a relative path is taken from the case file's folder");
  }
  TableReader reader(path);
  std::string line;
  for (int line_number = 1; std::getline(in, line); ++line_number) reader.read_line(line_number, line);
  TableRows rows = reader.finish();
  return GasTable(path, std::move(rows.notes), std::move(rows.E_over_N), std::move(rows.alpha_over_N),
                  std::move(rows.eta_over_N));
}

ReducedCoefficients GasTable::at(double E_over_N, double /*N*/) const {
  if (E_over_N <= E_over_N_.front()) return {alpha_over_N_.front(), eta_over_N_.front()};
  if (E_over_N >= E_over_N_.back()) return {alpha_over_N_.back(), eta_over_N_.back()};
  const size_t hi = static_cast<size_t>(std::upper_bound(E_over_N_.begin(), E_over_N_.end(), E_over_N) - E_over_N_.begin());
  const size_t lo = hi - 1;
  const double t = (E_over_N - E_over_N_[lo]) / (E_over_N_[hi] - E_over_N_[lo]);
  return {interpolate_log_linear(alpha_over_N_[lo], alpha_over_N_[hi], t),
          interpolate_log_linear(eta_over_N_[lo], eta_over_N_[hi], t)};
}

GasModelInfo gas_table_catalogue_info() {
  GasModelInfo info;
  info.key = "table";
  info.title = "user table of reduced coefficients";
  info.formula =
      "CSV: a header line, then rows 'E/N in Td, alpha/N in m^2, eta/N in m^2'; each coefficient "
      "interpolated log-linearly in E/N (linearly where a bracketing value is 0), end values held outside";
  info.valid_range = "the table's rows (E/N from the first to the last row)";
  info.source =
      "the user's data ('#' lines of the file record their source). K = 9.15 and gamma = 1e-3 are the "
      "air defaults [K: Schumann's value, mem; gamma: practice]: set onset.K and onset.gamma for another gas";
  info.default_K = kAirStreamerK;
  info.default_gamma = kDefaultGamma;
  return info;
}

GasModelInfo GasTable::info() const {
  GasModelInfo info = gas_table_catalogue_info();
  info.title = "user table " + path_;
  info.valid_range = "E/N " + format_number(E_over_N_.front() / kTownsend) + "-" + format_number(E_over_N_.back() / kTownsend) +
                     " Td (the table's rows)";
  std::string notes;
  for (const std::string& note : notes_)
    if (!note.empty()) notes += (notes.empty() ? "" : " ") + note;
  info.source = "user table " + path_ + (notes.empty() ? "" : " (" + notes + ")") + "; " + info.source;
  return info;
}

}  // namespace hv
