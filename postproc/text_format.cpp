#include "postproc/text_format.h"

#include <charconv>

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

}  // namespace hv
