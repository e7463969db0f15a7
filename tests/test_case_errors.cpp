// Malformed case files: every error names the file, line and column of the offending text, its key
// path, the problem and a fix. Each snippet marks the expected place with `@` (removed before
// parsing), so the expected line and column come from the text itself.
#include <gtest/gtest.h>

#include <algorithm>
#include <string>
#include <vector>

#include "tools/case/case.h"

namespace hv {
namespace {

const std::string kHead =
    "hvstress: 1\n"
    "materials:\n"
    "  oil: {permittivity: 2.2}\n"
    "electrodes:\n"
    "  hv: {potential: 10 kV}\n"
    "  fl: {floating: true}\n";

const std::string kBall =
    "shapes:\n"
    "  - circle: {center: [0, 0.1], radius: 5 mm}\n"
    "    electrode: hv\n";

struct Malformed {
  std::string name;
  std::string text;      // with `@` where the error must point
  std::string key_path;  // expected key path
  std::string fragment;  // expected part of the problem
};

// Parses `bad` and checks the place, key path, problem and that a fix is offered.
void expect_reported(const Malformed& bad) {
  SCOPED_TRACE(bad.name);
  const std::size_t marker = bad.text.find('@');
  ASSERT_NE(marker, std::string::npos) << "snippet without @";
  std::string text = bad.text;
  text.erase(marker, 1);
  const int line = 1 + static_cast<int>(std::count(text.begin(), text.begin() + marker, '\n'));
  const std::size_t line_start = text.rfind('\n', marker == 0 ? 0 : marker - 1);
  const int column = static_cast<int>(marker - (line_start == std::string::npos || marker == 0 ? 0 : line_start + 1)) + 1;
  try {
    parse_case(text, "bad.yaml");
    ADD_FAILURE() << "accepted:\n" << text;
  } catch (const InputError& error) {
    EXPECT_EQ(error.where().file, "bad.yaml");
    EXPECT_EQ(error.where().line, line) << error.what();
    EXPECT_EQ(error.where().column, column) << error.what();
    EXPECT_EQ(error.where().key_path, bad.key_path) << error.what();
    EXPECT_NE(error.problem().find(bad.fragment), std::string::npos) << error.what();
    EXPECT_FALSE(error.hint().empty()) << error.what();
    const std::string prefix = "bad.yaml:" + std::to_string(line) + ":" + std::to_string(column) + ": ";
    EXPECT_EQ(std::string(error.what()).rfind(prefix, 0), 0u) << error.what();
  }
}

TEST(CaseErrors, StructureErrorsNameTheirPlace) {
  const std::vector<Malformed> cases = {
      {"empty file", "@", "", "the case file is empty"},
      {"missing version", "@electrodes: {}\n" + kBall, "hvstress", "missing key `hvstress`"},
      {"other version", "hvstress: @2\n" + kBall, "hvstress", "reads case format 1, not 2"},
      {"yaml syntax", "hvstress: 1\ntitle: Terminal@: first design\n", "", "YAML syntax"},
      {"unknown top-level key", kHead + "@shape:\n  - circle: {center: [0, 0.1], radius: 5 mm}\n", "shape",
       "unknown key `shape`"},
      {"misspelt key", kHead + "shapes:\n  - circle: {center: [0, 0.1], @raduis: 5 mm}\n    electrode: hv\n",
       "shapes[0].circle.raduis", "unknown key `raduis`"},
      {"key given twice", kHead + kBall + "    @electrode: hv\n", "shapes[0].electrode", "given twice"},
      {"map for a number", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: @{r: 5}}\n    electrode: hv\n",
       "shapes[0].circle.radius", "expected a length (e.g. 25 mm), got a map"},
      {"list for a map", "hvstress: 1\nelectrodes: @[hv]\n" + kBall, "electrodes", "expected a map of names"},
      {"missing required key", kHead + "shapes:\n  - @circle: {center: [0, 0.1]}\n    electrode: hv\n",
       "shapes[0].circle", "missing key `radius`"},
      {"no shapes", kHead + "@shapes: []\n", "shapes", "the case has no shapes"},
      {"point of three", kHead + "shapes:\n  - circle: {center: @[0, 0, 1], radius: 5 mm}\n    electrode: hv\n",
       "shapes[0].circle.center", "expected a point [r, z], got a list of 3"},
  };
  for (const Malformed& bad : cases) expect_reported(bad);
}

TEST(CaseErrors, ValueErrorsPointIntoTheValue) {
  const std::vector<Malformed> cases = {
      {"negative radius", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: @-5 mm}\n    electrode: hv\n",
       "shapes[0].circle.radius", "must be greater than zero"},
      {"voltage for a length", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: @5 kV}\n    electrode: hv\n",
       "shapes[0].circle.radius", "expected a length (e.g. 25 mm), got a voltage"},
      {"mixed dimensions", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: 5 mm @+ 3 kV}\n    electrode: hv\n",
       "shapes[0].circle.radius", "cannot add a length and a voltage"},
      {"quoted value", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: \"5 mm @+ 3 kV\"}\n    electrode: hv\n",
       "shapes[0].circle.radius", "cannot add a length and a voltage"},
      {"item of a point", kHead + "shapes:\n  - circle: {center: [0, @1 kV], radius: 5 mm}\n    electrode: hv\n",
       "shapes[0].circle.center[1]", "expected a length"},
      {"celsius in arithmetic", kHead + kBall + "gas: {temperature: 20 @degC + 1 K}\n", "gas.temperature",
       "`degC` may only follow a plain value"},
      {"permittivity below 1",
       "hvstress: 1\nmaterials:\n  oil: {permittivity: @0.5}\n"
       "shapes:\n  - circle: {center: [0, 0.1], radius: 5 mm}\n    material: oil\n",
       "materials.oil.permittivity", "at least 1"},
      {"rect bounds reversed", kHead + "shapes:\n  - rect: {r: @[40 mm, 10 mm], z: [0, 1]}\n    electrode: hv\n",
       "shapes[0].rect.r", "first value must be less than the second"},
      {"negative round", kHead + "shapes:\n  - rect: {r: [0, 1], z: [0, 1], round: @-1 mm}\n    electrode: hv\n",
       "shapes[0].rect.round", "must not be negative"},
      {"polygon corner not a point",
       kHead + "shapes:\n  - polygon: {points: [[0, 0], @5 mm, [1, 1]]}\n    electrode: hv\n",
       "shapes[0].polygon.points[1]", "expected a point [r, z], got `5 mm`"},
      {"map inside a point", kHead + "shapes:\n  - circle: {center: [0, @{z: 1}], radius: 5 mm}\n    electrode: hv\n",
       "shapes[0].circle.center[1]", "expected a length (e.g. 25 mm), got a map"},
      {"polygon of two points", kHead + "shapes:\n  - polygon: {points: @[[0, 0], [1, 1]]}\n    electrode: hv\n",
       "shapes[0].polygon.points", "at least 3 points, got 2"},
      {"zero arc radius",
       kHead + "shapes:\n  - path:\n      start: [0, 0]\n      segments:\n        - line: [1, 0]\n"
               "        - arc: {to: [1, 1], radius: @0}\n    electrode: hv\n",
       "shapes[0].path.segments[1].arc.radius", "arc radius cannot be 0"},
      {"line and arc together",
       kHead + "shapes:\n  - path:\n      start: [0, 0]\n      segments:\n        - line: [1, 0]\n"
               "          @arc: {to: [1, 1], radius: 1}\n    electrode: hv\n",
       "shapes[0].path.segments[0].arc", "either `line` or `arc`"},
      {"mesh order 4", kHead + kBall + "mesh: {order: @4}\n", "mesh.order", "must be 1, 2 or 3"},
      {"growth of 1", kHead + kBall + "mesh: {growth: @1}\n", "mesh.growth", "greater than 1"},
      {"floating not a boolean", "hvstress: 1\nelectrodes:\n  hv: {floating: @yes}\n" + kBall, "electrodes.hv.floating",
       "expected true or false"},
      {"gamma out of range", kHead + kBall + "onset: {criterion: townsend, gamma: @1.5}\n", "onset.gamma",
       "between 0 and 1"},
      {"wrong default unit", "hvstress: 1\nunits: {length: @kV}\n" + kBall, "units.length",
       "expected a unit of a length"},
      {"parameter named like a unit", "hvstress: 1\nparameters:\n  @mm: 3\n" + kBall, "parameters.mm",
       "cannot name a parameter"},
      {"parameter used before defined", "hvstress: 1\nparameters:\n  a: @b * 2\n  b: 1\n" + kBall, "parameters.a",
       "unknown name `b`"},
  };
  for (const Malformed& bad : cases) expect_reported(bad);
}

