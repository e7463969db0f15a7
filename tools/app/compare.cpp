// (being written: placeholder so the binary links while the comparison is built)
#include "tools/app/compare.h"

#include "mesh/base.h"

namespace hv {
std::vector<ComparedRun> find_runs(const std::vector<std::string>&) { throw RunError("compare: not built yet"); }
void write_comparison(const std::vector<ComparedRun>&, const std::vector<std::string>&, const std::string&) {
  throw RunError("compare: not built yet");
}
int compare_command(const std::vector<std::string>&, const std::string&, bool) { throw RunError("compare: not built yet"); }
}  // namespace hv
