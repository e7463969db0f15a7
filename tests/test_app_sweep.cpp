// `hvstress sweep` (docs/sweeps.md): the variants of --vary (lists, ranges, grid, zip, shards), and
// sweeps run end to end: every variant equals the same design run alone, an interrupted sweep resumes
// without recomputing what finished, a bad value fails only its variant.
#include <gtest/gtest.h>

#include <algorithm>

#include <signal.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <set>
#include <thread>

#include "cli_fixture.h"
#include "mesh/base.h"
#include "tools/app/variants.h"
#include "tools/case/expression.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Sandbox;

// ---- variants ----

// The key path an InputError names, or "(no error)".
template <typename Call>
std::string error_place(Call call) {
  try {
    call();
  } catch (const InputError& error) {
    return error.where().key_path;
  }
  return "(no error)";
}

double value_in_si(const std::string& text) { return evaluate_expression(text, {}, SourceLocation{}).value; }

TEST(VaryList, KeepsEachValueInTheCaseSyntax) {
  const VaryArg vary = parse_vary("tube_r=30mm, 40 mm ,max(20mm, 50mm)");
  EXPECT_EQ(vary.name, "tube_r");
  ASSERT_EQ(vary.values.size(), 3u);  // the comma inside max(...) does not split the list
  EXPECT_EQ(vary.values[0], "30mm");
  EXPECT_EQ(vary.values[1], "40 mm");
  EXPECT_EQ(vary.values[2], "max(20mm, 50mm)");
}

TEST(VaryRange, GivesEvenlySpacedValuesThatReadBackExactly) {
  // 200 mm to 400 mm in 5 values: steps of (400 - 200) / 4 = 50 mm.
  const VaryArg vary = parse_vary("ring_R=200mm:400mm:5");
  ASSERT_EQ(vary.values.size(), 5u);
  for (int i = 0; i < 5; ++i) {
    EXPECT_EQ(value_in_si(vary.values[i]), 0.2 + (0.4 - 0.2) * i / 4) << vary.values[i];
    EXPECT_NE(vary.values[i].find(" m"), std::string::npos) << "written with its SI unit: " << vary.values[i];
  }
  EXPECT_EQ(value_in_si(vary.values.back()), 0.4);
}

TEST(VaryRange, MixesUnitsOfOneKind) {
  // 100 kV to 0.2 MV in 3 values: 100, 150, 200 kV (SI brochure: k = 1e3, M = 1e6).
  const VaryArg vary = parse_vary("U=100kV:0.2MV:3");
  ASSERT_EQ(vary.values.size(), 3u);
  EXPECT_DOUBLE_EQ(value_in_si(vary.values[0]), 100e3);
  EXPECT_DOUBLE_EQ(value_in_si(vary.values[1]), 150e3);
  EXPECT_DOUBLE_EQ(value_in_si(vary.values[2]), 200e3);
  EXPECT_EQ(evaluate_expression(vary.values[1], {}, SourceLocation{}).dimension, Dimension::of(2, 1, -3, -1, 0));
}

TEST(VarySpec, MalformedSpecsNameTheOption) {
  EXPECT_EQ(error_place([] { parse_vary("R30mm"); }), "--vary");
  EXPECT_EQ(error_place([] { parse_vary("=30mm"); }), "--vary");
  EXPECT_EQ(error_place([] { parse_vary("R="); }), "--vary R");
  EXPECT_EQ(error_place([] { parse_vary("R=30mm,,40mm"); }), "--vary R");
  EXPECT_EQ(error_place([] { parse_vary("R=1mm:2mm"); }), "--vary R");
  EXPECT_EQ(error_place([] { parse_vary("R=1mm:2mm:1"); }), "--vary R");
  EXPECT_EQ(error_place([] { parse_vary("R=1mm:2mm:three"); }), "--vary R");
  EXPECT_EQ(error_place([] { parse_vary("R=1mm:2mm:3:4"); }), "--vary R");
  EXPECT_EQ(error_place([] { parse_vary("R=10mm:5kV:3"); }), "--vary R");  // a length to a voltage
  EXPECT_EQ(error_place([] { parse_vary("R=10mm:5furlong:3"); }), "--vary R");
}

