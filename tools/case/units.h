// Units of the case file: dimensions as exponents of the SI base units m, kg, s, A, K, the table of
// accepted unit names with their scale to SI, and the kinds of quantity a case-file key can expect.
// Scales follow the SI brochure (BIPM, 9th edition, 2019): prefixes k = 1e3, M = 1e6, c = 1e-2,
// m = 1e-3, u (micro) = 1e-6, p = 1e-12, n = 1e-9; 1 bar = 1e5 Pa; t/degC = T/K - 273.15.
#pragma once

#include <array>
#include <string>
#include <vector>

namespace hv {

// A physical dimension: the exponents of m, kg, s, A and K, in that order.
struct Dimension {
  std::array<int, 5> exponents{};

  static Dimension of(int m, int kg, int s, int A, int K) { return {{m, kg, s, A, K}}; }
  bool is_dimensionless() const { return exponents == std::array<int, 5>{}; }
  bool operator==(const Dimension& other) const { return exponents == other.exponents; }
  bool operator!=(const Dimension& other) const { return !(*this == other); }
};

Dimension operator*(const Dimension& a, const Dimension& b);
Dimension operator/(const Dimension& a, const Dimension& b);
Dimension power(const Dimension& base, int exponent);
bool has_even_exponents(const Dimension& d);  // a square root keeps whole exponents
Dimension square_root(const Dimension& d);    // requires has_even_exponents(d)

// One accepted unit name: value_SI = value * scale + offset. Only degC has an offset.
struct Unit {
  std::string name;
  Dimension dimension;
  double scale = 1.0;
  double offset = 0.0;
};

// The unit called `name` (case-sensitive: `mm` and `Mm` differ), or nullptr.
const Unit* find_unit(const std::string& name);
const std::vector<Unit>& all_units();
std::vector<std::string> unit_names_of(const Dimension& dimension);  // e.g. {"m", "cm", "mm", ...}

// What a dimension measures, as a noun with its article: "a length", "an electric field",
// "a dimensionless number", or "a quantity in m^2 kg" for one without a name.
std::string describe_dimension(const Dimension& dimension);

// The coherent SI symbol of a dimension: "m", "V", "V/m", "Pa", "K", "F", "C", "J", "s", "" for a
// pure number, else the base units with exponents ("m^2 kg^-1").
std::string si_symbol(const Dimension& dimension);

// What a case-file value measures. Bare numbers of a kind take the case's default unit for it.
enum class Kind { Number, Length, Voltage, Field, Pressure, Temperature };

Dimension dimension_of(Kind kind);
std::string kind_key(Kind kind);      // the key under `units:`: "length", ..., "" for Number
std::string kind_example(Kind kind);  // a value of the kind for messages: "25 mm"

}  // namespace hv
