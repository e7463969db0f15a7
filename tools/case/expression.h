// Values of the case file: a number with an optional unit, or an arithmetic expression over numbers,
// units and parameters, evaluated with dimension checks.
//
//   sum     := product (('+' | '-') product)*
//   product := signed (('*' | '/') signed)*
//   signed  := ('-' | '+') signed | power
//   power   := primary ('^' signed)?
//   primary := number unit? | '(' sum ')' | function '(' sum (',' sum)? ')' | 'pi' | parameter
//
// A unit binds to the number right before it (`2*25 mm` is 50 mm); a unit is a name, optionally
// followed by `/name` with no spaces (`3 MV/m`). `degC` is accepted only for a plain value such as
// `20 degC` or `-5 degC`, since its offset has no meaning inside arithmetic.
#pragma once

#include <array>
#include <map>
#include <string>

#include "mesh/base.h"
#include "tools/case/units.h"

namespace hv {

// A value in SI units with its dimension.
struct Quantity {
  double value = 0.0;
  Dimension dimension;
};

// The parameters an expression may use, by name.
using Variables = std::map<std::string, Quantity>;

// The unit a bare number of each kind takes (`units:` of the case); nullptr means SI.
struct DefaultUnits {
  std::array<const Unit*, 6> of_kind{};  // indexed by Kind
  const Unit* operator[](Kind kind) const { return of_kind[static_cast<std::size_t>(kind)]; }
  const Unit*& operator[](Kind kind) { return of_kind[static_cast<std::size_t>(kind)]; }
};

// Evaluates `text`. `where` is the place of the text's first character: an error adds the offset
// inside the text to its column (or, with no line known, names the character in the problem).
// Throws InputError for syntax errors, unknown names or units, mismatched dimensions, and results
// that are not finite.
Quantity evaluate_expression(const std::string& text, const Variables& variables, const SourceLocation& where);

// Evaluates `text` as a value of `kind` and returns it in SI units. A dimensionless result takes the
// default unit of the kind; a dimensioned one must be of the kind ("expected a length (e.g. 25 mm),
// got a voltage").
double evaluate_as(const std::string& text, Kind kind, const Variables& variables, const DefaultUnits& defaults,
                   const SourceLocation& where);

// True for names an expression reserves: functions, `pi` and units. Parameters may not use them.
bool is_reserved_name(const std::string& name);

}  // namespace hv
