// A self-contained HTML page (HTML5 written as well-formed XML, so XML tools can read it too): inline
// CSS, inline SVG figures, no scripts and nothing fetched from the network. Every page opens with the
// high-voltage safety caution.
#pragma once

#include <string>
#include <vector>

namespace hv {

// Cells are plain text; the writer escapes them. Cells that read as numbers are right-aligned.
struct HtmlTable {
  std::vector<std::string> headings;
  std::vector<std::vector<std::string>> rows;
};

struct HtmlSection {
  std::string heading;
  std::vector<std::string> paragraphs;  // plain text, escaped
  HtmlTable table;                      // left out when it has no headings
  std::vector<std::string> figures;     // SVG elements (svg_chart.h), inserted as they are
};

struct HtmlReport {
  std::string title;
  std::string subtitle;  // one line under the title, e.g. what was compared
  std::vector<HtmlSection> sections;
};

// The whole page: title, caution, then the sections in order.
std::string html_report(const HtmlReport& report);

}  // namespace hv
