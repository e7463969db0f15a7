// Helpers for the tests that run the whole pipeline: bundled cases by name, surface samples.
#pragma once

#include <algorithm>
#include <functional>
#include <memory>
#include <string>

#include "tools/app/run_case.h"
#include "tools/case/case.h"

namespace hv::testing {

inline std::string bundled_case(const std::string& name) {
  return std::string(HV_SOURCE_DIR) + "/cases/" + name;
}

// Calls `visit` for every recovered sample on the surfaces of the conductor named `electrode`.
inline void for_each_electrode_sample(const RunResults& results, const std::string& electrode,
                                      const std::function<void(const SurfaceSample&)>& visit) {
  for (const SurfaceField& surface : results.surfaces) {
    if (surface.kind != BoundaryKind::Electrode || surface.name != electrode) continue;
    for (const auto& contour : surface.contours) {
      for (const SurfaceSample& sample : contour) visit(sample);
    }
  }
}

// The largest relative deviation of |E| from `expected(sample)` over an electrode's samples.
inline double worst_relative_error(const RunResults& results, const std::string& electrode,
                                   const std::function<double(const SurfaceSample&)>& expected) {
  double worst = 0.0;
  int count = 0;
  for_each_electrode_sample(results, electrode, [&](const SurfaceSample& sample) {
    const double reference = expected(sample);
    worst = std::max(worst, std::abs(sample.E_abs - reference) / std::abs(reference));
    ++count;
  });
  return count > 0 ? worst : 1e300;  // no samples at all is a failure, not a pass
}

}  // namespace hv::testing
