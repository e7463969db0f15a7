// Units of the case file against their definitions. Sources: the SI brochure (BIPM, 9th edition,
// 2019): Table 7 for the prefixes, Table 4 for the derived units, section 2.3.1 for the Celsius
// temperature (table numbers recalled from memory).
#include <gtest/gtest.h>

#include "tools/case/units.h"

namespace hv {
namespace {

double scale_of(const std::string& name) {
  const Unit* unit = find_unit(name);
  EXPECT_NE(unit, nullptr) << name;
  return unit ? unit->scale : 0.0;
}

const Dimension kMetre = Dimension::of(1, 0, 0, 0, 0);
const Dimension kSecond = Dimension::of(0, 0, 1, 0, 0);
const Dimension kAmpere = Dimension::of(0, 0, 0, 1, 0);

TEST(Units, PrefixesFollowTheSiBrochure) {
  // SI brochure Table 7: c = 1e-2, m = 1e-3, micro = 1e-6, k = 1e3, M = 1e6, n = 1e-9, p = 1e-12.
  EXPECT_DOUBLE_EQ(scale_of("cm"), 1e-2);
  EXPECT_DOUBLE_EQ(scale_of("mm"), 1e-3);
  EXPECT_DOUBLE_EQ(scale_of("um"), 1e-6);
  EXPECT_DOUBLE_EQ(scale_of("km"), 1e3);
  EXPECT_DOUBLE_EQ(scale_of("kV"), 1e3);
  EXPECT_DOUBLE_EQ(scale_of("MV"), 1e6);
  EXPECT_DOUBLE_EQ(scale_of("kPa"), 1e3);
  EXPECT_DOUBLE_EQ(scale_of("MPa"), 1e6);
  EXPECT_DOUBLE_EQ(scale_of("nF"), 1e-9);
  EXPECT_DOUBLE_EQ(scale_of("pF"), 1e-12);
  EXPECT_DOUBLE_EQ(scale_of("ms"), 1e-3);
  EXPECT_DOUBLE_EQ(scale_of("us"), 1e-6);
}

TEST(Units, FieldUnitsAreVoltPerLength) {
  // 1 kV/cm = 1e3 V / 1e-2 m = 1e5 V/m; 1 kV/mm = 1 MV/m = 1e6 V/m (prefixes of Table 7).
  EXPECT_DOUBLE_EQ(scale_of("kV/m"), 1e3);
  EXPECT_DOUBLE_EQ(scale_of("kV/cm"), 1e5);
  EXPECT_DOUBLE_EQ(scale_of("kV/mm"), 1e6);
  EXPECT_DOUBLE_EQ(scale_of("MV/m"), 1e6);
  EXPECT_EQ(find_unit("kV/cm")->dimension, find_unit("V")->dimension / kMetre);
}

TEST(Units, BarIsHundredKilopascal) {
  // 1 bar = 1e5 Pa exactly, 1 mbar = 100 Pa (SI brochure 8th edition, Table 8; recalled from memory).
  EXPECT_DOUBLE_EQ(scale_of("bar"), 1e5);
  EXPECT_DOUBLE_EQ(scale_of("mbar"), 1e2);
  EXPECT_EQ(find_unit("bar")->dimension, find_unit("Pa")->dimension);
}

TEST(Units, CelsiusIsKelvinMinus273p15) {
  // SI brochure section 2.3.1: t/degC = T/K - 273.15.
  const Unit* celsius = find_unit("degC");
  ASSERT_NE(celsius, nullptr);
  EXPECT_DOUBLE_EQ(20.0 * celsius->scale + celsius->offset, 293.15);
  EXPECT_EQ(celsius->dimension, find_unit("K")->dimension);
  EXPECT_EQ(find_unit("K")->offset, 0.0);
}

TEST(Units, DerivedUnitsHaveTheirSiDimensions) {
  // SI brochure Table 4: V = W/A, F = C/V, C = A s, J = N m, Pa = N/m^2, with W = J/s.
  const Dimension volt = find_unit("V")->dimension;
  const Dimension coulomb = find_unit("C")->dimension;
  const Dimension joule = find_unit("J")->dimension;
  EXPECT_EQ(coulomb, kAmpere * kSecond);
  EXPECT_EQ(volt, joule / kSecond / kAmpere);
  EXPECT_EQ(find_unit("F")->dimension, coulomb / volt);
  EXPECT_EQ(find_unit("Pa")->dimension * power(kMetre, 3), joule);
  EXPECT_EQ(joule, Dimension::of(2, 1, -2, 0, 0));
}

TEST(Units, DimensionsAreNamedForMessages) {
  EXPECT_EQ(describe_dimension(kMetre), "a length");
  EXPECT_EQ(describe_dimension(find_unit("kV")->dimension), "a voltage");
  EXPECT_EQ(describe_dimension(find_unit("MV/m")->dimension), "an electric field");
  EXPECT_EQ(describe_dimension(find_unit("bar")->dimension), "a pressure");
  EXPECT_EQ(describe_dimension(find_unit("degC")->dimension), "a temperature");
  EXPECT_EQ(describe_dimension(Dimension{}), "a dimensionless number");
  EXPECT_EQ(describe_dimension(power(kMetre, 2)), "a quantity in m^2");
}

TEST(Units, SiSymbolsNameTheCoherentUnit) {
  EXPECT_EQ(si_symbol(find_unit("mm")->dimension), "m");
  EXPECT_EQ(si_symbol(find_unit("kV")->dimension), "V");
  EXPECT_EQ(si_symbol(find_unit("kV/cm")->dimension), "V/m");
  EXPECT_EQ(si_symbol(find_unit("mbar")->dimension), "Pa");
  EXPECT_EQ(si_symbol(find_unit("pF")->dimension), "F");
  EXPECT_EQ(si_symbol(Dimension{}), "");
  EXPECT_EQ(si_symbol(Dimension::of(2, -1, 0, 0, 0)), "m^2 kg^-1");
}

TEST(Units, KindsMapToTheirDimensions) {
  EXPECT_EQ(dimension_of(Kind::Length), kMetre);
  EXPECT_EQ(dimension_of(Kind::Voltage), find_unit("V")->dimension);
  EXPECT_EQ(dimension_of(Kind::Field), find_unit("V/m")->dimension);
  EXPECT_EQ(dimension_of(Kind::Pressure), find_unit("Pa")->dimension);
  EXPECT_EQ(dimension_of(Kind::Temperature), find_unit("K")->dimension);
  EXPECT_TRUE(dimension_of(Kind::Number).is_dimensionless());
}

TEST(Units, SquareRootHalvesExponents) {
  EXPECT_TRUE(has_even_exponents(power(kMetre, 2)));
  EXPECT_FALSE(has_even_exponents(kMetre));
  EXPECT_EQ(square_root(power(find_unit("V")->dimension, 2)), find_unit("V")->dimension);
}

TEST(Units, NamesAreCaseSensitive) {
  // SI brochure section 3: the prefix M (mega) differs from m (milli).
  EXPECT_EQ(find_unit("Mm"), nullptr);
  EXPECT_EQ(find_unit("kv"), nullptr);
  EXPECT_NE(find_unit("mm"), nullptr);
}

}  // namespace
}  // namespace hv
