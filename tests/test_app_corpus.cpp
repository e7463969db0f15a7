// The malformed-input corpus (tests/corpus/manifest.tsv): every entry runs the hvstress binary in a
// fresh sandbox and must end with its exit code (spec/cli.md: 2 bad input or usage, 1 other failures),
// a message naming the place, no crash, and no output folder or temporary file left behind.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "cli_fixture.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Sandbox;

const fs::path kCorpus = fs::path(HV_SOURCE_DIR) / "tests" / "corpus";

// One line of the manifest.
struct CorpusEntry {
  std::string name;
  std::string arguments;  // with the placeholders {case}, {valid}, {dir}, {generated:KIND}
  int exit_code = 0;
  std::string fragment;   // must appear in the message; may hold {dir}
  std::string wrong;      // what is wrong with the input
};

std::ostream& operator<<(std::ostream& out, const CorpusEntry& entry) { return out << entry.name; }

std::vector<std::string> split_tabs(const std::string& line) {
  std::vector<std::string> fields;
  std::stringstream in(line);
  std::string field;
  while (std::getline(in, field, '\t')) fields.push_back(field);
  return fields;
}

// The entries of the manifest; a malformed line becomes an entry that fails with the reason.
std::vector<CorpusEntry> read_manifest() {
  std::ifstream in(kCorpus / "manifest.tsv");
  std::vector<CorpusEntry> entries;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    const std::vector<std::string> fields = split_tabs(line);
    if (fields.size() != 5) {
      entries.push_back({"malformed_manifest_line_" + std::to_string(entries.size()), "", -1, line, ""});
      continue;
    }
    entries.push_back({fields[0], fields[1], std::stoi(fields[2]), fields[3], fields[4]});
  }
  return entries;
}

std::string replaced_all(std::string text, const std::string& from, const std::string& to) {
  for (std::size_t at = text.find(from); at != std::string::npos; at = text.find(from, at + to.size()))
    text.replace(at, from.size(), to);
  return text;
}

std::string valid_case() { return testing::read_text(kCorpus / "valid.yaml"); }

// The valid case with its voltage parameter `U: 50 kV` given by `value` instead.
std::string valid_case_with_voltage(const std::string& value) { return replaced_all(valid_case(), "U: 50 kV", "U: " + value); }

// Inputs too large or too binary to commit, made the same way on every run.
std::string generated_input(const std::string& kind) {
  if (kind == "huge") {  // 50 MB: five times the largest case file the reader accepts
    std::string text = valid_case();
    for (int line = 0; line < 5000000; ++line) text += "# padding\n";
    return text;
  }
  if (kind == "nul_bytes") return std::string(4096, '\0');
  if (kind == "random_bytes") {
    std::mt19937 engine(20261202);  // the Mersenne twister's output is fixed by the standard
    std::string bytes;
    for (int i = 0; i < 4096; ++i) bytes += static_cast<char>(engine() & 0xFF);
    return bytes;
  }
  if (kind == "long_expression") {  // 140001 characters, ending in an unknown name
    std::string sum = "1 kV";
    for (int term = 1; term < 20000; ++term) sum += " + 1 kV";
    return valid_case_with_voltage(sum + " + q");
  }
  if (kind == "deep_parentheses") return valid_case_with_voltage(std::string(10000, '(') + "50 kV" + std::string(10000, ')'));
  if (kind == "deep_signs") return valid_case_with_voltage(std::string(100000, '-') + "50 kV");
  if (kind == "deep_brackets") return valid_case() + "junk: " + std::string(100000, '[') + std::string(100000, ']') + "\n";
  ADD_FAILURE() << "the manifest asks for an unknown generated input `" << kind << "`";
  return "";
}

void write_bytes(const fs::path& path, const std::string& bytes) {
  std::ofstream(path, std::ios::binary) << bytes;
}

