// Values and expressions of the case file: numbers with units, arithmetic with dimension checks,
// functions, default units, and errors that point at the column inside the expression.
// Unit values: SI brochure (BIPM, 9th edition, 2019), prefixes and degC offset 273.15 K.
#include <gtest/gtest.h>

#include <cmath>

#include "tools/case/expression.h"

namespace hv {
namespace {

const SourceLocation kPlace{"case.yaml", 7, 11, "shapes[0].circle.radius"};

Variables sample_variables() {
  return {{"ring_R", {0.35, dimension_of(Kind::Length)}},
          {"U", {300e3, dimension_of(Kind::Voltage)}},
          {"n", {3.0, Dimension{}}}};
}

Quantity eval(const std::string& text) { return evaluate_expression(text, sample_variables(), kPlace); }

double eval_as(const std::string& text, Kind kind, const DefaultUnits& defaults = {}) {
  return evaluate_as(text, kind, sample_variables(), defaults, kPlace);
}

// The InputError that evaluating `text` throws.
InputError error_of(const std::string& text) {
  try {
    eval(text);
  } catch (const InputError& error) {
    return error;
  }
  ADD_FAILURE() << "no error for `" << text << "`";
  return InputError(SourceLocation{}, "");
}

TEST(Expression, NumbersTakeTheirUnitScale) {
  EXPECT_DOUBLE_EQ(eval("25 mm").value, 0.025);
  EXPECT_DOUBLE_EQ(eval("25mm").value, 0.025);
  EXPECT_DOUBLE_EQ(eval("1.2 m").value, 1.2);
  EXPECT_DOUBLE_EQ(eval("145 kV").value, 145e3);
  EXPECT_DOUBLE_EQ(eval("3 MV/m").value, 3e6);
  EXPECT_DOUBLE_EQ(eval("101.3 kPa").value, 101.3e3);
  EXPECT_DOUBLE_EQ(eval("1 bar").value, 1e5);
  EXPECT_DOUBLE_EQ(eval("293 K").value, 293.0);
  EXPECT_DOUBLE_EQ(eval("2.5e-3 m").value, 2.5e-3);
  EXPECT_DOUBLE_EQ(eval(".5").value, 0.5);
  EXPECT_EQ(eval("3 MV/m").dimension, dimension_of(Kind::Field));
  EXPECT_TRUE(eval("42").dimension.is_dimensionless());
}

TEST(Expression, CelsiusPlainValuesAddTheOffset) {
  // T/K = t/degC + 273.15 (SI brochure section 2.3.1).
  EXPECT_DOUBLE_EQ(eval("20 degC").value, 293.15);
  EXPECT_DOUBLE_EQ(eval(" -5 degC ").value, 268.15);
  EXPECT_EQ(eval("20 degC").dimension, dimension_of(Kind::Temperature));
}

TEST(Expression, UnitBindsToTheNumberBeforeIt) {
  EXPECT_DOUBLE_EQ(eval("2*25 mm").value, 0.05);
  EXPECT_DOUBLE_EQ(eval("300 kV * sqrt(2)").value, 300e3 * std::sqrt(2.0));
  EXPECT_DOUBLE_EQ(eval("1 m + 20 cm").value, 1.2);
  // `kV/ring_R` is no unit: kV divided by the parameter.
  EXPECT_DOUBLE_EQ(eval("105 kV/ring_R").value, 3e5);
  EXPECT_EQ(eval("105 kV/ring_R").dimension, dimension_of(Kind::Field));
}

TEST(Expression, PrecedenceAndAssociativity) {
  EXPECT_DOUBLE_EQ(eval("2 + 3*4").value, 14.0);
  EXPECT_DOUBLE_EQ(eval("(2 + 3)*4").value, 20.0);
  EXPECT_DOUBLE_EQ(eval("10/4/5").value, 0.5);
  EXPECT_DOUBLE_EQ(eval("2^3^2").value, 512.0);  // right-associative
  EXPECT_DOUBLE_EQ(eval("-2^2").value, -4.0);    // unary minus binds looser than ^
  EXPECT_DOUBLE_EQ(eval("2^-1").value, 0.5);
  EXPECT_DOUBLE_EQ(eval("8 - 2 - 1").value, 5.0);
  EXPECT_DOUBLE_EQ(eval("--3").value, 3.0);
}

TEST(Expression, DimensionsFollowTheArithmetic) {
  const Quantity field = eval("U / (10 mm)");
  EXPECT_DOUBLE_EQ(field.value, 3e7);
  EXPECT_EQ(field.dimension, dimension_of(Kind::Field));
  const Quantity area = eval("(2 mm)^2");
  EXPECT_DOUBLE_EQ(area.value, 4e-6);
  EXPECT_EQ(area.dimension, power(dimension_of(Kind::Length), 2));
  const Quantity mean = eval("sqrt(4 mm * 9 mm)");
  EXPECT_NEAR(mean.value, 6e-3, 1e-15);
  EXPECT_EQ(mean.dimension, dimension_of(Kind::Length));
  EXPECT_TRUE(eval("ring_R / 1 mm").dimension.is_dimensionless());
  EXPECT_DOUBLE_EQ(eval("ring_R / 1 mm").value, 350.0);
}

TEST(Expression, FunctionsAndPi) {
  EXPECT_DOUBLE_EQ(eval("exp(0)").value, 1.0);
  EXPECT_DOUBLE_EQ(eval("log(exp(2))").value, 2.0);  // natural logarithm
  EXPECT_DOUBLE_EQ(eval("sin(pi/2)").value, 1.0);
  EXPECT_DOUBLE_EQ(eval("cos(0)").value, 1.0);
  EXPECT_NEAR(eval("tan(pi/4)").value, 1.0, 1e-15);
  EXPECT_DOUBLE_EQ(eval("pi").value, 3.14159265358979323846);
  EXPECT_DOUBLE_EQ(eval("abs(-3 mm)").value, 3e-3);
  EXPECT_DOUBLE_EQ(eval("min(3 mm, 2 mm)").value, 2e-3);
  EXPECT_DOUBLE_EQ(eval("max(ring_R, 2 m)").value, 2.0);
  EXPECT_DOUBLE_EQ(eval("n * 2").value, 6.0);
}

TEST(Expression, BareNumbersTakeTheDefaultUnitOfTheKind) {
  DefaultUnits defaults;
  defaults[Kind::Length] = find_unit("mm");
  defaults[Kind::Voltage] = find_unit("kV");
  defaults[Kind::Temperature] = find_unit("degC");
  EXPECT_DOUBLE_EQ(eval_as("25", Kind::Length, defaults), 0.025);
  EXPECT_DOUBLE_EQ(eval_as("2*pi", Kind::Length, defaults), 2e-3 * 3.14159265358979323846);
  EXPECT_DOUBLE_EQ(eval_as("1.2 m", Kind::Length, defaults), 1.2);
  EXPECT_DOUBLE_EQ(eval_as("145", Kind::Voltage, defaults), 145e3);
  EXPECT_DOUBLE_EQ(eval_as("20", Kind::Temperature, defaults), 293.15);
  EXPECT_DOUBLE_EQ(eval_as("25", Kind::Length), 25.0);  // SI without `units:`
  EXPECT_DOUBLE_EQ(eval_as("4.4", Kind::Number, defaults), 4.4);
}

TEST(Expression, WrongKindSaysWhatWasExpected) {
  try {
    eval_as("2 kV", Kind::Length);
    FAIL() << "a voltage was accepted as a length";
  } catch (const InputError& error) {
    EXPECT_EQ(error.problem(), "expected a length (e.g. 25 mm), got a voltage");
    EXPECT_EQ(error.where().column, 11);
  }
  EXPECT_THROW(eval_as("3 mm", Kind::Number), InputError);
  EXPECT_THROW(eval_as("U", Kind::Field), InputError);
}

struct BadExpression {
  const char* text;
  int offset;            // 0-based character inside the text the error points at
  const char* fragment;  // part of the problem
};

TEST(Expression, ErrorsPointAtTheirColumn) {
  const BadExpression cases[] = {
      {"ring_R + 3 kV", 7, "cannot add a length and a voltage"},
      {"ring_R - 3 kV", 7, "cannot subtract a voltage from a length"},
      {"ring_R + 3", 7, "cannot add a length and a dimensionless number"},
      {"20 degC + 5 K", 3, "`degC` may only follow a plain value"},
      {"sqrt(2 mm)", 0, "square root of a length"},
      {"exp(2 mm)", 0, "`exp` needs a pure number, got a length"},
      {"(2 mm)^0.5", 6, "raised to 0.5"},
      {"2^(1 mm)", 1, "the exponent is a length"},
      {"3 xyz", 2, "unknown unit `xyz`"},
      {"2 ring_R", 2, "`ring_R` after a number is not a unit"},
      {"ringR * 2", 0, "unknown name `ringR`"},
      {"min(1 mm, 1 kV)", 0, "two values of the same kind"},
      {"1/0", 1, "division by zero"},
      {"sqrt(-1)", 0, "sqrt of a negative number"},
      {"log(0)", 0, "log of a number that is not positive"},
      {"(1 + 2", 0, "expected `)`"},
      {"1 + ", 4, "ends where a number was expected"},
      {"sqrt 2", 0, "the function `sqrt` needs `(`"},
      {"foo(2)", 0, "unknown function `foo`"},
      {"min(1)", 0, "takes 2 arguments, got 1"},
      {"", 0, "the value is empty"},
      {"exp(1000)", 0, "not a finite number"},
      {"mm", 0, "the unit `mm` has no number"},
      {"2 * * 3", 4, "unexpected `*`"},
      {"1 2", 2, "unexpected `2`"},
  };
  for (const BadExpression& bad : cases) {
    const InputError error = error_of(bad.text);
    EXPECT_NE(error.problem().find(bad.fragment), std::string::npos) << bad.text << ": " << error.what();
    EXPECT_EQ(error.where().line, 7) << bad.text;
    EXPECT_EQ(error.where().column, 11 + bad.offset) << bad.text << ": " << error.what();
    EXPECT_EQ(error.where().key_path, "shapes[0].circle.radius");
  }
}

TEST(Expression, MisspeltNamesGetASuggestion) {
  EXPECT_EQ(error_of("ring_r * 2").hint(), "Did you mean `ring_R`?");
  EXPECT_EQ(error_of("101 kpa").hint(), "Did you mean `kPa`?");
  EXPECT_EQ(error_of("sqr(2)").hint(), "Did you mean `sqrt`?");
}

TEST(Expression, WithoutALineTheProblemNamesTheCharacter) {
  // --set values have no place in the file: the message counts characters instead.
  try {
    evaluate_expression("1 m + 2 kV", {}, SourceLocation{"", 0, 0, "--set a"});
    FAIL() << "no error";
  } catch (const InputError& error) {
    EXPECT_NE(std::string(error.what()).find("--set a: cannot add a length and a voltage (at character 5 of `1 m + 2 kV`)"),
              std::string::npos)
        << error.what();
  }
}

TEST(Expression, ReservedNamesAreUnitsFunctionsAndPi) {
  EXPECT_TRUE(is_reserved_name("mm"));
  EXPECT_TRUE(is_reserved_name("kV/cm"));
  EXPECT_TRUE(is_reserved_name("sqrt"));
  EXPECT_TRUE(is_reserved_name("pi"));
  EXPECT_FALSE(is_reserved_name("ring_R"));
}

}  // namespace
}  // namespace hv
