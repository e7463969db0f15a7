// Where field lines of the onset evaluation start (private to the onset evaluation): places on the
// electrode surfaces in the gas whose field could ionize at the highest voltage considered.
#pragma once

#include <vector>

#include "mesh/mesh.h"
#include "postproc/results.h"

namespace hv::onset {

// One start on the contour `contour` of surfaces[surface].
struct StartPlace {
  int surface = -1;
  int contour = -1;
  double s = 0.0;      // arc length along the contour, m
  Point at;            // on the contour (on the curved P2 edge for second-order meshes), m
  double E_abs = 0.0;  // |E| at the solved voltage, V/m (linear between samples)
  double E_n = 0.0;    // normal component, V/m, positive pointing away from the conductor
  int sample = -1;     // the surface sample (node) it sits on, or -1 between samples
};

// A closed contour (a torus) ends with its first node again.
bool is_closed(const std::vector<SurfaceSample>& contour);

// An electrode's surface field seen from the gas: where onset is evaluated.
bool borders_gas(const Mesh& mesh, const SurfaceField& field);

// The highest |E| over every sample of a surface field, V/m.
double highest_field(const SurfaceField& field);

// The starts on every Electrode surface field seen from a gas region, in the order of `surfaces`,
// contours, then arc length:
//   - every sample (node) with E_abs > ionizing_field (V/m, at the solved voltage);
//   - between two such neighbouring samples, where the field is within 20 % of the highest on that
//     surface, 1 to 3 more points (more where the field is higher): the hot spot is where inception
//     is decided, and its samples are often a few elements apart;
//   - then, if fewer than `at_least` in all, the missing number evenly in arc length over the
//     stretches between neighbouring samples that both exceed ionizing_field.
std::vector<StartPlace> place_start_points(const Mesh& mesh, const std::vector<SurfaceField>& surfaces,
                                           double ionizing_field, int at_least);

}  // namespace hv::onset
