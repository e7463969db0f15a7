#include "tools/case/expression.h"

#include <cctype>
#include <cmath>
#include <cstdlib>
#include <optional>
#include <vector>

#include "tools/case/suggest.h"

namespace hv {

namespace {

constexpr double kPi = 3.14159265358979323846;
// Deepest nesting of parentheses, function calls, signs and exponents. Each level costs a few stack
// frames of the recursive descent; a limit far above any real value keeps absurd input (thousands
// of `(`) from overflowing the stack.
constexpr int kMaxNesting = 200;

struct Function {
  const char* name;
  int arguments;
};

constexpr Function kFunctions[] = {{"sqrt", 1}, {"exp", 1}, {"log", 1}, {"sin", 1}, {"cos", 1},
                                   {"tan", 1},  {"abs", 1}, {"min", 2}, {"max", 2}};

const Function* find_function(const std::string& name) {
  for (const Function& function : kFunctions)
    if (name == function.name) return &function;
  return nullptr;
}

bool is_identifier_start(char c) { return std::isalpha(static_cast<unsigned char>(c)) || c == '_'; }
bool is_identifier_char(char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; }
bool is_digit(char c) { return std::isdigit(static_cast<unsigned char>(c)) != 0; }

// No physical quantity needs a unit exponent beyond this; refusing larger ones also keeps the
// integer exponents of a Dimension from overflowing (found by fuzzing: `m^1e47`, `((m^9)^9)^9...`).
constexpr double kMaxUnitExponent = 64;

bool power_keeps_unit_exponents_small(const Dimension& base, double exponent) {
  for (int base_exponent : base.exponents)
    if (std::abs(base_exponent * exponent) > kMaxUnitExponent) return false;
  return true;
}

std::string exponent_text(double exponent) {
  std::string text = std::to_string(exponent);
  text.erase(text.find_last_not_of('0') + 1);
  if (text.back() == '.') text.pop_back();
  return text;
}

// Recursive descent over the grammar in expression.h, evaluating while it parses. Offsets are
// 0-based positions in the text; errors turn them into columns of the case file.
class Parser {
 public:
  Parser(const std::string& text, const Variables& variables, const SourceLocation& where)
      : text_(text), variables_(variables), where_(where) {}

  Quantity parse() {
    if (std::optional<Quantity> temperature = plain_offset_value()) return *temperature;
    skip_spaces();
    if (at_end()) fail(0, "the value is empty", "Write a number, e.g. `25 mm`");
    Quantity result = sum();
    skip_spaces();
    if (!at_end()) {
      const std::string rest = text_.substr(pos_, 1);
      fail(pos_, "unexpected `" + rest + "`",
           peek() == ')' ? "Remove it or add the matching `(`" : "Join values with + - * / ^ (a unit must follow its number)");
    }
    if (!std::isfinite(result.value)) fail(0, "the value is not a finite number", "Check for overflow, e.g. exp of a large number");
    return result;
  }

 private:
  // `20 degC` or `-5 degC`: the only place where a unit with an offset is allowed.
  std::optional<Quantity> plain_offset_value() {
    skip_spaces();
    const bool negative = accept('-');
    skip_spaces();
    if (at_number()) {
      const double number = read_number();
      skip_spaces();
      const Unit* unit = at_identifier() ? read_unit() : nullptr;
      skip_spaces();
      if (unit && unit->offset != 0.0 && at_end())
        return Quantity{(negative ? -number : number) * unit->scale + unit->offset, unit->dimension};
    }
    pos_ = 0;
    return std::nullopt;
  }

  Quantity sum() {
    Quantity left = product();
    for (;;) {
      skip_spaces();
      const std::size_t op = pos_;
      if (!accept('+') && !accept('-')) return left;
      const bool add = text_[op] == '+';
      const Quantity right = product();
      if (left.dimension != right.dimension) {
        fail(op,
             add ? "cannot add " + describe_dimension(left.dimension) + " and " + describe_dimension(right.dimension)
                 : "cannot subtract " + describe_dimension(right.dimension) + " from " +
                       describe_dimension(left.dimension),
             "Both sides of `" + std::string(1, text_[op]) + "` need the same kind of unit; give bare numbers a unit");
      }
      left.value = add ? left.value + right.value : left.value - right.value;
    }
  }

