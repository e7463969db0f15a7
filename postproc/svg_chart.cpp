// Line charts as inline SVG. Layout in user units: the plot area on the left, the legend in a column
// on its right, the title above, the axis labels below and to the left.
#include "postproc/svg_chart.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

namespace hv {

namespace {

constexpr double kWidth = 720;
constexpr double kHeight = 400;
constexpr double kPlotLeft = 78;
constexpr double kPlotRight = 500;
constexpr double kPlotTop = 44;
constexpr double kPlotBottom = 330;
constexpr double kLegendLeft = 516;
constexpr double kLegendRow = 18;
constexpr size_t kLegendChars = 28;  // longer names are cut with an ellipsis

// A step m x 10^exponent with m in {1, 2, 5}: kept apart so tick values can be formed exactly.
struct Step {
  int mantissa = 1;
  int exponent = 0;
  double value() const { return mantissa * std::pow(10.0, exponent); }
};

Step nice_step_parts(double raw_step) {
  // Relative slack so that a raw step of exactly 2 x 10^k (rounded in binary) stays 2, not 5.
  constexpr double kSlack = 1e-9;
  const int exponent = static_cast<int>(std::floor(std::log10(raw_step)));
  const double fraction = raw_step / std::pow(10.0, exponent);
  if (fraction <= 1 + kSlack) return {1, exponent};
  if (fraction <= 2 + kSlack) return {2, exponent};
  if (fraction <= 5 + kSlack) return {5, exponent};
  return {1, exponent + 1};
}

// k x step, divided rather than multiplied by a power of ten for negative exponents, so that 3 x 0.1
// comes out as the double nearest 0.3.
double tick_value(long long k, const Step& step) {
  const double units = static_cast<double>(k * step.mantissa);
  return step.exponent < 0 ? units / std::pow(10.0, -step.exponent) : units * std::pow(10.0, step.exponent);
}

std::string fixed(double value, int decimals) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.*f", decimals, value + 0.0);  // + 0.0 turns -0 into 0
  return buffer;
}

std::string coordinate(double value) { return fixed(value, 2); }

// The range [min, max] of the finite x (first) or y (second) values of every series.
std::pair<double, double> data_range(const std::vector<ChartSeries>& series, bool x) {
  double lo = std::numeric_limits<double>::infinity();
  double hi = -lo;
  for (const ChartSeries& line : series)
    for (const auto& [px, py] : line.points) {
      if (!std::isfinite(px) || !std::isfinite(py)) continue;
      lo = std::min(lo, x ? px : py);
      hi = std::max(hi, x ? px : py);
    }
  return {lo, hi};
}

std::string text_element(double x, double y, const std::string& text, const std::string& attributes) {
  return "<text x=\"" + coordinate(x) + "\" y=\"" + coordinate(y) + "\"" + attributes + ">" + xml_escape(text) +
         "</text>\n";
}

std::string line_element(double x1, double y1, double x2, double y2, const std::string& attributes) {
  return "<line x1=\"" + coordinate(x1) + "\" y1=\"" + coordinate(y1) + "\" x2=\"" + coordinate(x2) + "\" y2=\"" +
         coordinate(y2) + "\"" + attributes + "/>\n";
}

// Dashes tell apart series that share a colour once the palette repeats.
std::string dash_attribute(size_t index) {
  static const char* const patterns[] = {"", "6 3", "2 3"};
  const char* pattern = patterns[(index / 8) % 3];
  return *pattern ? std::string(" stroke-dasharray=\"") + pattern + "\"" : "";
}

// `text` cut to kLegendChars bytes at a UTF-8 character boundary, with an ellipsis when cut.
std::string legend_text(const std::string& text) {
  if (text.size() <= kLegendChars) return text;
  size_t cut = kLegendChars - 1;
  while (cut > 0 && (static_cast<unsigned char>(text[cut]) & 0xC0) == 0x80) --cut;
  return text.substr(0, cut) + "\u2026";
}

// The axes' ticks, grid lines and tick labels; x ticks below the plot, y ticks on its left.
std::string axes(const std::vector<double>& x_ticks, const std::vector<double>& y_ticks) {
  const double x_step = x_ticks[1] - x_ticks[0];
  const double y_step = y_ticks[1] - y_ticks[0];
  std::string out = "<g stroke=\"#d9d9d9\" stroke-width=\"1\">\n";
  for (const double x : x_ticks) {
    const double px = map_linear(x, x_ticks.front(), x_ticks.back(), kPlotLeft, kPlotRight);
    out += line_element(px, kPlotTop, px, kPlotBottom, "");
  }
  for (const double y : y_ticks) {
    const double py = map_linear(y, y_ticks.front(), y_ticks.back(), kPlotBottom, kPlotTop);
    out += line_element(kPlotLeft, py, kPlotRight, py, "");
  }
  out += "</g>\n<g font-size=\"12\" fill=\"#000000\">\n";
  for (const double x : x_ticks) {
    const double px = map_linear(x, x_ticks.front(), x_ticks.back(), kPlotLeft, kPlotRight);
    out += text_element(px, kPlotBottom + 16, tick_label(x, x_step), " text-anchor=\"middle\"");
  }
  for (const double y : y_ticks) {
    const double py = map_linear(y, y_ticks.front(), y_ticks.back(), kPlotBottom, kPlotTop);
    out += text_element(kPlotLeft - 6, py + 4, tick_label(y, y_step), " text-anchor=\"end\"");
  }
  out += "</g>\n<rect x=\"" + coordinate(kPlotLeft) + "\" y=\"" + coordinate(kPlotTop) + "\" width=\"" +
         coordinate(kPlotRight - kPlotLeft) + "\" height=\"" + coordinate(kPlotBottom - kPlotTop) +
         "\" fill=\"none\" stroke=\"#000000\"/>\n";
  return out;
}

// One series: its line (broken where a point is not finite) and, when asked or when a stretch is a
// single point, a dot per point.
std::string series_elements(const ChartSeries& line, size_t index, bool markers, const std::vector<double>& x_ticks,
                            const std::vector<double>& y_ticks) {
  const std::string colour = series_colour(index);
  std::string path;
  std::string dots;
  bool pen_down = false;
  for (size_t i = 0; i < line.points.size(); ++i) {
    const auto& [x, y] = line.points[i];
    if (!std::isfinite(x) || !std::isfinite(y)) {
      pen_down = false;
      continue;
    }
    const double px = map_linear(x, x_ticks.front(), x_ticks.back(), kPlotLeft, kPlotRight);
    const double py = map_linear(y, y_ticks.front(), y_ticks.back(), kPlotBottom, kPlotTop);
    path += (pen_down ? " L" : " M") + coordinate(px) + " " + coordinate(py);
    const bool next_drawn = i + 1 < line.points.size() && std::isfinite(line.points[i + 1].first) &&
                            std::isfinite(line.points[i + 1].second);
    if (markers || (!pen_down && !next_drawn))
      dots += "<circle cx=\"" + coordinate(px) + "\" cy=\"" + coordinate(py) + "\" r=\"3\" fill=\"" + colour + "\"/>\n";
    pen_down = true;
  }
  std::string out;
  if (!path.empty())
    out += "<path d=\"" + path.substr(1) + "\" fill=\"none\" stroke=\"" + colour + "\" stroke-width=\"2\"" +
           dash_attribute(index) + "/>\n";
  return out + dots;
}

std::string legend(const std::vector<ChartSeries>& series) {
  const size_t rows = static_cast<size_t>((kPlotBottom - kPlotTop) / kLegendRow);
  std::string out = "<g font-size=\"12\" fill=\"#000000\">\n";
  for (size_t i = 0; i < series.size(); ++i) {
    const double y = kPlotTop + 8 + kLegendRow * static_cast<double>(i);
    if (i + 1 == rows && series.size() > rows) {
      out += text_element(kLegendLeft, y + 4, "and " + std::to_string(series.size() - i) + " more", "");
      break;
    }
    out += line_element(kLegendLeft, y, kLegendLeft + 22, y,
                        std::string(" stroke=\"") + series_colour(i) + "\" stroke-width=\"2\"" + dash_attribute(i));
    out += text_element(kLegendLeft + 28, y + 4, legend_text(series[i].name), "");
  }
  return out + "</g>\n";
}

}  // namespace

