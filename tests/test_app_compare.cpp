// `hvstress compare` and the comparison files, checked with readers outside the project: Python's csv
// and json modules for exact values, VTK's XML reader for sweep.pvd, Python's XML parser for
// report.html, and headless Chromium rendering the report. The runs are the bundled isolated sphere
// at two radii (closed form E = U / R, C = 4 pi eps0 R) and the grading-ring case at two tube radii.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <memory>
#include <string>

#include "cli_fixture.h"
#include "tools/case/summary_reader.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Invocation;
using testing::Sandbox;

const std::string kCases = HV_SOURCE_DIR "/cases/";

// Runs `/usr/bin/python3 -c SCRIPT ARGS` in `box` (Debian's Python, which has VTK; deps.md section 6).
Invocation python(const Sandbox& box, const std::string& script, const std::string& args) {
  box.write("check.py", script);
  const std::string command =
      "cd '" + box.root().string() + "' && /usr/bin/python3 check.py " + args + " >py-out.txt 2>py-err.txt";
  const int status = std::system(command.c_str());
  Invocation result;
  result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  result.out = testing::read_text(box.root() / "py-out.txt");
  result.err = testing::read_text(box.root() / "py-err.txt");
  return result;
}

// Every number of sweep.csv equals the value summary.json gives (Python's float() and json both round
// correctly, so equal text-to-double conversions mean equal values). Arguments: sweep.csv, then
// LABEL=FOLDER for every finished run.
const char* kCompareCsvWithSummaries = R"py(import csv, json, sys
rows = {row["label"]: row for row in csv.DictReader(open(sys.argv[1]))}
for pair in sys.argv[2:]:
    label, folder = pair.rsplit("=", 1)
    summary = json.load(open(folder + "/summary.json"))
    row = rows[label]
    expected = {"max_field_V_per_m": summary["max_field"]["V_per_m"],
                "max_field_r_m": summary["max_field"]["at_m"][0],
                "max_field_z_m": summary["max_field"]["at_m"][1]}
    for name, value in summary["parameters"].items():
        unit = summary["parameter_units"].get(name, "").replace("/", "_per_")
        column = name + ("_" + unit if unit else "")
        if column in row:
            expected[column] = value
    order = summary["capacitance_order"]
    for i, electrode in enumerate(order):
        expected[electrode + "_max_field_V_per_m"] = summary["electrodes"][electrode]["max_field_V_per_m"]
        expected[electrode + "_capacitance_F"] = summary["capacitance_matrix_F"][i][i]
    if "onset" in summary:
        expected["inception_voltage_V"] = summary["onset"]["inception_voltage_V"]
        expected["margin"] = summary["onset"]["margin"]
    for column, value in expected.items():
        assert float(row[column]) == value, (label, column, row[column], value)
    assert row["status"] == "finished", row
    assert row["max_field_electrode"] == summary["max_field"]["electrode"], row
print(len(sys.argv) - 2)
)py";

// report.html is well-formed XML (so its inline SVG is too), holds the caution, the ranking table and
// the named charts, each with units on both axes. Arguments: report.html, then the chart titles expected.
const char* kCheckReport = R"py(import re, sys, xml.etree.ElementTree as ET
svg = "{http://www.w3.org/2000/svg}"
root = ET.parse(sys.argv[1]).getroot()
text = "".join(root.itertext())
assert "High voltage can kill" in text and "not proof of safety" in text, "caution missing"
assert root.find(".//table") is not None, "ranking table missing"
titles = ["".join(chart.find(svg + "title").itertext()) for chart in root.iter(svg + "svg")]
for expected in sys.argv[2:]:
    assert expected in titles, (expected, titles)
unit = re.compile(r"\((mm|kV|kV/mm)\)$")
for chart in root.iter(svg + "svg"):
    labels = ["".join(t.itertext()) for t in chart.iter(svg + "text")]
    assert len([label for label in labels if unit.search(label)]) == 2, labels  # both axes
