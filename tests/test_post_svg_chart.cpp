// The SVG line chart: round tick steps, the data-to-plot mapping, text escaping, breaks at missing
// values, the palette, and a chart that XML tools (Python's xml.etree, /usr/bin/python3) accept.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <iterator>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <regex>
#include <string>
#include <unistd.h>

#include "postproc/svg_chart.h"

namespace hv {
namespace {

// The numbers of one attribute of the first element whose tag and attributes match `element`.
double attribute(const std::string& svg, const std::string& element, const std::string& name) {
  std::smatch match;
  const std::regex element_pattern("<" + element + "[^>]*>");
  EXPECT_TRUE(std::regex_search(svg, match, element_pattern)) << element;
  std::smatch value;
  const std::string tag = match.str();
  EXPECT_TRUE(std::regex_search(tag, value, std::regex(" " + name + "=\"([-0-9.]+)\""))) << tag;
  return std::stod(value[1].str());
}

// The "M x y L x y ..." points of the first <path>.
std::vector<std::pair<double, double>> path_points(const std::string& svg) {
  std::smatch match;
  EXPECT_TRUE(std::regex_search(svg, match, std::regex("<path d=\"([^\"]*)\"")));
  std::vector<std::pair<double, double>> points;
  const std::string d = match[1].str();
  const std::regex pair_pattern("[ML]([-0-9.]+) ([-0-9.]+)");
  for (auto it = std::sregex_iterator(d.begin(), d.end(), pair_pattern); it != std::sregex_iterator(); ++it)
    points.emplace_back(std::stod((*it)[1].str()), std::stod((*it)[2].str()));
  return points;
}

TEST(SvgChart, NiceStepsAreOneTwoOrFiveTimesAPowerOfTen) {
  // Heckbert, "Nice numbers for graph labels", Graphics Gems (1990): steps 1, 2, 5 x 10^k, here the
  // smallest such step not below the raw step.
  EXPECT_DOUBLE_EQ(nice_step(0.13), 0.2);
  EXPECT_DOUBLE_EQ(nice_step(0.25), 0.5);
  EXPECT_DOUBLE_EQ(nice_step(3.0), 5.0);
  EXPECT_DOUBLE_EQ(nice_step(7.0), 10.0);
  EXPECT_DOUBLE_EQ(nice_step(1.0), 1.0);
  EXPECT_DOUBLE_EQ(nice_step(2.0), 2.0);  // exactly 2 x 10^0 stays 2
  EXPECT_DOUBLE_EQ(nice_step(0.2), 0.2);  // 0.2 is not exact in binary; still 2 x 10^-1
  EXPECT_DOUBLE_EQ(nice_step(4.2e-12), 5e-12);
  EXPECT_DOUBLE_EQ(nice_step(180e3), 200e3);
}

TEST(SvgChart, TicksSpanTheDataWithRoundValues) {
  const std::vector<double> ticks = nice_ticks(0.3, 2.47);  // range / 5 = 0.434 -> step 0.5
  ASSERT_EQ(ticks.size(), 6u);
  for (size_t i = 0; i < ticks.size(); ++i) EXPECT_EQ(ticks[i], 0.5 * static_cast<double>(i));

  // Tenths: each tick is the double nearest the decimal (0.3, not 0.30000000000000004).
  const std::vector<double> tenths = nice_ticks(0.0, 0.47);
  ASSERT_EQ(tenths.size(), 6u);
  EXPECT_EQ(tenths[3], 0.3);
  EXPECT_EQ(tenths[5], 0.5);

  const std::vector<double> negative = nice_ticks(-13.0, 87.0);  // step 20
  EXPECT_EQ(negative.front(), -20.0);
  EXPECT_EQ(negative.back(), 100.0);

  // A single value gets a range around it rather than a zero-width axis.
  const std::vector<double> single = nice_ticks(2.5, 2.5);
  ASSERT_GE(single.size(), 2u);
  EXPECT_LT(single.front(), 2.5);
  EXPECT_GT(single.back(), 2.5);
}

TEST(SvgChart, TickLabelsShowTheDecimalsTheStepNeeds) {
  EXPECT_EQ(tick_label(0.30000000000000004, 0.1), "0.3");
  EXPECT_EQ(tick_label(1500.0, 500.0), "1500");
  EXPECT_EQ(tick_label(-0.0, 1.0), "0");
  EXPECT_EQ(tick_label(0.25, 0.05), "0.25");
  EXPECT_EQ(tick_label(2e-12, 1e-12), "2e-12");
}

TEST(SvgChart, MapsDataCornersOntoThePlotFrame) {
  EXPECT_DOUBLE_EQ(map_linear(5.0, 0.0, 10.0, 100.0, 200.0), 150.0);
  EXPECT_DOUBLE_EQ(map_linear(0.0, 0.0, 10.0, 330.0, 44.0), 330.0);  // y grows downwards in SVG

  // Data on round ticks (0..10 by 2) fill the frame: the first point at its lower left corner, the
  // last at its upper right, the middle one at its centre.
  LineChart chart{"t", "x", "y", {{"line", {{0.0, 0.0}, {5.0, 5.0}, {10.0, 10.0}}}}, true};
  const std::string svg = svg_line_chart(chart);
  const double left = attribute(svg, "rect[^>]*fill=\"none\"", "x");
  const double top = attribute(svg, "rect[^>]*fill=\"none\"", "y");
  const double right = left + attribute(svg, "rect[^>]*fill=\"none\"", "width");
  const double bottom = top + attribute(svg, "rect[^>]*fill=\"none\"", "height");
  const auto points = path_points(svg);
  ASSERT_EQ(points.size(), 3u);
  EXPECT_NEAR(points[0].first, left, 0.01);
  EXPECT_NEAR(points[0].second, bottom, 0.01);
  EXPECT_NEAR(points[1].first, 0.5 * (left + right), 0.01);
  EXPECT_NEAR(points[1].second, 0.5 * (top + bottom), 0.01);
  EXPECT_NEAR(points[2].first, right, 0.01);
  EXPECT_NEAR(points[2].second, top, 0.01);
}

TEST(SvgChart, EscapesTextForXml) {
  // XML 1.0 (W3C, 2008) section 2.4: '<' and '&' may not appear literally in character data.
  EXPECT_EQ(xml_escape("a<b & \"c\" 'd'>"), "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;");
  LineChart chart{"E < 3 kV/mm & \"safe\"", "x", "y", {{"R<40 & U", {{1.0, 2.0}, {2.0, 3.0}}}}, true};
  const std::string svg = svg_line_chart(chart);
  EXPECT_NE(svg.find("E &lt; 3 kV/mm &amp; &quot;safe&quot;"), std::string::npos);
  EXPECT_NE(svg.find("R&lt;40 &amp; U"), std::string::npos);
  EXPECT_EQ(svg.find("R<40"), std::string::npos);
}

TEST(SvgChart, BreaksTheLineAtMissingValues) {
  LineChart chart{"t", "x", "y", {{"gap", {{0.0, 1.0}, {1.0, NAN}, {2.0, 2.0}, {3.0, 3.0}}}}, false};
  const std::string svg = svg_line_chart(chart);
  std::smatch match;
  ASSERT_TRUE(std::regex_search(svg, match, std::regex("<path d=\"([^\"]*)\"")));
  const std::string d = match[1].str();
  EXPECT_EQ(std::count(d.begin(), d.end(), 'M'), 2);  // two stretches
  EXPECT_EQ(std::count(d.begin(), d.end(), 'L'), 1);
  // Without markers, the lone first point still gets a dot so that it shows.
  const std::regex circle("<circle");
  EXPECT_EQ(std::distance(std::sregex_iterator(svg.begin(), svg.end(), circle), std::sregex_iterator()), 1);
}

TEST(SvgChart, UsesTheOkabeItoPalette) {
  // Okabe & Ito, "Color Universal Design" (2008), colours as RGB hex (recalled from memory).
  const char* expected[] = {"#000000", "#E69F00", "#56B4E9", "#009E73", "#0072B2", "#D55E00", "#CC79A7", "#F0E442"};
  for (size_t i = 0; i < 8; ++i) EXPECT_STREQ(series_colour(i), expected[i]);
  EXPECT_STREQ(series_colour(8), expected[0]);  // repeats, then dashed
  std::vector<ChartSeries> many;
  for (int i = 0; i < 9; ++i) many.push_back({"s" + std::to_string(i), {{0.0, i}, {1.0, i + 1.0}}});
  const std::string svg = svg_line_chart({"t", "x", "y", many, false});
  EXPECT_NE(svg.find("stroke-dasharray"), std::string::npos);
}

TEST(SvgChart, IsWellFormedXmlWithTitleLabelsAndLegend) {
  LineChart chart{"Maximum field & more", "radius R (mm)", "maximum field (kV/mm)",
                  {{"U = 100 kV", {{40.0, 2.5}, {60.0, 1.667}}}, {"U = 200 kV", {{40.0, 5.0}, {60.0, 3.333}}}}, true};
  char folder_pattern[] = "/tmp/hvstress-svg-XXXXXX";
  const std::filesystem::path folder = ::mkdtemp(folder_pattern);
  std::ofstream(folder / "chart.svg") << svg_line_chart(chart);
  // Python's ElementTree (expat) rejects anything that is not well-formed XML.
  std::ofstream(folder / "check.py") << R"py(import sys, xml.etree.ElementTree as ET
ns = "{http://www.w3.org/2000/svg}"
root = ET.parse(sys.argv[1]).getroot()
assert root.tag == ns + "svg", root.tag
texts = ["".join(t.itertext()) for t in root.iter(ns + "text")]
for expected in ["Maximum field & more", "radius R (mm)", "maximum field (kV/mm)", "U = 100 kV", "U = 200 kV", "40", "60"]:
    assert expected in texts, (expected, texts)
assert len(list(root.iter(ns + "path"))) == 2
)py";
  const std::string command = "/usr/bin/python3 '" + (folder / "check.py").string() + "' '" +
                              (folder / "chart.svg").string() + "' 2>&1";
  const int status = std::system(command.c_str());
  std::filesystem::remove_all(folder);
  EXPECT_EQ(status, 0) << command;
}

}  // namespace
}  // namespace hv