std::vector<std::string> labels(const std::vector<Variant>& variants) {
  std::vector<std::string> out;
  for (const Variant& variant : variants) out.push_back(std::to_string(variant.index) + ": " + variant.label);
  return out;
}

TEST(ExpandVariants, GridTurnsTheFirstParameterSlowest) {
  const std::vector<VaryArg> varies = {{"a", {"1", "2"}}, {"b", {"x", "y", "z"}}};
  const std::vector<std::string> expected = {"1: a=1, b=x", "2: a=1, b=y", "3: a=1, b=z",
                                             "4: a=2, b=x", "5: a=2, b=y", "6: a=2, b=z"};
  EXPECT_EQ(labels(expand_variants(varies, false)), expected);
  const Variant fifth = expand_variants(varies, false)[4];
  ASSERT_EQ(fifth.settings.size(), 2u);
  EXPECT_EQ(fifth.settings[0], std::make_pair(std::string("a"), std::string("2")));
  EXPECT_EQ(fifth.settings[1], std::make_pair(std::string("b"), std::string("y")));
}

TEST(ExpandVariants, ZipPairsTheKthValues) {
  const std::vector<VaryArg> varies = {{"a", {"1", "2", "3"}}, {"b", {"x", "y", "z"}}};
  const std::vector<std::string> expected = {"1: a=1, b=x", "2: a=2, b=y", "3: a=3, b=z"};
  EXPECT_EQ(labels(expand_variants(varies, true)), expected);
  EXPECT_EQ(error_place([] { expand_variants({{"a", {"1", "2"}}, {"b", {"x"}}}, true); }), "--vary b");
  EXPECT_EQ(error_place([] { expand_variants({{"a", {"1"}}, {"a", {"2"}}}, false); }), "--vary a");
}

TEST(SelectShard, ShardsCoverEveryVariantOnce) {
  const std::vector<Variant> all = expand_variants({{"a", {"1", "2", "3", "4", "5", "6", "7"}}}, false);
  std::vector<int> seen;
  for (const char* shard : {"1/3", "2/3", "3/3"})
    for (const Variant& variant : select_shard(all, shard)) seen.push_back(variant.index);
  EXPECT_EQ(seen, (std::vector<int>{1, 4, 7, 2, 5, 3, 6}));  // every 3rd from the K-th
  for (const char* bad : {"0/3", "4/3", "3", "a/b", "1/0", "-1/2"})
    EXPECT_EQ(error_place([&] { select_shard(all, bad); }), "--shard") << bad;
}

// ---- sweeps run end to end ----


// The number after the last of `anchors`, each searched after the one before, in a summary.json.
double number_after(const std::string& json, const std::vector<std::string>& anchors) {
  std::size_t at = 0;
  for (const std::string& anchor : anchors) {
    at = json.find(anchor, at);
    if (at == std::string::npos) return std::nan("");
    at += anchor.size();
  }
  return std::strtod(json.c_str() + at, nullptr);
}

// The figures a comparison ranks designs by.
struct Headline {
  double max_field;
  double capacitance;
  double inception;
};

Headline headline_of(const fs::path& folder) {
  const std::string json = testing::read_text(folder / "summary.json");
  return {number_after(json, {"\"max_field\"", "\"V_per_m\":"}), number_after(json, {"\"capacitance_matrix_F\":", "[", "["}),
          number_after(json, {"\"inception_voltage_V\":"})};
}

