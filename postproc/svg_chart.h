// A small line chart as inline SVG text (SVG 1.1, W3C 2011): title, axis labels with units, round
// ticks, a legend, and series colours from a fixed colour-blind-safe palette. Knows nothing about
// fields or runs, so any report can draw with it.
#pragma once

#include <cstddef>
#include <string>
#include <utility>
#include <vector>

namespace hv {

// One line of a chart: (x, y) points in the units of the axes, drawn in the given order. Points with a
// non-finite coordinate are skipped (they break the line).
struct ChartSeries {
  std::string name;                              // legend text
  std::vector<std::pair<double, double>> points;
};

struct LineChart {
  std::string title;
  std::string x_label;   // with its unit, e.g. "radius R (mm)"
  std::string y_label;   // e.g. "maximum field (kV/mm)"
  std::vector<ChartSeries> series;
  bool markers = true;   // a dot at every point (for few points; off for dense profiles)
};

// The SVG element (<svg xmlns=...>...</svg>), 720 x 400 user units, scalable by CSS. Text is
// escaped; a chart without any finite point shows its frame and title with the note "no data".
std::string svg_line_chart(const LineChart& chart);

// Round tick values covering [lo, hi]: a step of 1, 2 or 5 times a power of ten chosen so that about
// `target_count` ticks fall in the range (Heckbert, "Nice numbers for graph labels", Graphics Gems,
// 1990). The first tick is <= lo and the last >= hi, so the axis spans the ticks. lo == hi gives a
// range around the value.
std::vector<double> nice_ticks(double lo, double hi, int target_count = 5);

// The step 1, 2 or 5 x 10^k nearest above `raw_step` > 0 (Heckbert's rounding without the "round"
// option: a step never smaller than asked, so the count stays at most the target).
double nice_step(double raw_step);

// Text for a tick label: the value with just the decimals the step needs ("0.25", "1500", "-2").
std::string tick_label(double value, double step);

// Linear map of [from_lo, from_hi] onto [to_lo, to_hi] (to_hi < to_lo flips, as SVG's y axis does).
double map_linear(double value, double from_lo, double from_hi, double to_lo, double to_hi);

// Text safe in XML content and in attribute values: & < > " ' become entities.
std::string xml_escape(const std::string& text);

// The colour of series `index`: the palette of Okabe & Ito ("Color Universal Design", 2008),
// black first, yellow last (it is faint on white); repeats after 8.
const char* series_colour(size_t index);

}  // namespace hv