print(len(titles))
)py";

// sweep.pvd is a VTK collection whose DataSets VTK's XML reader opens: each a mesh with |E| (E_abs_V_per_m).
const char* kCheckPvd = R"py(import os, sys, vtk, xml.etree.ElementTree as ET
root = ET.parse(sys.argv[1]).getroot()
assert root.get("type") == "Collection", root.attrib
sets = root.findall("./Collection/DataSet")
steps = [int(s.get("timestep")) for s in sets]
assert steps == sorted(set(steps)), steps
for s in sets:
    assert s.get("part") == "0" and s.get("name"), s.attrib
    path = os.path.join(os.path.dirname(sys.argv[1]), s.get("file"))
    reader = vtk.vtkXMLUnstructuredGridReader()
    reader.SetFileName(path)
    reader.Update()
    grid = reader.GetOutput()
    assert grid.GetNumberOfCells() > 0, path
    assert grid.GetPointData().GetArray("E_abs_V_per_m") is not None, path
print(len(sets))
)py";

// Two finished runs of the bundled isolated sphere (U = 100 kV) at R = 40 mm and 60 mm, made once.
class CompareSpheres : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    box_ = std::make_unique<Sandbox>();
    for (const char* radius : {"40", "60"}) {
      const auto result = box_->hvstress("run '" + kCases + "sphere-isolated.yaml' --set R=" + radius +
                                         "mm -o r" + radius + " --quiet");
      ASSERT_EQ(result.exit_code, 0) << result.err;
    }
  }
  static void TearDownTestSuite() { box_.reset(); }
  static std::unique_ptr<Sandbox> box_;
};
std::unique_ptr<Sandbox> CompareSpheres::box_;

TEST_F(CompareSpheres, CsvRowsEqualTheSummariesExactly) {
  const auto result = box_->hvstress("compare r40 r60 -o cmp --quiet");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  EXPECT_NE(result.out.find("cmp/report.html"), std::string::npos) << result.out;
  const auto check = python(*box_, kCompareCsvWithSummaries, "cmp/sweep.csv r40=r40 r60=r60");
  EXPECT_EQ(check.exit_code, 0) << check.err;
  EXPECT_EQ(check.out, "2\n");
}

TEST_F(CompareSpheres, CsvValuesMatchTheClosedForm) {
  ASSERT_EQ(box_->hvstress("compare r40 r60 -o cmp --quiet").exit_code, 0);
  // Isolated sphere: E = U / R on its surface, C = 4 pi eps0 R (any electrostatics text, e.g.
  // Jackson, Classical Electrodynamics, 3rd ed., 1999, section 1.11); eps0 from CODATA 2018.
  const auto check = python(*box_, R"py(import csv, math
eps0 = 8.8541878128e-12
for row in csv.DictReader(open("cmp/sweep.csv")):
    R = float(row["R_m"])
    assert abs(float(row["max_field_V_per_m"]) / (100e3 / R) - 1) < 0.01, row
    assert abs(float(row["sphere_capacitance_F"]) / (4 * math.pi * eps0 * R) - 1) < 0.01, row
)py", "");
  EXPECT_EQ(check.exit_code, 0) << check.err;
}

TEST_F(CompareSpheres, PvdOpensInVtk) {
  ASSERT_EQ(box_->hvstress("compare r40 r60 -o cmp --quiet").exit_code, 0);
  const auto check = python(*box_, kCheckPvd, "cmp/sweep.pvd");
  EXPECT_EQ(check.exit_code, 0) << check.err;
  EXPECT_EQ(check.out, "2\n");
}