void expect_same_design(const Headline& swept, const Headline& alone, const std::string& which) {
  EXPECT_NEAR(swept.max_field, alone.max_field, 1e-9 * alone.max_field) << which;
  EXPECT_NEAR(swept.capacitance, alone.capacitance, 1e-9 * alone.capacitance) << which;
  EXPECT_NEAR(swept.inception, alone.inception, 1e-9 * alone.inception) << which;
}

// The folder of variant `index` (v<index>-<key>) in a sweep folder, or "" when there is none.
fs::path variant_folder(const fs::path& sweep, int index) {
  const std::string prefix = "v" + std::to_string(index) + "-";
  for (const auto& entry : fs::directory_iterator(sweep / "variants")) {
    const std::string name = entry.path().filename().string();
    if (entry.is_directory() && name.compare(0, prefix.size(), prefix) == 0) return entry.path();
  }
  return {};
}

std::vector<fs::path> finished_variants(const fs::path& sweep) {
  std::vector<fs::path> found;
  for (const auto& entry : fs::directory_iterator(sweep / "variants"))
    if (fs::exists(entry.path() / "summary.json")) found.push_back(entry.path());
  return found;
}

bool holds_temporary_folders(const fs::path& folder) {
  for (const auto& entry : fs::recursive_directory_iterator(folder))
    if (entry.path().filename().string().find(".tmp-") != std::string::npos) return true;
  return false;
}

// The line of sweep.json that records variant `index` (one line per variant).
std::string record_of(const fs::path& sweep, int index) {
  std::istringstream json(testing::read_text(sweep / "sweep.json"));
  const std::string tag = "{\"index\": " + std::to_string(index) + ",";
  for (std::string line; std::getline(json, line);)
    if (line.find(tag) != std::string::npos) return line;
  return "";
}

TEST(Sweep, EveryVariantEqualsTheDesignRunAlone) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  const auto sweep = box.hvstress("sweep sphere.yaml --vary R=30mm,40mm,50mm --vary U=80kV:100kV:2 -o study --jobs 2 --quiet");
  ASSERT_EQ(sweep.exit_code, 0) << sweep.err;
  // Grid order: R slowest.
  const char* settings[6] = {"--set R=30mm --set U=80kV", "--set R=30mm --set U=100kV", "--set R=40mm --set U=80kV",
                             "--set R=40mm --set U=100kV", "--set R=50mm --set U=80kV", "--set R=50mm --set U=100kV"};
  for (int index = 1; index <= 6; ++index) {
    const std::string alone = "alone-" + std::to_string(index);
    const auto run = box.hvstress("run sphere.yaml " + std::string(settings[index - 1]) + " -o " + alone + " --quiet");
    ASSERT_EQ(run.exit_code, 0) << run.err;
    const fs::path swept = variant_folder(box.root() / "study", index);
    ASSERT_FALSE(swept.empty()) << "variant " << index;
    expect_same_design(headline_of(swept), headline_of(box.root() / alone), settings[index - 1]);
  }
  // And the physics still holds across the sweep: E = U / R on an isolated sphere (Jackson, Classical
  // Electrodynamics, 3rd ed., 1999, section 1.11), here within the 1 % the coarse default mesh gives.
  EXPECT_NEAR(headline_of(variant_folder(box.root() / "study", 2)).max_field, 100e3 / 0.030, 0.01 * 100e3 / 0.030);
}

// The cells of one CSV line (RFC 4180: quoted cells may hold commas, "" is a quote).
std::vector<std::string> csv_cells(const std::string& line) {
  std::vector<std::string> cells(1);
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted && c == '"' && i + 1 < line.size() && line[i + 1] == '"') cells.back() += '"', ++i;
    else if (c == '"') quoted = !quoted;
    else if (c == ',' && !quoted) cells.emplace_back();
    else cells.back() += c;
  }
  return cells;
}