  Quantity product() {
    Quantity left = signed_value();
    for (;;) {
      skip_spaces();
      const std::size_t op = pos_;
      if (!accept('*') && !accept('/')) return left;
      const Quantity right = signed_value();
      if (text_[op] == '*') {
        left = {left.value * right.value, left.dimension * right.dimension};
      } else {
        if (right.value == 0.0) fail(op, "division by zero", "Check the divisor");
        left = {left.value / right.value, left.dimension / right.dimension};
      }
    }
  }

  // Every recursion of the grammar passes through here, so this is where nesting is counted.
  Quantity signed_value() {
    skip_spaces();
    if (depth_ == kMaxNesting)
      fail(pos_, "the value nests deeper than " + std::to_string(kMaxNesting) + " levels",
           "Simplify it: use fewer parentheses, signs or `^`, or split it into parameters");
    ++depth_;
    const Quantity result = sign_or_power();
    --depth_;
    return result;
  }

  Quantity sign_or_power() {
    if (accept('-')) {
      Quantity operand = signed_value();
      operand.value = -operand.value;
      return operand;
    }
    if (accept('+')) return signed_value();
    return power_value();
  }

  Quantity power_value() {
    const Quantity base = primary();
    skip_spaces();
    const std::size_t op = pos_;
    if (!accept('^')) return base;
    const Quantity exponent = signed_value();
    if (!exponent.dimension.is_dimensionless())
      fail(op, "the exponent is " + describe_dimension(exponent.dimension), "An exponent must be a pure number");
    if (base.dimension.is_dimensionless()) return {std::pow(base.value, exponent.value), base.dimension};
    const double whole = std::round(exponent.value);
    if (whole != exponent.value)
      fail(op, describe_dimension(base.dimension) + " raised to " + exponent_text(exponent.value) + " has no unit",
           "Raise a quantity with a unit only to a whole power; use sqrt for a square root");
    if (!power_keeps_unit_exponents_small(base.dimension, whole))
      fail(op, describe_dimension(base.dimension) + " raised to " + exponent_text(whole) + " has no unit",
           "Keep the power of each unit within " + exponent_text(kMaxUnitExponent));
    return {std::pow(base.value, exponent.value), power(base.dimension, static_cast<int>(whole))};
  }

  Quantity primary() {
    skip_spaces();
    const std::size_t start = pos_;
    if (accept('(')) {
      const Quantity inner = sum();
      expect(')', start);
      return inner;
    }
    if (at_number()) return number_with_unit();
    if (at_identifier()) {
      const std::string name = read_identifier();
      skip_spaces();
      if (peek() == '(') return function_call(name, start);
      return named_value(name, start);
    }
    if (at_end()) fail(pos_, "the value ends where a number was expected", "Complete the expression");
    fail(pos_, "unexpected `" + text_.substr(pos_, 1) + "`", "Expected a number, a parameter, a function or `(`");
  }

  Quantity number_with_unit() {
    const double number = read_number();
    skip_spaces();
    if (!at_identifier()) return {number, Dimension{}};
    const std::size_t unit_start = pos_;
    const Unit* unit = read_unit();
    if (unit->offset != 0.0)
      fail(unit_start, "`" + unit->name + "` may only follow a plain value such as `20 degC`, not appear in arithmetic",
           "Write temperatures in arithmetic in K (20 degC = 293.15 K)");
    return {number * unit->scale, unit->dimension};
  }

