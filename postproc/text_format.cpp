#include "postproc/text_format.h"

#include <charconv>
#include <cmath>

namespace hv {

// std::to_chars never consults the C locale (C++17 [charconv.to.chars]), unlike printf.

std::string round_trip_number(double value) {
  // Without a precision, to_chars gives the shortest text that reads back to the same double.
  char buffer[32];
  const std::to_chars_result result = std::to_chars(buffer, buffer + sizeof buffer, value);
  return std::string(buffer, result.ptr);
}

std::string significant(double value, int digits) {
  // chars_format::general with a precision is specified as printf's "%.*g".
  char buffer[64];
  const std::to_chars_result result =
      std::to_chars(buffer, buffer + sizeof buffer, value, std::chars_format::general, digits);
  return std::string(buffer, result.ptr);
}

// A JSON string literal. RFC 8259 section 7: the quotation mark, the reverse solidus and the control
// characters U+0000..U+001F must be escaped; all other text (UTF-8 included) passes through.
std::string json_string(const std::string& text) {
  static const char* const hex_digits = "0123456789abcdef";
  std::string out = "\"";
  for (const char c : text) {
    const auto byte = static_cast<unsigned char>(c);
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\b': out += "\\b"; break;
      case '\f': out += "\\f"; break;
      case '\n': out += "\\n"; break;
      case '\r': out += "\\r"; break;
      case '\t': out += "\\t"; break;
      default:
        if (byte < 0x20) {
          out += "\\u00";
          out += hex_digits[byte >> 4];
          out += hex_digits[byte & 0xF];
        } else {
          out += c;
        }
    }
  }
  return out + "\"";
}

std::string json_number(double value) { return std::isfinite(value) ? round_trip_number(value) : "null"; }

// RFC 4180 section 2: a field holding a comma, a quote or a line break is enclosed in quotes, and a
// quote inside is doubled.
std::string csv_field(const std::string& text) {
  if (text.find_first_of(",\"\r\n") == std::string::npos) return text;
  std::string out = "\"";
  for (const char c : text) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

}  // namespace hv