TEST_F(CompareSpheres, ReportIsWellFormedWithCautionTableAndCharts) {
  ASSERT_EQ(box_->hvstress("compare r40 r60 -o cmp --quiet").exit_code, 0);
  const auto check = python(*box_, kCheckReport,
                            "cmp/report.html 'Maximum surface field against R' '|E| along the critical electrode'");
  EXPECT_EQ(check.exit_code, 0) << check.err;
  EXPECT_EQ(check.out, "2\n");  // no onset: no inception chart
  // Ranked by the lower maximum field: the larger sphere first (E = U / R).
  const std::string html = testing::read_text(box_->root() / "cmp" / "report.html");
  EXPECT_LT(html.find("<td>r60</td>"), html.find("<td>r40</td>"));
}

TEST_F(CompareSpheres, ReportRendersInHeadlessChromium) {
  if (!fs::exists("/usr/bin/chromium")) GTEST_SKIP() << "no /usr/bin/chromium; the set-up script installs it";
  ASSERT_EQ(box_->hvstress("compare r40 r60 -o cmp --quiet").exit_code, 0);
  const std::string command = "cd '" + box_->root().string() +
                              "' && timeout 120 /usr/bin/chromium --headless --no-sandbox --disable-gpu "
                              "--enable-logging=stderr --dump-dom 'file://" +
                              (box_->root() / "cmp" / "report.html").string() + "' >dom.html 2>chromium.txt";
  const int status = std::system(command.c_str());
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << testing::read_text(box_->root() / "chromium.txt");
  const std::string dom = testing::read_text(box_->root() / "dom.html");
  size_t charts = 0;
  for (size_t at = dom.find("<svg"); at != std::string::npos; at = dom.find("<svg", at + 1)) ++charts;
  EXPECT_EQ(charts, 2u);
  // Console messages (script errors included) appear as INFO:CONSOLE lines with --enable-logging.
  const std::string log = testing::read_text(box_->root() / "chromium.txt");
  EXPECT_EQ(log.find("Uncaught"), std::string::npos) << log;
  EXPECT_EQ(log.find(":CONSOLE"), std::string::npos) << log;
}

TEST_F(CompareSpheres, SweepFolderListsFailedVariantsLast) {
  // A sweep folder as `hvstress sweep` leaves it: variant folders and sweep.json, one variant failed.
  const fs::path sweep = box_->root() / "sweep";
  fs::create_directories(sweep);
  fs::copy(box_->root() / "r40", sweep / "v0", fs::copy_options::recursive);
  fs::copy(box_->root() / "r60", sweep / "v1", fs::copy_options::recursive);
  box_->write("sweep/sweep.json", R"({"format": "hvstress-sweep/1", "case": "sphere-isolated.yaml", "varied": ["R"], "variants": [
  {"index": 0, "settings": {"R": "40mm"}, "folder": "v0", "status": "finished", "message": ""},
  {"index": 1, "settings": {"R": "60mm"}, "folder": "v1", "status": "finished", "message": ""},
  {"index": 2, "settings": {"R": "0mm"}, "folder": "v2", "status": "failed", "message": "radius must be positive"}]}
)");
  const auto result = box_->hvstress("compare sweep -o sweep-cmp --quiet");
  ASSERT_EQ(result.exit_code, 0) << result.err;
  const auto check = python(*box_, kCompareCsvWithSummaries, "sweep-cmp/sweep.csv 'v0 R=40mm=sweep/v0' 'v1 R=60mm=sweep/v1'");
  EXPECT_EQ(check.exit_code, 0) << check.err;
  const std::string csv = testing::read_text(box_->root() / "sweep-cmp" / "sweep.csv");
  EXPECT_NE(csv.find("v2 R=0mm,0mm,failed,"), std::string::npos) << csv;
  EXPECT_NE(csv.find("radius must be positive"), std::string::npos) << csv;
  const std::string html = testing::read_text(box_->root() / "sweep-cmp" / "report.html");
  const size_t best = html.find("<td>v1 R=60mm</td>"), second = html.find("<td>v0 R=40mm</td>"),
               failed = html.find("<td>v2 R=0mm</td>");
  ASSERT_NE(failed, std::string::npos);
  EXPECT_LT(best, second);
  EXPECT_LT(second, failed);
  EXPECT_NE(html.find("failed: radius must be positive"), std::string::npos);
  // The failed variant has no field.vtu: the collection holds the two others, at their indices.
  const std::string pvd = testing::read_text(box_->root() / "sweep-cmp" / "sweep.pvd");
  EXPECT_NE(pvd.find("timestep=\"1\" part=\"0\" name=\"v1 R=60mm\" file=\"../sweep/v1/field.vtu\""), std::string::npos) << pvd;
  EXPECT_EQ(pvd.find("timestep=\"2\""), std::string::npos) << pvd;
}