  // Reads the unit at the current position; a name that is no unit is an error.
  const Unit* read_unit() {
    const std::size_t start = pos_;
    const std::string name = read_identifier();
    if (peek() == '/' && pos_ + 1 < text_.size() && is_identifier_start(text_[pos_ + 1])) {
      const std::size_t slash = pos_;
      ++pos_;
      const std::string compound = name + "/" + read_identifier();
      if (const Unit* unit = find_unit(compound)) return unit;
      pos_ = slash;  // `kV/d`: the unit kV divided by the parameter d
    }
    if (const Unit* unit = find_unit(name)) return unit;
    if (variables_.count(name) || find_function(name) || name == "pi")
      fail(start, "`" + name + "` after a number is not a unit", "Write `*` to multiply, e.g. `2*" + name + "`");
    std::vector<std::string> names;
    for (const Unit& unit : all_units()) names.push_back(unit.name);
    const std::string suggestion = did_you_mean(name, names);
    fail(start, "unknown unit `" + name + "`", suggestion.empty() ? "Units: " + quoted_list(names) : suggestion);
  }

  Quantity named_value(const std::string& name, std::size_t start) {
    if (name == "pi") return {kPi, Dimension{}};
    const auto variable = variables_.find(name);
    if (variable != variables_.end()) return variable->second;
    if (find_unit(name)) fail(start, "the unit `" + name + "` has no number", "Write a number before it, e.g. `1 " + name + "`");
    if (find_function(name)) fail(start, "the function `" + name + "` needs `(`", "Write e.g. `" + name + "(2)`");
    std::vector<std::string> names = {"pi"};
    for (const auto& entry : variables_) names.push_back(entry.first);
    const std::string suggestion = did_you_mean(name, names);
    fail(start, "unknown name `" + name + "`",
         suggestion.empty() ? "Define it under `parameters:` above the place where it is used" : suggestion);
  }

  Quantity function_call(const std::string& name, std::size_t start) {
    const Function* function = find_function(name);
    if (!function) {
      std::vector<std::string> names;
      for (const Function& f : kFunctions) names.push_back(f.name);
      const std::string suggestion = did_you_mean(name, names);
      fail(start, "unknown function `" + name + "`", suggestion.empty() ? "Functions: " + quoted_list(names) : suggestion);
    }
    accept('(');
    std::vector<Quantity> arguments = {sum()};
    skip_spaces();
    while (accept(',')) arguments.push_back(sum());
    expect(')', start);
    if (static_cast<int>(arguments.size()) != function->arguments)
      fail(start, "`" + name + "` takes " + std::to_string(function->arguments) + " argument" +
                      (function->arguments == 1 ? "" : "s") + ", got " + std::to_string(arguments.size()),
           function->arguments == 1 ? "Write e.g. `" + name + "(2)`" : "Write e.g. `" + name + "(a, b)`");
    return apply(name, arguments, start);
  }

  Quantity apply(const std::string& name, const std::vector<Quantity>& arguments, std::size_t start) {
    const Quantity& x = arguments[0];
    if (name == "abs") return {std::fabs(x.value), x.dimension};
    if (name == "min" || name == "max") {
      const Quantity& y = arguments[1];
      if (x.dimension != y.dimension)
        fail(start, "`" + name + "` needs two values of the same kind, got " + describe_dimension(x.dimension) +
                        " and " + describe_dimension(y.dimension),
             "Give both arguments the same kind of unit");
      const bool first = name == "min" ? x.value <= y.value : x.value >= y.value;
      return first ? x : y;
    }
    if (name == "sqrt") {
      if (!has_even_exponents(x.dimension))
        fail(start, "the square root of " + describe_dimension(x.dimension) + " has no unit",
             "Take sqrt of a pure number or of a squared quantity");
      if (x.value < 0.0) fail(start, "sqrt of a negative number", "Check the argument");
      return {std::sqrt(x.value), square_root(x.dimension)};
    }
    if (!x.dimension.is_dimensionless())
      fail(start, "`" + name + "` needs a pure number, got " + describe_dimension(x.dimension),
           "Divide by a unit first, e.g. `" + name + "(d / 1 mm)`");
    if (name == "log") {
      if (x.value <= 0.0) fail(start, "log of a number that is not positive", "log is the natural logarithm of a positive number");
      return {std::log(x.value), Dimension{}};
    }
    if (name == "exp") return {std::exp(x.value), Dimension{}};
    if (name == "sin") return {std::sin(x.value), Dimension{}};
    if (name == "cos") return {std::cos(x.value), Dimension{}};
    return {std::tan(x.value), Dimension{}};
  }

