// (being written: placeholder so the binary links while the sweep is built)
#include "tools/app/sweep.h"

#include "mesh/base.h"

namespace hv {
int sweep_command(const SweepOptions&) { throw RunError("sweep: not built yet"); }
}  // namespace hv