TEST_F(CompareSpheres, ReplacesOnlyAnEarlierComparison) {
  ASSERT_EQ(box_->hvstress("compare r40 r60 -o again --quiet").exit_code, 0);
  EXPECT_EQ(box_->hvstress("compare r40 r60 -o again --quiet").exit_code, 0);
  fs::create_directories(box_->root() / "precious");
  box_->write("precious/notes.txt", "mine");
  const auto refused = box_->hvstress("compare r40 r60 -o precious --quiet");
  EXPECT_EQ(refused.exit_code, 2);
  EXPECT_NE(refused.err.find("precious"), std::string::npos) << refused.err;
  EXPECT_FALSE(fs::exists(box_->root() / "precious" / "report.html"));
}

TEST_F(CompareSpheres, RefusesAFolderThatIsNotAResult) {
  fs::create_directories(box_->root() / "empty");
  const auto neither = box_->hvstress("compare r40 empty --quiet");
  EXPECT_EQ(neither.exit_code, 2);
  EXPECT_NE(neither.err.find("empty"), std::string::npos) << neither.err;
  // A summary.json that is not a run's (the mesh command writes format hvstress-mesh/1).
  ASSERT_EQ(box_->hvstress("mesh '" + kCases + "sphere-isolated.yaml' -o meshed --quiet").exit_code, 0);
  const auto mesh_only = box_->hvstress("compare r40 meshed --quiet");
  EXPECT_EQ(mesh_only.exit_code, 2);
  EXPECT_NE(mesh_only.err.find("meshed/summary.json"), std::string::npos) << mesh_only.err;
  EXPECT_NE(mesh_only.err.find("not an hvstress summary"), std::string::npos) << mesh_only.err;
  EXPECT_FALSE(fs::exists(box_->root() / "comparison"));
}

TEST(Compare, OnsetRunsAreRankedByInceptionVoltage) {
  // The bundled grading ring at tube radii 35 mm and 50 mm (its headline: 50 mm incepts at 421 kV
  // crest, margin 1.35). The thicker tube lowers the field, so it incepts higher and ranks first.
  Sandbox box;
  for (const char* tube : {"35", "50"}) {
    const auto run = box.hvstress("run '" + kCases + "ring-large-enough.yaml' --set tube_r=" + tube + "mm -o t" +
                                  tube + " --quiet");
    ASSERT_TRUE(run.exit_code == 0 || run.exit_code == 3) << run.err;  // 3: misses its required margin
  }
  ASSERT_EQ(box.hvstress("compare t35 t50 --quiet").exit_code, 0);
  const auto values = python(box, kCompareCsvWithSummaries, "comparison/sweep.csv t35=t35 t50=t50");
  EXPECT_EQ(values.exit_code, 0) << values.err;
  const auto report = python(box, kCheckReport,
                             "comparison/report.html 'Maximum surface field against tube_r' "
                             "'Inception voltage against tube_r' '|E| along the critical electrode'");
  EXPECT_EQ(report.exit_code, 0) << report.err;
  const std::string html = testing::read_text(box.root() / "comparison" / "report.html");
  EXPECT_LT(html.find("<td>t50</td>"), html.find("<td>t35</td>"));
  EXPECT_NE(html.find("highest discharge inception voltage first"), std::string::npos);
  // The 35 mm tube's margin (about 1.16 at the 311 kV test crest) falls short of the case's 1.2.
  EXPECT_NE(html.find("misses the required margin 1.2"), std::string::npos);
  const std::string csv = testing::read_text(box.root() / "comparison" / "sweep.csv");
  EXPECT_NE(csv.find(",false,"), std::string::npos) << csv;
  EXPECT_NE(csv.find(",true,"), std::string::npos) << csv;
}