  // Lexing.
  void skip_spaces() {
    while (!at_end() && std::isspace(static_cast<unsigned char>(text_[pos_]))) ++pos_;
  }
  bool at_end() const { return pos_ >= text_.size(); }
  char peek() const { return at_end() ? '\0' : text_[pos_]; }
  bool accept(char c) {
    if (peek() != c) return false;
    ++pos_;
    return true;
  }
  void expect(char c, std::size_t opened_at) {
    skip_spaces();
    if (!accept(c))
      fail(at_end() ? opened_at : pos_, std::string("expected `") + c + "`",
           at_end() ? "Close the `(` opened here" : "Separate arguments with `,` and close with `)`");
  }
  bool at_number() const {
    return is_digit(peek()) || (peek() == '.' && pos_ + 1 < text_.size() && is_digit(text_[pos_ + 1]));
  }
  bool at_identifier() const { return is_identifier_start(peek()); }

  // digits [. digits] [(e|E) [+|-] digits]; the exponent only when digits follow, so `2 em` stays a unit.
  double read_number() {
    const std::size_t start = pos_;
    while (is_digit(peek())) ++pos_;
    if (accept('.'))
      while (is_digit(peek())) ++pos_;
    if (peek() == 'e' || peek() == 'E') {
      std::size_t after = pos_ + 1;
      if (after < text_.size() && (text_[after] == '+' || text_[after] == '-')) ++after;
      if (after < text_.size() && is_digit(text_[after])) {
        pos_ = after;
        while (is_digit(peek())) ++pos_;
      }
    }
    return std::strtod(text_.substr(start, pos_ - start).c_str(), nullptr);
  }

  std::string read_identifier() {
    const std::size_t start = pos_;
    while (is_identifier_char(peek())) ++pos_;
    return text_.substr(start, pos_ - start);
  }

  [[noreturn]] void fail(std::size_t offset, std::string problem, const std::string& hint) const {
    SourceLocation where = where_;
    if (where.line > 0)
      where.column += static_cast<int>(offset);
    else
      problem += " (at character " + std::to_string(offset + 1) + " of `" + text_ + "`)";
    throw InputError(where, problem, hint);
  }

  const std::string& text_;
  const Variables& variables_;
  const SourceLocation& where_;
  std::size_t pos_ = 0;
  int depth_ = 0;  // signed values being parsed, one inside the other
};

}  // namespace

Quantity evaluate_expression(const std::string& text, const Variables& variables, const SourceLocation& where) {
  return Parser(text, variables, where).parse();
}

double evaluate_as(const std::string& text, Kind kind, const Variables& variables, const DefaultUnits& defaults,
                   const SourceLocation& where) {
  const Quantity value = evaluate_expression(text, variables, where);
  if (value.dimension.is_dimensionless() && kind != Kind::Number) {
    const Unit* unit = defaults[kind];
    return unit ? value.value * unit->scale + unit->offset : value.value;
  }
  const Dimension expected = dimension_of(kind);
  if (value.dimension != expected) {
    const std::string hint = kind == Kind::Number
                                 ? "This value is a pure number: remove the unit"
                                 : "Use a unit of " + describe_dimension(expected) + ": " + quoted_list(unit_names_of(expected));
    throw InputError(where,
                     "expected " + describe_dimension(expected) + " (e.g. " + kind_example(kind) + "), got " +
                         describe_dimension(value.dimension),
                     hint);
  }
  return value.value;
}

bool is_reserved_name(const std::string& name) { return name == "pi" || find_function(name) || find_unit(name); }

}  // namespace hv
