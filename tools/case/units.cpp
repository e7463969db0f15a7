#include "tools/case/units.h"

#include <cassert>
#include <sstream>

namespace hv {

namespace {

const Dimension kLength = Dimension::of(1, 0, 0, 0, 0);
const Dimension kVoltage = Dimension::of(2, 1, -3, -1, 0);  // V = kg m^2 s^-3 A^-1
const Dimension kField = Dimension::of(1, 1, -3, -1, 0);    // V/m
const Dimension kPressure = Dimension::of(-1, 1, -2, 0, 0);  // Pa = kg m^-1 s^-2
const Dimension kTemperature = Dimension::of(0, 0, 0, 0, 1);
const Dimension kCapacitance = Dimension::of(-2, -1, 4, 2, 0);  // F = C/V
const Dimension kCharge = Dimension::of(0, 0, 1, 1, 0);         // C = A s
const Dimension kEnergy = Dimension::of(2, 1, -2, 0, 0);        // J = kg m^2 s^-2
const Dimension kTime = Dimension::of(0, 0, 1, 0, 0);

struct NamedDimension {
  Dimension dimension;
  const char* noun_with_article;
};

const std::vector<NamedDimension>& named_dimensions() {
  static const std::vector<NamedDimension> names = {
      {Dimension{}, "a dimensionless number"}, {kLength, "a length"},
      {kVoltage, "a voltage"},                 {kField, "an electric field"},
      {kPressure, "a pressure"},               {kTemperature, "a temperature"},
      {kCapacitance, "a capacitance"},         {kCharge, "a charge"},
      {kEnergy, "an energy"},                  {kTime, "a time"},
  };
  return names;
}

std::string base_unit_exponents(const Dimension& dimension) {
  static const char* const base_units[] = {"m", "kg", "s", "A", "K"};
  std::ostringstream out;
  for (std::size_t i = 0; i < dimension.exponents.size(); ++i) {
    const int exponent = dimension.exponents[i];
    if (exponent == 0) continue;
    if (out.tellp() > 0) out << ' ';
    out << base_units[i];
    if (exponent != 1) out << '^' << exponent;
  }
  return out.str();
}

}  // namespace

Dimension operator*(const Dimension& a, const Dimension& b) {
  Dimension product;
  for (std::size_t i = 0; i < product.exponents.size(); ++i) product.exponents[i] = a.exponents[i] + b.exponents[i];
  return product;
}

Dimension operator/(const Dimension& a, const Dimension& b) { return a * power(b, -1); }

Dimension power(const Dimension& base, int exponent) {
  Dimension result;
  for (std::size_t i = 0; i < result.exponents.size(); ++i) result.exponents[i] = base.exponents[i] * exponent;
  return result;
}

bool has_even_exponents(const Dimension& d) {
  for (int exponent : d.exponents)
    if (exponent % 2 != 0) return false;
  return true;
}

Dimension square_root(const Dimension& d) {
  assert(has_even_exponents(d) && "square_root needs even exponents");
  Dimension root;
  for (std::size_t i = 0; i < root.exponents.size(); ++i) root.exponents[i] = d.exponents[i] / 2;
  return root;
}

const std::vector<Unit>& all_units() {
  // The first unit of each dimension is its coherent SI unit (scale 1): si_symbol() relies on it.
  static const std::vector<Unit> units = {
      {"m", kLength, 1.0},        {"cm", kLength, 1e-2},      {"mm", kLength, 1e-3},
      {"um", kLength, 1e-6},      {"km", kLength, 1e3},       {"V", kVoltage, 1.0},
      {"kV", kVoltage, 1e3},      {"MV", kVoltage, 1e6},      {"V/m", kField, 1.0},
      {"kV/m", kField, 1e3},      {"kV/cm", kField, 1e5},     {"kV/mm", kField, 1e6},
      {"MV/m", kField, 1e6},      {"Pa", kPressure, 1.0},     {"kPa", kPressure, 1e3},
      {"MPa", kPressure, 1e6},    {"bar", kPressure, 1e5},    {"mbar", kPressure, 1e2},
      {"K", kTemperature, 1.0},   {"degC", kTemperature, 1.0, 273.15},
      {"F", kCapacitance, 1.0},   {"pF", kCapacitance, 1e-12}, {"nF", kCapacitance, 1e-9},
      {"C", kCharge, 1.0},        {"J", kEnergy, 1.0},        {"s", kTime, 1.0},
      {"ms", kTime, 1e-3},        {"us", kTime, 1e-6},
  };
  return units;
}

const Unit* find_unit(const std::string& name) {
  for (const Unit& unit : all_units())
    if (unit.name == name) return &unit;
  return nullptr;
}

std::vector<std::string> unit_names_of(const Dimension& dimension) {
  std::vector<std::string> names;
  for (const Unit& unit : all_units())
    if (unit.dimension == dimension) names.push_back(unit.name);
  return names;
}

std::string describe_dimension(const Dimension& dimension) {
  for (const NamedDimension& named : named_dimensions())
    if (named.dimension == dimension) return named.noun_with_article;
  return "a quantity in " + base_unit_exponents(dimension);
}

std::string si_symbol(const Dimension& dimension) {
  if (dimension.is_dimensionless()) return "";
  for (const Unit& unit : all_units())
    if (unit.dimension == dimension) return unit.name;
  return base_unit_exponents(dimension);
}

Dimension dimension_of(Kind kind) {
  switch (kind) {
    case Kind::Number: return Dimension{};
    case Kind::Length: return kLength;
    case Kind::Voltage: return kVoltage;
    case Kind::Field: return kField;
    case Kind::Pressure: return kPressure;
    case Kind::Temperature: return kTemperature;
  }
  return Dimension{};
}

std::string kind_key(Kind kind) {
  switch (kind) {
    case Kind::Number: return "";
    case Kind::Length: return "length";
    case Kind::Voltage: return "voltage";
    case Kind::Field: return "field";
    case Kind::Pressure: return "pressure";
    case Kind::Temperature: return "temperature";
  }
  return "";
}

std::string kind_example(Kind kind) {
  switch (kind) {
    case Kind::Number: return "4.4";
    case Kind::Length: return "25 mm";
    case Kind::Voltage: return "145 kV";
    case Kind::Field: return "3 MV/m";
    case Kind::Pressure: return "101.3 kPa";
    case Kind::Temperature: return "20 degC";
  }
  return "";
}

}  // namespace hv
