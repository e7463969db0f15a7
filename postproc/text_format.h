// Number formatting shared by the text writers (JSON, CSV, report). Locale-independent: the decimal
// separator is always '.'.
#pragma once

#include <string>

namespace hv {

// The shortest decimal text that reads back (strtod) to exactly `value`: at most 17 significant
// digits, e.g. "0.35", "424264.06871192151", "1e-12". Non-finite values give "nan", "inf", "-inf".
std::string round_trip_number(double value);

// `value` rounded to `digits` (1 to 17) significant digits, printf "%.*g" style ("3.456", "1.2e-05").
std::string significant(double value, int digits);

}  // namespace hv
