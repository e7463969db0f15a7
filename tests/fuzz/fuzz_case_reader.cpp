// libFuzzer target: arbitrary bytes as a case file. The reader must either return a case or throw
// hv::InputError; any other exception escapes, aborts and is reported as a crash.
#include <cstddef>
#include <cstdint>
#include <string>

#include "tools/case/case.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  try {
    hv::parse_case(text, "fuzz.yaml");
  } catch (const hv::InputError&) {
    // Rejected input with a message: the intended outcome for most inputs.
  }
  return 0;
}
