// report.html of a comparison: the caution, the ranking (best first, failed runs last with their
// message), per varied parameter the maximum field and the inception voltage against it, and |E|
// along each run's critical electrode. Engineering units (mm, kV, kV/mm).
#pragma once

#include <string>
#include <vector>

#include "tools/app/compare_runs.h"

namespace hv {

// The whole page (postproc/html_report.h), its charts drawn by postproc/svg_chart.h.
std::string comparison_html(const std::vector<LoadedRun>& runs, const std::vector<std::string>& varied);

}  // namespace hv
