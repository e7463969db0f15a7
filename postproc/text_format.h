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

// A JSON string literal: quotes and RFC 8259 (section 7) escapes, UTF-8 passed through.
std::string json_string(const std::string& text);

// A JSON number: round_trip_number, or null for NaN and infinities (RFC 8259 section 6 has none).
std::string json_number(double value);

// A CSV field: as it is, or quoted with inner quotes doubled when it holds a comma, a quote or a line
// break (RFC 4180 section 2).
std::string csv_field(const std::string& text);

}  // namespace hv
