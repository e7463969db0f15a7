#include "tools/app/compare_report.h"

#include <algorithm>
#include <cmath>
#include <functional>

#include "postproc/html_report.h"
#include "postproc/svg_chart.h"
#include "postproc/text_format.h"

namespace hv {

namespace {

// Four significant digits: enough to compare designs, few enough to read (as in report.md).
constexpr int kDigits = 4;

std::string shown(double si_value, const DisplayUnit& unit) {
  return std::isfinite(si_value) ? significant(si_value * unit.per_si, kDigits) : "";
}

const DisplayUnit kField = display_unit("V/m");
const DisplayUnit kVoltage = display_unit("V");
const DisplayUnit kLength = display_unit("m");

// "a, b, c"
std::string joined(const std::vector<std::string>& items) {
  std::string out;
  for (const std::string& item : items) out += (out.empty() ? "" : ", ") + item;
  return out;
}

std::string with_unit(const std::string& label, const DisplayUnit& unit) {
  return unit.text.empty() ? label : label + " (" + unit.text + ")";
}

// "R = 40 mm"
std::string setting_text(const std::string& name, double si_value, const DisplayUnit& unit) {
  return name + " = " + shown(si_value, unit) + (unit.text.empty() ? "" : " " + unit.text);
}

std::string inception_cell(const SummaryOnset& onset) {
  if (!onset.evaluated) return "not evaluated";
  return onset.inception_found ? shown(onset.inception_V, kVoltage) : "above the searched range";
}

std::string status_cell(const LoadedRun& run) {
  if (!run.has_summary) return "failed: " + run.run.message;
  const SummaryOnset& onset = run.summary.onset;
  if (onset.evaluated && std::isfinite(onset.required_margin) && !onset.meets_required_margin)
    return "misses the required margin " + significant(onset.required_margin, kDigits);
  return "finished";
}

// A varied parameter's value: from the summary, else (a failed variant) its setting as given.
std::string parameter_cell(const LoadedRun& run, const std::string& name, const DisplayUnit& unit) {
  if (run.has_summary) return shown(run.summary.parameter(name), unit);
  for (const auto& [setting, value] : run.run.varied)
    if (setting == name) return value;
  return "";
}

HtmlSection ranking_section(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied) {
  HtmlSection section;
  section.heading = "Ranking";
  section.paragraphs.push_back(ranked_by_inception(runs)
                                   ? "Best first: highest discharge inception voltage first; failed runs last."
                                   : "Best first: lowest maximum surface field first; failed runs last.");
  HtmlTable& table = section.table;
  table.headings = {"#", "run"};
  for (const std::string& name : varied) table.headings.push_back(with_unit(name, display_unit(parameter_unit(runs, name))));
  table.headings.insert(table.headings.end(), {"max field (kV/mm)", "on electrode", "at r, z (mm)",
                                               "inception (kV)", "margin", "status"});
  int rank = 0;
  for (const size_t i : ranking(runs)) {
    const LoadedRun& run = runs[i];
    const RunSummary& summary = run.summary;
    std::vector<std::string> row{std::to_string(++rank), run.run.label};
    for (const std::string& name : varied) row.push_back(parameter_cell(run, name, display_unit(parameter_unit(runs, name))));
    if (run.has_summary) {
      row.insert(row.end(), {shown(summary.max_field_V_per_m, kField), summary.max_field_electrode,
                             shown(summary.max_field_at.r, kLength) + ", " + shown(summary.max_field_at.z, kLength),
                             inception_cell(summary.onset),
                             summary.onset.evaluated ? shown(summary.onset.margin, DisplayUnit{}) : ""});
    } else {
      row.insert(row.end(), 5, "");
    }
    row.push_back(status_cell(run));
    table.rows.push_back(row);
  }
  return section;
}

// One series per combination of the other varied parameters' values, each point (parameter `name`,
// value) in display units, sorted along x; runs without a summary are left out.
std::vector<ChartSeries> series_against(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied,
                                        const std::string& name, const std::function<double(const RunSummary&)>& value) {
  std::vector<std::string> others;
  for (const std::string& other : varied)
    if (other != name) others.push_back(other);
  const DisplayUnit x_unit = display_unit(parameter_unit(runs, name));

  std::vector<std::vector<double>> keys;
  std::vector<ChartSeries> series;
  for (const LoadedRun& run : runs) {
    if (!run.has_summary) continue;
    std::vector<double> key;
    for (const std::string& other : others) key.push_back(run.summary.parameter(other));
    auto found = std::find(keys.begin(), keys.end(), key);
    if (found == keys.end()) {
      std::vector<std::string> settings;
      for (size_t k = 0; k < others.size(); ++k)
        settings.push_back(setting_text(others[k], key[k], display_unit(parameter_unit(runs, others[k]))));
      series.push_back({settings.empty() ? "all runs" : joined(settings), {}});
      keys.push_back(key);
      found = keys.end() - 1;
    }
    series[static_cast<size_t>(found - keys.begin())].points.emplace_back(run.summary.parameter(name) * x_unit.per_si,
                                                                          value(run.summary));
  }
  for (ChartSeries& line : series) std::sort(line.points.begin(), line.points.end());
  return series;
}

bool any_inception(const std::vector<LoadedRun>& runs) {
  return std::any_of(runs.begin(), runs.end(), [](const LoadedRun& run) {
    return run.has_summary && run.summary.onset.evaluated && run.summary.onset.inception_found;
  });
}

HtmlSection parameter_section(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied) {
  HtmlSection section;
  section.heading = "Against the varied parameters";
  section.paragraphs.push_back("One line per combination of the other varied parameters.");
  for (const std::string& name : varied) {
    const std::string x_label = with_unit(name, display_unit(parameter_unit(runs, name)));
    section.figures.push_back(svg_line_chart(
        {"Maximum surface field against " + name, x_label, "maximum field (kV/mm)",
         series_against(runs, varied, name, [](const RunSummary& s) { return s.max_field_V_per_m * kField.per_si; })}));
    if (any_inception(runs))
      section.figures.push_back(svg_line_chart(
          {"Inception voltage against " + name, x_label, "inception voltage (kV)",
           series_against(runs, varied, name, [](const RunSummary& s) {
             return s.onset.inception_found ? s.onset.inception_V * kVoltage.per_si : NAN;
           })}));
  }
  return section;
}

HtmlSection profile_section(const std::vector<LoadedRun>& runs) {
  HtmlSection section;
  section.heading = "Field along the critical electrode";
  section.paragraphs.push_back("For every run, |E| along the contour of its critical electrode (where the discharge "
                               "onset starts, else where the field is highest), on the side where it is highest; "
                               "s is the arc length from the contour's start.");
  LineChart chart{"|E| along the critical electrode", "arc length s (mm)", "|E| (kV/mm)", {}, false};
  for (const LoadedRun& run : runs) {
    if (run.profile.empty()) continue;
    ChartSeries line{run.run.label + " (" + run.critical_electrode + ")", {}};
    for (const auto& [s, field] : run.profile) line.points.emplace_back(s * kLength.per_si, field * kField.per_si);
    chart.series.push_back(line);
  }
  section.figures.push_back(svg_line_chart(chart));
  return section;
}

// The runs' common title, or a count when they differ.
std::string report_title(const std::vector<LoadedRun>& runs) {
  std::string title;
  for (const LoadedRun& run : runs) {
    if (!run.has_summary) continue;
    if (!title.empty() && run.summary.title != title) return "Comparison of " + std::to_string(runs.size()) + " runs";
    title = run.summary.title;
  }
  return "Comparison: " + (title.empty() ? std::to_string(runs.size()) + " runs" : title);
}

}  // namespace

std::string comparison_html(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied) {
  const auto finished = std::count_if(runs.begin(), runs.end(), [](const LoadedRun& run) { return run.has_summary; });
  HtmlReport report;
  report.title = report_title(runs);
  report.subtitle = std::to_string(runs.size()) + " runs, " + std::to_string(finished) + " finished" +
                    (varied.empty() ? "." : "; varied: " + joined(varied) + ".");
  report.sections.push_back(ranking_section(runs, varied));
  if (!varied.empty() && finished > 0) report.sections.push_back(parameter_section(runs, varied));
  report.sections.push_back(profile_section(runs));
  return html_report(report);
}

}  // namespace hv