TEST(CaseErrors, ReferenceAndSectionErrorsSuggestAFix) {
  const std::vector<Malformed> cases = {
      {"misspelt electrode", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: 5 mm}\n    electrode: @hvv\n",
       "shapes[0].electrode", "no electrode is called `hvv`"},
      {"material as electrode", kHead + "shapes:\n  - circle: {center: [0, 0.1], radius: 5 mm}\n    electrode: @oil\n",
       "shapes[0].electrode", "no electrode is called `oil`"},
      {"electrode and material", kHead + kBall + "    @material: oil\n", "shapes[0].material", "not both"},
      {"neither electrode nor material", kHead + "shapes:\n  - @circle: {center: [0, 0.1], radius: 5 mm}\n",
       "shapes[0]", "neither `electrode` nor `material`"},
      {"no outline", kHead + "shapes:\n  - @electrode: hv\n", "shapes[0]", "the shape has no outline"},
      {"two outlines", kHead + kBall + "    @rect: {r: [0, 1], z: [0, 1]}\n", "shapes[0].rect",
       "already has the outline `circle`"},
      {"shape names repeat", kHead + "shapes:\n  - {name: a, circle: {center: [0, 0], radius: 1}, electrode: hv}\n"
                                     "  - {name: @a, circle: {center: [0, 5], radius: 1}, electrode: hv}\n",
       "shapes[1].name", "already called `a`"},
      {"potential and floating", "hvstress: 1\nelectrodes:\n  hv: {@potential: 1 kV, floating: true}\n" + kBall,
       "electrodes.hv.potential", "floating electrode has no fixed potential"},
      {"neither potential nor floating", "hvstress: 1\nelectrodes:\n  @hv: {}\n" + kBall, "electrodes.hv",
       "neither `potential` nor `floating: true`"},
      {"unknown gas", kHead + kBall + "gas: {name: @xenon}\n", "gas.name", "expected `air`, `sf6` or `table`"},
      {"model for sf6", kHead + kBall + "gas: {name: SF6, @model: quadratic}\n", "gas.model",
       "applies only to `name: air`"},
      {"missing gas table", kHead + kBall + "gas: {name: table, table: @no-such-file.csv}\n", "gas.table",
       "cannot find the gas table"},
      {"gamma for streamer", kHead + kBall + "onset: {@gamma: 0.01}\n", "onset.gamma",
       "applies only to `criterion: townsend`"},
      {"box key on open domain", kHead + kBall + "domain: {outer: open, @r_max: 1 m}\n", "domain.r_max",
       "does not apply to `outer: open`"},
      {"box without r_max", kHead + kBall + "@domain: {outer: box, z: [0, 1]}\n", "domain", "missing key `r_max`"},
      {"box bottom off the plane", kHead + kBall + "ground_plane: {z: 0}\ndomain: {outer: box, r_max: 1, z: @[0.1, 1]}\n",
       "domain.z", "the box bottom is the ground plane"},
      {"floating electrode as side", kHead + kBall + "domain: {outer: box, r_max: 1, z: [0, 1], sides: {top: @fl}}\n",
       "domain.sides.top", "floating electrode `fl` cannot be a side"},
      {"bottom side with ground plane",
       kHead + kBall + "ground_plane: {}\ndomain: {outer: box, r_max: 1, z: [0, 1], sides: {@bottom: hv}}\n",
       "domain.sides.bottom", "the bottom of the box is the plane"},
  };
  for (const Malformed& bad : cases) expect_reported(bad);
}

TEST(CaseErrors, HintsNameTheNearestValidChoice) {
  const auto hint_of = [](const std::string& text) {
    try {
      parse_case(text, "bad.yaml");
    } catch (const InputError& error) {
      return error.hint();
    }
    return std::string("accepted");
  };
  EXPECT_EQ(hint_of(kHead + "shapes:\n  - circle: {center: [0, 0.1], raduis: 5 mm}\n"), "Did you mean `radius`?");
  EXPECT_EQ(hint_of(kHead + "shape: []\n"), "Did you mean `shapes`?");
  EXPECT_EQ(hint_of(kHead + "shapes:\n  - {circle: {center: [0, 0], radius: 1}, electrode: hvv}\n"), "Did you mean `hv`?");
  EXPECT_EQ(hint_of(kHead + "shapes:\n  - {circle: {center: [0, 0], radius: 1}, electrode: oil}\n"),
            "`oil` is a material: write `material: oil`");
  EXPECT_EQ(hint_of(kHead + kBall + "onset: {polarity: postive}\n"), "Did you mean `positive`?");
  EXPECT_EQ(hint_of(kHead + kBall + "mesh: {sufrace_size: 1 mm}\n"), "Did you mean `surface_size`?");
}

}  // namespace
}  // namespace hv
