// Replays every input the fuzzers (tests/fuzz, tools/fuzz) once found to crash, hang or trip a
// sanitizer. The contract of tools/case/case.h and expression.h: bad input is an hv::InputError,
// never another exception, a crash or undefined behaviour. The sanitizer build (build-asan, run by
// tools/run-tests) also turns any undefined behaviour on these inputs into a failure.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <functional>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "tools/case/case.h"
#include "tools/case/expression.h"

namespace hv {
namespace {

namespace fs = std::filesystem;

// The saved inputs of one fuzz target, sorted so that failures list in a stable order.
std::vector<fs::path> regression_inputs(const std::string& target) {
  const fs::path folder = fs::path(HV_SOURCE_DIR) / "tests/fuzz/regressions" / target;
  std::vector<fs::path> files;
  if (!fs::is_directory(folder)) return files;  // a target that never found anything
  for (const fs::directory_entry& entry : fs::directory_iterator(folder))
    if (entry.is_regular_file()) files.push_back(entry.path());
  std::sort(files.begin(), files.end());
  return files;
}

std::string contents_of(const fs::path& file) {
  std::ifstream in(file, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

// "accepted", "rejected" (InputError) or "escaped: ..." for anything else that was thrown.
std::string outcome_of(const std::function<void()>& read) {
  try {
    read();
    return "accepted";
  } catch (const InputError&) {
    return "rejected";
  } catch (const std::exception& error) {
    return std::string("escaped: ") + error.what();
  } catch (...) {
    return "escaped: an exception that is not a std::exception";
  }
}

// The same parameters as tests/fuzz/fuzz_expression.cpp, so each saved input replays exactly.
const Variables kFuzzVariables = {{"gap", {0.12, dimension_of(Kind::Length)}},
                                  {"U", {420e3, dimension_of(Kind::Voltage)}},
                                  {"n", {3.0, Dimension{}}}};

// How each fuzz target reads a saved input; the folder name under tests/fuzz/regressions/ is the
// target's name without `fuzz_`.
std::string replay(const std::string& target, const fs::path& input) {
  const std::string text = contents_of(input);
  if (target == "case_reader") return outcome_of([&] { parse_case(text, input.filename().string()); });
  const SourceLocation where{"fuzz.yaml", 3, 7, "parameters.x"};
  return outcome_of([&] {
    if (!std::isfinite(evaluate_expression(text, kFuzzVariables, where).value))
      throw std::runtime_error("evaluated to a value that is not finite");
  });
}

TEST(FuzzRegressions, EverySavedInputIsAcceptedOrRejectedWithInputError) {
  std::size_t replayed = 0;
  for (const std::string target : {"case_reader", "expression"}) {
    for (const fs::path& input : regression_inputs(target)) {
      const std::string outcome = replay(target, input);
      EXPECT_TRUE(outcome == "accepted" || outcome == "rejected") << input << ": " << outcome;
      ++replayed;
    }
  }
  EXPECT_GT(replayed, 0u) << "tests/fuzz/regressions/ holds no inputs";
}

}  // namespace
}  // namespace hv
