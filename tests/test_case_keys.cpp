// The key table is the one source of truth for case-file keys: docs/case-file.md must list exactly
// its keys with the same type, kind, default and meaning, and the table must form a tree.
#include <gtest/gtest.h>

#include <fstream>
#include <map>
#include <set>
#include <string>

#include "tools/case/case_keys.h"
#include "tools/case/suggest.h"

namespace hv {
namespace {

// The reference row a key must have in docs/case-file.md.
std::string reference_row(const CaseKey& key) {
  return "| `" + key.path + "` | " + type_label(key) + " | " + kind_label(key) + " | " + key.default_value + " | " +
         key.meaning + " |";
}

// Rows of the reference tables in docs/case-file.md, by key path: lines that start with "| `".
std::map<std::string, std::string> documented_rows() {
  std::ifstream doc(std::string(HV_SOURCE_DIR) + "/docs/case-file.md");
  EXPECT_TRUE(doc.is_open()) << "docs/case-file.md is missing";
  std::map<std::string, std::string> rows;
  std::string line;
  while (std::getline(doc, line)) {
    if (line.rfind("| `", 0) != 0) continue;
    const std::size_t end = line.find('`', 3);
    rows[line.substr(3, end - 3)] = line;
  }
  return rows;
}

TEST(CaseKeys, EveryKeyIsDocumentedAsInTheTable) {
  const std::map<std::string, std::string> rows = documented_rows();
  for (const CaseKey& key : case_keys()) {
    const auto row = rows.find(key.path);
    if (row == rows.end()) {
      ADD_FAILURE() << "docs/case-file.md lacks the row\n" << reference_row(key);
      continue;
    }
    EXPECT_EQ(row->second, reference_row(key)) << "docs/case-file.md row differs from the key table";
  }
}

TEST(CaseKeys, EveryDocumentedKeyIsInTheTable) {
  std::set<std::string> paths;
  for (const CaseKey& key : case_keys()) paths.insert(key.path);
  for (const auto& row : documented_rows())
    EXPECT_TRUE(paths.count(row.first)) << "docs/case-file.md documents `" << row.first << "`, which the reader does not know";
}

TEST(CaseKeys, KeysFormATreeWithUniquePaths) {
  std::set<std::string> seen;
  for (const CaseKey& key : case_keys()) {
    EXPECT_TRUE(seen.insert(key.path).second) << key.path << " is listed twice";
    const std::size_t cut = key.path.find_last_of(".[");
    if (cut == std::string::npos) continue;
    const std::string parent = key.path.substr(0, cut);  // "shapes[].name" -> "shapes[]" -> "shapes"
    EXPECT_TRUE(seen.count(parent)) << key.path << " comes before its parent " << parent;
  }
}

TEST(CaseKeys, ChoicesAndKindsAreGivenWhereNeeded) {
  for (const CaseKey& key : case_keys()) {
    EXPECT_EQ(key.type == KeyType::Choice, !key.choices.empty()) << key.path;
    if (key.type == KeyType::UnitName || key.type == KeyType::Range) {
      EXPECT_NE(key.kind, Kind::Number) << key.path;
    }
  }
}

TEST(CaseKeys, ChildNamesAreTheDirectChildren) {
  EXPECT_EQ(child_names("shapes[].circle"), (std::vector<std::string>{"center", "radius"}));
  EXPECT_EQ(child_names("materials.<name>"), (std::vector<std::string>{"permittivity"}));
  EXPECT_EQ(child_names("shapes[].path.segments[]"), (std::vector<std::string>{"line", "arc"}));
  const std::vector<std::string> top = child_names("");
  EXPECT_EQ(top.front(), "hvstress");
  EXPECT_EQ(std::count(top.begin(), top.end(), "shapes"), 1);
  EXPECT_EQ(std::count(top.begin(), top.end(), "radius"), 0);
}

TEST(Suggest, EditDistanceMatchesKnownExamples) {
  // kitten -> sitting takes 3 edits, flaw -> lawn 2 (common textbook examples, recalled from memory).
  EXPECT_EQ(edit_distance("kitten", "sitting"), 3u);
  EXPECT_EQ(edit_distance("flaw", "lawn"), 2u);
  EXPECT_EQ(edit_distance("", "abc"), 3u);
  EXPECT_EQ(edit_distance("raduis", "radius"), 2u);  // a swap is two substitutions
  EXPECT_EQ(edit_distance("Radius", "radius"), 0u);  // case is ignored
}

TEST(Suggest, OnlyNearNamesAreSuggested) {
  EXPECT_EQ(did_you_mean("raduis", {"center", "radius"}), "Did you mean `radius`?");
  EXPECT_EQ(did_you_mean("xyz", {"center", "radius"}), "");
  EXPECT_EQ(quoted_list({"a", "b"}), "`a`, `b`");
}

}  // namespace
}  // namespace hv
