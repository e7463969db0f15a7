#include "postproc/onset_starts.h"

#include <algorithm>
#include <cmath>
#include <tuple>

#include "mesh/lagrange.h"

namespace hv::onset {
namespace {

// The hot spot of a surface: where |E| is at least this fraction of its highest value.
constexpr double kHotSpotFraction = 0.8;

// A place on a contour as a sample coordinate u: u = i + t lies at fraction t between samples i, i+1.
struct ContourPlace {
  int surface = -1, contour = -1;
  double u = 0.0;
};

// A stretch between neighbouring samples i, i+1 that both exceed the ionizing field.
struct Stretch {
  int surface = -1, contour = -1, first_sample = 0;
  double length = 0.0;  // m
};

// Extra starts between two hot-spot samples: 1 at 80 % of the surface's highest field, up to 3
// from 93 % on.
int extra_starts(double fraction_of_highest) {
  const int extra = 1 + static_cast<int>(std::floor(3 * (fraction_of_highest - kHotSpotFraction) / (1 - kHotSpotFraction)));
  return std::clamp(extra, 1, 3);
}

// The position at sample coordinate u: on the curved P2 or P3 edge through the samples p e ... p e + p
// (p = order; the Lagrange interpolant of the curved edge) or on the straight P1 edge.
Point position_at(const Mesh& mesh, const std::vector<SurfaceSample>& samples, double u) {
  if (mesh.order > 1) {
    const int p = mesh.order;
    const int first = std::min(p * static_cast<int>(std::floor(u / p)), static_cast<int>(samples.size()) - 1 - p);
    double N[kMaxEdgeNodes], dN_dt[kMaxEdgeNodes];
    edge_shape(p, (u - first) / p, N, dN_dt);  // t = 0, 1/p, ..., 1 at the nodes of the edge
    Point x;
    for (int j = 0; j <= p; ++j) {  // samples in chain order: first end, inner nodes, second end
      const double w = j == 0 ? N[0] : j == p ? N[1] : N[1 + j];
      const Point& node = samples[static_cast<size_t>(first + j)].at;
      x.r += w * node.r, x.z += w * node.z;
    }
    return x;
  }
  const int i = std::min(static_cast<int>(std::floor(u)), static_cast<int>(samples.size()) - 2);
  const double t = u - i;
  const Point& a = samples[static_cast<size_t>(i)].at;
  const Point& b = samples[static_cast<size_t>(i + 1)].at;
  return {a.r + t * (b.r - a.r), a.z + t * (b.z - a.z)};
}

StartPlace start_at(const Mesh& mesh, const std::vector<SurfaceField>& surfaces, const ContourPlace& place) {
  const auto& samples = surfaces[static_cast<size_t>(place.surface)].contours[static_cast<size_t>(place.contour)];
  StartPlace start;
  start.surface = place.surface, start.contour = place.contour;
  const double whole = std::floor(place.u);
  if (place.u == whole) {
    const SurfaceSample& node = samples[static_cast<size_t>(whole)];
    start.sample = static_cast<int>(whole);
    start.s = node.s, start.at = node.at, start.E_abs = node.E_abs, start.E_n = node.E_n;
    return start;
  }
  const SurfaceSample& a = samples[static_cast<size_t>(whole)];
  const SurfaceSample& b = samples[static_cast<size_t>(whole) + 1];
  const double t = place.u - whole;
  start.s = a.s + t * (b.s - a.s);
  start.E_abs = a.E_abs + t * (b.E_abs - a.E_abs);
  start.E_n = a.E_n + t * (b.E_n - a.E_n);
  start.at = position_at(mesh, samples, place.u);
  return start;
}

// `count` places evenly in arc length over the stretches, at the middles of equal shares.
void add_evenly(const std::vector<Stretch>& stretches, int count, std::vector<ContourPlace>& places) {
  double total = 0.0;
  for (const Stretch& stretch : stretches) total += stretch.length;
  if (count <= 0 || !(total > 0.0)) return;
  const double spacing = total / count;
  double stretch_start = 0.0;  // arc length of the current stretch's start, counted over all stretches
  size_t k = 0;
  for (int n = 0; n < count; ++n) {
    const double target = (n + 0.5) * spacing;
    while (k + 1 < stretches.size() && target > stretch_start + stretches[k].length) stretch_start += stretches[k++].length;
    const Stretch& stretch = stretches[k];
    const double t = std::clamp((target - stretch_start) / stretch.length, 0.0, 1.0);
    places.push_back({stretch.surface, stretch.contour, stretch.first_sample + t});
  }
}

}  // namespace

bool is_closed(const std::vector<SurfaceSample>& contour) {
  return contour.size() > 2 && contour.front().at.r == contour.back().at.r && contour.front().at.z == contour.back().at.z;
}

bool borders_gas(const Mesh& mesh, const SurfaceField& field) {
  return field.kind == BoundaryKind::Electrode && field.region >= 0 &&
         field.region < static_cast<int>(mesh.regions.size()) && mesh.regions[static_cast<size_t>(field.region)].is_gas;
}

double highest_field(const SurfaceField& field) {
  double highest = 0.0;
  for (const auto& contour : field.contours)
    for (const SurfaceSample& sample : contour) highest = std::max(highest, sample.E_abs);
  return highest;
}

std::vector<StartPlace> place_start_points(const Mesh& mesh, const std::vector<SurfaceField>& surfaces,
                                           double ionizing_field, int at_least) {
  std::vector<ContourPlace> places;
  std::vector<Stretch> stressed;
  for (size_t f = 0; f < surfaces.size(); ++f) {
    const SurfaceField& field = surfaces[f];
    if (!borders_gas(mesh, field)) continue;
    const double highest = highest_field(field);
    for (size_t c = 0; c < field.contours.size(); ++c) {
      const auto& samples = field.contours[c];
      const auto ionizes = [&](size_t i) { return samples[i].E_abs > ionizing_field; };
      const size_t distinct = is_closed(samples) ? samples.size() - 1 : samples.size();
      for (size_t i = 0; i < samples.size(); ++i) {
        if (i < distinct && ionizes(i)) places.push_back({static_cast<int>(f), static_cast<int>(c), static_cast<double>(i)});
        if (i + 1 == samples.size() || !ionizes(i) || !ionizes(i + 1)) continue;
        stressed.push_back({static_cast<int>(f), static_cast<int>(c), static_cast<int>(i), samples[i + 1].s - samples[i].s});
        const double hotter = std::max(samples[i].E_abs, samples[i + 1].E_abs);
        if (hotter < kHotSpotFraction * highest) continue;
        const int extra = extra_starts(hotter / highest);
        for (int j = 1; j <= extra; ++j)
          places.push_back({static_cast<int>(f), static_cast<int>(c), static_cast<double>(i) + static_cast<double>(j) / (extra + 1)});
      }
    }
  }
  add_evenly(stressed, at_least - static_cast<int>(places.size()), places);
  std::sort(places.begin(), places.end(), [](const ContourPlace& a, const ContourPlace& b) {
    return std::tie(a.surface, a.contour, a.u) < std::tie(b.surface, b.contour, b.u);
  });
  std::vector<StartPlace> starts;
  starts.reserve(places.size());
  for (const ContourPlace& place : places) starts.push_back(start_at(mesh, surfaces, place));
  return starts;
}

}  // namespace hv::onset