double nice_step(double raw_step) { return nice_step_parts(raw_step).value(); }

std::vector<double> nice_ticks(double lo, double hi, int target_count) {
  if (!(hi > lo)) {  // one value (or none): a range around it
    const double half_width = lo == 0.0 || !std::isfinite(lo) ? 1.0 : 0.1 * std::abs(lo);
    if (!std::isfinite(lo)) lo = 0.0;
    hi = lo + half_width;
    lo -= half_width;
  }
  const Step step = nice_step_parts((hi - lo) / std::max(target_count, 1));
  const double size = step.value();
  // Slack of 1e-9 steps: a bound that is a tick up to rounding (0.3 / 0.1 = 2.9999999999999996) is one.
  const auto first = static_cast<long long>(std::floor(lo / size + 1e-9));
  const auto last = std::max(first + 1, static_cast<long long>(std::ceil(hi / size - 1e-9)));
  std::vector<double> ticks;
  for (long long k = first; k <= last; ++k) ticks.push_back(tick_value(k, step));
  return ticks;
}

std::string tick_label(double value, double step) {
  const int exponent = static_cast<int>(std::floor(std::log10(step) + 1e-9));
  if (exponent < -6 || exponent > 6) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.3g", std::abs(value) < 1e-6 * step ? 0.0 : value);
    return buffer;
  }
  return fixed(value, std::max(0, -exponent));
}

