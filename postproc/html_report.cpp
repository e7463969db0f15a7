// The HTML page writer. The page is XHTML-compatible (every element closed, attributes quoted) so
// that it is well-formed XML as well as HTML5 (W3C, "HTML Living Standard", section 13).
#include "postproc/html_report.h"

#include <cctype>

#include "postproc/svg_chart.h"

namespace hv {

namespace {

constexpr const char* kStyle =
    "body{font-family:sans-serif;max-width:60em;margin:2em auto;padding:0 1em;color:#111}"
    "h1{font-size:1.6em}h2{font-size:1.25em;margin-top:1.6em}"
    ".caution{border-left:4px solid #D55E00;background:#fff4ec;padding:.6em 1em}"
    "table{border-collapse:collapse;margin:1em 0}"
    "th,td{border:1px solid #bbb;padding:.25em .6em;text-align:left}"
    "th{background:#f0f0f0}td.num{text-align:right;font-variant-numeric:tabular-nums}"
    "figure{margin:1em 0}svg{max-width:100%;height:auto}";

constexpr const char* kCaution =
    "Caution. High voltage can kill. These results are a design aid, not proof of safety: verify every "
    "design by test, and follow the local codes, standards and licensed practice.";

// A cell such as "12.5", "-3", "1.2e-05" or "4.5 kV": it starts with a number.
bool reads_as_number(const std::string& text) {
  size_t i = text[0] == '-' || text[0] == '+' ? 1 : 0;
  return i < text.size() && std::isdigit(static_cast<unsigned char>(text[i]));
}

std::string table_html(const HtmlTable& table) {
  std::string out = "<table>\n<thead><tr>";
  for (const std::string& heading : table.headings) out += "<th>" + xml_escape(heading) + "</th>";
  out += "</tr></thead>\n<tbody>\n";
  for (const std::vector<std::string>& row : table.rows) {
    out += "<tr>";
    for (const std::string& cell : row)
      out += (!cell.empty() && reads_as_number(cell) ? "<td class=\"num\">" : "<td>") + xml_escape(cell) + "</td>";
    out += "</tr>\n";
  }
  return out + "</tbody>\n</table>\n";
}

std::string section_html(const HtmlSection& section) {
  std::string out = "<section>\n<h2>" + xml_escape(section.heading) + "</h2>\n";
  for (const std::string& paragraph : section.paragraphs) out += "<p>" + xml_escape(paragraph) + "</p>\n";
  if (!section.table.headings.empty()) out += table_html(section.table);
  for (const std::string& figure : section.figures) out += "<figure>\n" + figure + "</figure>\n";
  return out + "</section>\n";
}

}  // namespace

std::string html_report(const HtmlReport& report) {
  std::string out = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n"
                    "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n<title>" +
                    xml_escape(report.title) + "</title>\n<style>" + kStyle + "</style>\n</head>\n<body>\n";
  out += "<h1>" + xml_escape(report.title) + "</h1>\n";
  if (!report.subtitle.empty()) out += "<p>" + xml_escape(report.subtitle) + "</p>\n";
  out += "<p class=\"caution\">" + xml_escape(kCaution) + "</p>\n";
  for (const HtmlSection& section : report.sections) out += section_html(section);
  return out + "</body>\n</html>\n";
}

}  // namespace hv