// The issue's acceptance on the bundled ring study: every row of sweep.csv (max field, inception
// voltage, capacitance) equals, to 1e-9, the same design run alone with `run --set`.
TEST(Sweep, RingStudyTableEqualsEachDesignRunAlone) {
  Sandbox box;
  const std::string ring_case = std::string(HV_SOURCE_DIR) + "/cases/ring-study.yaml";
  const auto sweep = box.hvstress("sweep '" + ring_case +
                                  "' --vary ring_R=200mm:300mm:3 --vary tube_r=30mm,45mm -o study --jobs 2 --quiet");
  ASSERT_EQ(sweep.exit_code, 0) << sweep.err;
  std::istringstream table(testing::read_text(box.root() / "study" / "sweep.csv"));
  std::string line;
  std::getline(table, line);
  const std::vector<std::string> header = csv_cells(line);
  auto column = [&](const std::string& name) {
    return static_cast<size_t>(std::find(header.begin(), header.end(), name) - header.begin());
  };
  const size_t ring_R = column("ring_R_m"), tube_r = column("tube_r_m"), max_field = column("max_field_V_per_m"),
               inception = column("inception_voltage_V"), capacitance = column("lead_capacitance_F");
  ASSERT_LT(capacitance, header.size()) << line;
  int rows = 0;
  while (std::getline(table, line)) {
    const std::vector<std::string> cells = csv_cells(line);
    const std::string settings = "--set 'ring_R=" + cells[ring_R] + " m' --set 'tube_r=" + cells[tube_r] + " m'";
    const std::string alone = "alone-" + std::to_string(++rows);
    const auto run = box.hvstress("run '" + ring_case + "' " + settings + " -o " + alone + " --quiet");
    ASSERT_TRUE(run.exit_code == 0 || run.exit_code == 3) << run.err;
    const Headline swept{std::stod(cells[max_field]), std::stod(cells[capacitance]), std::stod(cells[inception])};
    expect_same_design(swept, headline_of(box.root() / alone), settings);
  }
  EXPECT_EQ(rows, 6);
}

TEST(Sweep, ResumesAfterCtrlCWithoutRecomputingFinishedVariants) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  const std::vector<std::string> args = {"sweep", "sphere.yaml", "--vary", "R=20mm:55mm:8", "-o", "study", "--jobs", "1", "--quiet"};
  const pid_t sweep = testing::start_hvstress(box.root(), args);
  ASSERT_GT(sweep, 0);
  const auto give_up = std::chrono::steady_clock::now() + std::chrono::seconds(60);
  while ((!fs::exists(box.root() / "study" / "variants") || finished_variants(box.root() / "study").empty()) &&
         std::chrono::steady_clock::now() < give_up)
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
  ::kill(sweep, SIGINT);
  int status = 0;
  ASSERT_EQ(::waitpid(sweep, &status, 0), sweep);
  ASSERT_TRUE(WIFEXITED(status));
  EXPECT_EQ(WEXITSTATUS(status), 130);
  EXPECT_FALSE(holds_temporary_folders(box.root() / "study"));
  EXPECT_FALSE(fs::exists(box.root() / "study" / "sweep.json")) << "written only when every variant has run";

  // What finished before the stop, by inode and modification time.
  const std::vector<fs::path> finished = finished_variants(box.root() / "study");
  ASSERT_GE(finished.size(), 1u);
  ASSERT_LT(finished.size(), 8u) << "the sweep ended before it was stopped; nothing to resume";
  std::vector<struct stat> before(finished.size());
  for (std::size_t i = 0; i < finished.size(); ++i) ::stat((finished[i] / "summary.json").c_str(), &before[i]);

  std::string again = "sweep sphere.yaml --vary R=20mm:55mm:8 -o study --jobs 1 --quiet";
  const auto resumed = box.hvstress(again);
  EXPECT_EQ(resumed.exit_code, 0) << resumed.err;
  EXPECT_EQ(finished_variants(box.root() / "study").size(), 8u);
  for (std::size_t i = 0; i < finished.size(); ++i) {
    struct stat after {};
    ASSERT_EQ(::stat((finished[i] / "summary.json").c_str(), &after), 0);
    EXPECT_EQ(after.st_ino, before[i].st_ino) << finished[i];
    EXPECT_EQ(after.st_mtim.tv_sec, before[i].st_mtim.tv_sec) << finished[i];
    EXPECT_EQ(after.st_mtim.tv_nsec, before[i].st_mtim.tv_nsec) << finished[i];
  }
  EXPECT_NE(resumed.out.find(std::to_string(finished.size()) + " reused"), std::string::npos) << resumed.out;
}