TEST(SummaryReader, NamesTheFileAndKeyOfBadInput) {
  // Not JSON at all: the place of the syntax error (1-based line) is named.
  try {
    parse_summary("{\"format\": \"hvstress-summary/1\",\n  \"title\": [1, 2\n", "run/summary.json");
    ADD_FAILURE() << "no error for broken JSON";
  } catch (const InputError& error) {
    EXPECT_EQ(error.where().file, "run/summary.json");
    EXPECT_GE(error.where().line, 2);
  }
  // Another format.
  try {
    parse_summary(R"({"format": "hvstress-mesh/1", "nodes": 3})", "mesh/summary.json");
    ADD_FAILURE() << "no error for a mesh summary";
  } catch (const InputError& error) {
    EXPECT_NE(std::string(error.what()).find("mesh/summary.json"), std::string::npos) << error.what();
    EXPECT_EQ(error.where().key_path, "format");
  }
  // A summary without its maximum field.
  try {
    parse_summary(R"({"format": "hvstress-summary/1", "title": "t", "parameters": {}, "electrodes": {},
                     "capacitance_matrix_F": []})",
                  "s.json");
    ADD_FAILURE() << "no error for a missing key";
  } catch (const InputError& error) {
    EXPECT_EQ(error.where().key_path, "max_field");
  }
}

TEST(SummaryReader, ReadsValuesExactlyAndNullAsMissing) {
  // Round-trip decimal text reads back to the same double (IEEE 754 nearest; strtod as reference).
  const RunSummary summary = parse_summary(R"({"format": "hvstress-summary/1", "title": "two \"rings\"",
    "parameters": {"U": 424264.06871192151, "R": 0.35}, "parameter_units": {"U": "V", "R": "m"},
    "electrodes": {"b": {"max_field_V_per_m": 2.5e6, "max_field_at_m": [0.1, 0.2]},
                   "a": {"max_field_V_per_m": 1e6, "max_field_at_m": [0, 1], "max_gas_field_V_per_m": null,
                         "max_gas_field_at_m": [0, 0]}},
    "capacitance_order": ["a", "b"],
    "max_field": {"V_per_m": 2.5e6, "electrode": "b", "at_m": [0.1, 0.2]},
    "capacitance_matrix_F": [[1e-12, -2e-13], [-2e-13, 3.3000000000000001e-12]],
    "onset": {"electrode": null, "inception_found": false, "inception_voltage_V": null, "margin": null,
              "at_m": null, "required_margin": 1.2, "meets_required_margin": true}})",
                                           "s.json");
  EXPECT_EQ(summary.title, "two \"rings\"");
  EXPECT_EQ(summary.parameter("U"), std::strtod("424264.06871192151", nullptr));
  EXPECT_EQ(summary.parameters[1].unit, "m");
  ASSERT_EQ(summary.electrodes.size(), 2u);
  EXPECT_EQ(summary.electrodes[0].name, "a");  // capacitance order, not the object's order
  EXPECT_TRUE(std::isnan(summary.electrodes[0].max_gas_field_V_per_m));
  EXPECT_EQ(summary.capacitance_F[1][1], 3.3e-12);
  EXPECT_TRUE(summary.onset.evaluated);
  EXPECT_FALSE(summary.onset.inception_found);
  EXPECT_TRUE(std::isnan(summary.onset.inception_V));
  EXPECT_EQ(summary.onset.required_margin, 1.2);
}

}  // namespace
}  // namespace hv