double map_linear(double value, double from_lo, double from_hi, double to_lo, double to_hi) {
  if (from_hi == from_lo) return 0.5 * (to_lo + to_hi);
  return to_lo + (value - from_lo) * (to_hi - to_lo) / (from_hi - from_lo);
}

std::string xml_escape(const std::string& text) {
  std::string out;
  for (const char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: out += c;
    }
  }
  return out;
}

const char* series_colour(size_t index) {
  // Okabe & Ito (2008): black, orange, sky blue, bluish green, blue, vermillion, reddish purple, yellow.
  static const char* const palette[] = {"#000000", "#E69F00", "#56B4E9", "#009E73",
                                        "#0072B2", "#D55E00", "#CC79A7", "#F0E442"};
  return palette[index % 8];
}

std::string svg_line_chart(const LineChart& chart) {
  const auto [x_lo, x_hi] = data_range(chart.series, true);
  const auto [y_lo, y_hi] = data_range(chart.series, false);
  const bool has_data = x_lo <= x_hi;
  const std::vector<double> x_ticks = nice_ticks(has_data ? x_lo : 0.0, has_data ? x_hi : 1.0);
  const std::vector<double> y_ticks = nice_ticks(has_data ? y_lo : 0.0, has_data ? y_hi : 1.0);

  std::string out = "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 " + fixed(kWidth, 0) + " " +
                    fixed(kHeight, 0) + "\" width=\"" + fixed(kWidth, 0) + "\" height=\"" + fixed(kHeight, 0) +
                    "\" role=\"img\" font-family=\"sans-serif\">\n";
  out += "<title>" + xml_escape(chart.title) + "</title>\n";
  out += "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n";
  out += text_element(kWidth / 2, 24, chart.title, " text-anchor=\"middle\" font-size=\"15\" font-weight=\"bold\"");
  out += axes(x_ticks, y_ticks);
  out += text_element((kPlotLeft + kPlotRight) / 2, kPlotBottom + 42, chart.x_label,
                      " text-anchor=\"middle\" font-size=\"13\"");
  const double y_label_x = 20;
  const double y_label_y = (kPlotTop + kPlotBottom) / 2;
  out += text_element(y_label_x, y_label_y, chart.y_label,
                      " text-anchor=\"middle\" font-size=\"13\" transform=\"rotate(-90 " + coordinate(y_label_x) +
                          " " + coordinate(y_label_y) + ")\"");
  if (!has_data)
    out += text_element((kPlotLeft + kPlotRight) / 2, y_label_y, "no data", " text-anchor=\"middle\" font-size=\"13\"");
  for (size_t i = 0; i < chart.series.size(); ++i)
    out += series_elements(chart.series[i], i, chart.markers, x_ticks, y_ticks);
  out += legend(chart.series);
  return out + "</svg>\n";
}

}  // namespace hv