// Puts the entry's input files into the sandbox and returns its arguments with the placeholders
// filled in; `inputs` receives the names of the files it put there.
std::string prepare(const CorpusEntry& entry, const Sandbox& box, std::set<std::string>& inputs) {
  std::string arguments = replaced_all(entry.arguments, "{dir}", box.root().string());
  const std::string own_file = entry.name + ".yaml";
  if (arguments.find("{case}") != std::string::npos) {
    fs::copy_file(kCorpus / own_file, box.root() / own_file);
    inputs.insert(own_file);
    arguments = replaced_all(arguments, "{case}", own_file);
  }
  if (arguments.find("{valid}") != std::string::npos) {
    fs::copy_file(kCorpus / "valid.yaml", box.root() / "valid.yaml");
    inputs.insert("valid.yaml");
    arguments = replaced_all(arguments, "{valid}", "valid.yaml");
  }
  const std::string generated = "{generated:";
  const std::size_t at = arguments.find(generated);
  if (at != std::string::npos) {
    const std::size_t end = arguments.find('}', at);
    write_bytes(box.root() / own_file, generated_input(arguments.substr(at + generated.size(), end - at - generated.size())));
    inputs.insert(own_file);
    arguments.replace(at, end + 1 - at, own_file);
  }
  return arguments;
}

// What the run left in the sandbox beside its inputs and the captured output (an output folder,
// a staging folder *.tmp-*, a stray file).
std::vector<std::string> leftovers(const Sandbox& box, const std::set<std::string>& inputs) {
  std::vector<std::string> found;
  for (const auto& item : fs::directory_iterator(box.root())) {
    const std::string name = item.path().filename().string();
    if (!inputs.count(name) && name != "stdout.txt" && name != "stderr.txt") found.push_back(name);
  }
  return found;
}

class Corpus : public ::testing::TestWithParam<CorpusEntry> {};

TEST_P(Corpus, EndsWithItsExitCodeAndMessageAndLeavesNothing) {
  const CorpusEntry& entry = GetParam();
  ASSERT_FALSE(entry.arguments.empty()) << "manifest line without five tab-separated fields: " << entry.fragment;
  Sandbox box;
  std::set<std::string> inputs;
  const std::string arguments = prepare(entry, box, inputs);
  const testing::Invocation result = box.hvstress(arguments);
  SCOPED_TRACE("hvstress " + arguments + "  (" + entry.wrong + ")");

  // The shell reports a child killed by signal N as 128 + N.
  ASSERT_TRUE(result.exit_code >= 0 && result.exit_code < 128) << "crashed (exit " << result.exit_code << ")\n" << result.err;
  EXPECT_EQ(result.exit_code, entry.exit_code) << result.err;
  // Failures speak on stderr; the one success in the corpus (its control) on stdout.
  const std::string& message = entry.exit_code == 0 ? result.out : result.err;
  const std::string fragment = replaced_all(entry.fragment, "{dir}", box.root().string());
  EXPECT_NE(message.find(fragment), std::string::npos) << "expected `" << fragment << "` in\n" << message;
  EXPECT_EQ(leftovers(box, inputs), std::vector<std::string>{});
}

INSTANTIATE_TEST_SUITE_P(Manifest, Corpus, ::testing::ValuesIn(read_manifest()),
                         [](const ::testing::TestParamInfo<CorpusEntry>& param) { return param.param.name; });

// The manifest and the corpus folder agree: enough distinct entries, each case file belongs to an
// entry that uses it, and each entry's case file exists.
TEST(CorpusManifest, ListsEveryCaseFileOnce) {
  const std::vector<CorpusEntry> entries = read_manifest();
  EXPECT_GE(entries.size(), 60u);
  std::set<std::string> names, used_files = {"valid.yaml"};
  for (const CorpusEntry& entry : entries) {
    EXPECT_TRUE(names.insert(entry.name).second) << entry.name << " is listed twice";
    if (entry.arguments.find("{case}") == std::string::npos) continue;
    used_files.insert(entry.name + ".yaml");
    EXPECT_TRUE(fs::exists(kCorpus / (entry.name + ".yaml"))) << entry.name << ".yaml is missing";
  }
  for (const auto& item : fs::directory_iterator(kCorpus)) {
    const std::string file = item.path().filename().string();
    if (item.path().extension() == ".yaml") {
      EXPECT_TRUE(used_files.count(file)) << file << " belongs to no entry";
    }
  }
}

}  // namespace
}  // namespace hv
