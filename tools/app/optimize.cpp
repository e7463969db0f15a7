// (being written: placeholder so the binary links while the optimizer is built)
#include "tools/app/optimize.h"

#include "mesh/base.h"

namespace hv {
int optimize_command(const OptimizeOptions&) { throw RunError("optimize: not built yet"); }
}  // namespace hv
