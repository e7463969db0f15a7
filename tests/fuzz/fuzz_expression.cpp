// libFuzzer target: arbitrary bytes as a case-file expression over a length, a voltage and a pure
// number. Evaluation must either return a finite quantity or throw hv::InputError; any other
// exception escapes, aborts and is reported as a crash.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "tools/case/expression.h"

namespace {

const hv::Variables& fuzz_variables() {
  static const hv::Variables variables = {{"gap", {0.12, hv::dimension_of(hv::Kind::Length)}},
                                          {"U", {420e3, hv::dimension_of(hv::Kind::Voltage)}},
                                          {"n", {3.0, hv::Dimension{}}}};
  return variables;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  const hv::SourceLocation where{"fuzz.yaml", 3, 7, "parameters.x"};
  try {
    const hv::Quantity result = hv::evaluate_expression(text, fuzz_variables(), where);
    if (!std::isfinite(result.value)) std::abort();  // the header promises finite results
  } catch (const hv::InputError&) {
    // Rejected expression with a message: the intended outcome for most inputs.
  }
  return 0;
}