TEST(Sweep, ABadValueFailsOnlyItsVariant) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  const auto sweep = box.hvstress("sweep sphere.yaml --vary R=30mm,-5mm,40mm -o study --jobs 2 --quiet");
  EXPECT_EQ(sweep.exit_code, 1);
  const fs::path study = box.root() / "study";
  EXPECT_NE(record_of(study, 1).find("\"status\": \"finished\""), std::string::npos) << record_of(study, 1);
  EXPECT_NE(record_of(study, 3).find("\"status\": \"finished\""), std::string::npos) << record_of(study, 3);
  const std::string bad = record_of(study, 2);
  EXPECT_NE(bad.find("\"status\": \"failed\""), std::string::npos) << bad;
  EXPECT_NE(bad.find("radius"), std::string::npos) << "the message names the key: " << bad;
  EXPECT_TRUE(variant_folder(study, 2).empty());
  EXPECT_NE(sweep.out.find("v2 (R=-5mm) failed"), std::string::npos) << sweep.out;
}

TEST(Sweep, ShardsTogetherRunEveryVariant) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  const std::string study = "sweep sphere.yaml --vary R=20mm:40mm:5 --jobs 2 --quiet";
  ASSERT_EQ(box.hvstress(study + " --shard 1/2 -o first").exit_code, 0);
  ASSERT_EQ(box.hvstress(study + " --shard 2/2 -o second").exit_code, 0);
  std::multiset<int> indices;
  for (const char* shard : {"first", "second"}) {
    for (const fs::path& folder : finished_variants(box.root() / shard))
      indices.insert(std::atoi(folder.filename().string().c_str() + 1));  // v<index>-<key>
  }
  EXPECT_EQ(indices, (std::multiset<int>{1, 2, 3, 4, 5}));
  EXPECT_FALSE(variant_folder(box.root() / "first", 1).empty());  // shard 1/2: variants 1, 3, 5
  EXPECT_FALSE(variant_folder(box.root() / "second", 2).empty());
}

TEST(Sweep, BadInputStopsBeforeAnythingIsWritten) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  const auto unknown = box.hvstress("sweep sphere.yaml --vary radius=30mm,40mm -o study --quiet");
  EXPECT_EQ(unknown.exit_code, 2);
  EXPECT_NE(unknown.err.find("--vary radius"), std::string::npos) << unknown.err;
  const auto bad_set = box.hvstress("sweep sphere.yaml --vary R=30mm,40mm --set U=5mm -o study --quiet");
  EXPECT_EQ(bad_set.exit_code, 2);
  EXPECT_NE(bad_set.err.find("--set U"), std::string::npos) << bad_set.err;
  EXPECT_TRUE(box.holds_only("sphere.yaml"));

  fs::create_directory(box.root() / "precious");
  box.write("precious/notes.txt", "mine");
  const auto refused = box.hvstress("sweep sphere.yaml --vary R=30mm,40mm -o precious --quiet");
  EXPECT_EQ(refused.exit_code, 2);
  EXPECT_NE(refused.err.find("precious"), std::string::npos) << refused.err;
  EXPECT_EQ(std::distance(fs::directory_iterator(box.root() / "precious"), fs::directory_iterator()), 1);
}

}  // namespace
}  // namespace hv
