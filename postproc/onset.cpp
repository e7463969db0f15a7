// The onset evaluation: start points on the gas-side electrode surfaces, one field line traced from
// each, each line's inception voltage by root finding on its samples (postproc/onset_criteria.h),
// and the design's figures gathered from them.
#include "postproc/onset.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <exception>

#include "postproc/onset_criteria.h"
#include "postproc/onset_starts.h"
#include "postproc/results.h"
#include "postproc/text_format.h"

namespace hv {
namespace {

// The search covers scales up to this factor above the lowest scale at which any surface point
// starts to ionize (critical field / highest surface field). Onset surface fields in air run from
// the critical field (large radii) to about 4.7 times it at 0.1 mm radius (Peek's coaxial law,
// physics.md), so a factor of 5 covers every radius a design resolves; beyond it a start reports
// "no inception", which is how a surface far from the hot spot should read.
constexpr double kSearchRangeFactor = 5.0;

SourceLocation at_key(const SourceLocation& onset_place, const std::string& key) {
  SourceLocation where = onset_place;
  where.key_path = "onset." + key;
  return where;
}

onset::Criterion criterion_of(const OnsetSettings& settings) {
  return settings.criterion == "townsend" ? onset::Criterion::Townsend : onset::Criterion::Streamer;
}

// What one line says.
struct LineVerdict {
  double scale = kNoInception;  // inception scale of the solved field
  std::string polarity;         // the polarity that gave it ("both": either, for the streamer)
  double integral_operating = 0.0;
  double zone_length_operating = 0.0;
};

// The Townsend criterion holds where the start electrode is the cathode. The field of the solved
// potentials points away from the conductor where E_n > 0; at polarity p (+1 positive, -1 negative:
// all fixed potentials multiplied by p) it points into the conductor, making it the cathode, where
// p E_n < 0. Returns the polarity under which the start is a cathode, or "" when none of those asked.
std::string cathode_polarity(const std::string& asked, double E_n) {
  const bool positive_asked = asked != "negative", negative_asked = asked != "positive";
  if (positive_asked && E_n < 0) return "positive";
  if (negative_asked && E_n > 0) return "negative";
  return "";
}

LineVerdict judge_line(const std::vector<LinePoint>& line, const onset::StartPlace& start, const GasModel& gas,
                       const OnsetSettings& settings, double highest_scale) {
  const onset::CoefficientsAt coefficients = [&gas](double E) { return gas.coefficients(E); };
  onset::CriterionParameters parameters;
  parameters.criterion = criterion_of(settings);
  parameters.K = settings.K, parameters.gamma = settings.gamma, parameters.critical_field = gas.critical_field();
  const double operating_scale = settings.operating_V / settings.solved_V;

  LineVerdict verdict;
  const onset::StreamerIntegral at_operating =
      onset::streamer_integral(line, operating_scale, coefficients, parameters.critical_field);
  verdict.zone_length_operating = at_operating.zone_length;
  std::string polarity = settings.polarity;
  if (parameters.criterion == onset::Criterion::Streamer) {
    verdict.integral_operating = at_operating.integral;
  } else {
    polarity = cathode_polarity(settings.polarity, start.E_n);
    if (polarity.empty()) return verdict;  // an anode under every polarity asked
    verdict.integral_operating = settings.gamma * onset::townsend_generation_integral(line, operating_scale, coefficients);
  }
  // Ionization begins at the surface at scale critical / E_start; below it the zone is empty.
  const double lowest = parameters.critical_field / start.E_abs;
  verdict.scale = onset::inception_scale(line, coefficients, parameters, lowest, std::max(lowest, highest_scale));
  if (verdict.scale != kNoInception) verdict.polarity = polarity;
  return verdict;
}

constexpr double kFieldChangePerPoint = 0.01;

// One field line per start, traced away from the electrode until |E| falls below stop_field. The
// first point takes the recovered surface field of the start (consistent flux), which is more
// accurate at the surface than the element gradient the tracer samples there.
std::vector<FieldLine> trace_lines(const Mesh& mesh, const Eigen::VectorXd& potential,
                                   const std::vector<onset::StartPlace>& starts, double stop_field) {
  const FieldSampler sampler(mesh, potential);
  std::vector<FieldLine> lines(starts.size());
  std::exception_ptr failure;
#pragma omp parallel for schedule(dynamic, 8)
  for (long k = 0; k < static_cast<long>(starts.size()); ++k) {
    const onset::StartPlace& start = starts[static_cast<size_t>(k)];
    TraceOptions options;
    options.direction = start.E_n >= 0 ? 1.0 : -1.0;  // away from the conductor
    options.stop_field = stop_field;
    // The criteria integrate with 1/|E| linear between points (exact for the 1/r field of a
    // cylinder), so points 1 % apart in |E| suffice; the tracer's default is finer, for the
    // trapezoidal rule.
    options.max_field_change = kFieldChangePerPoint;
    try {
      FieldLine line = trace_field_line(sampler, start.at, options);
      if (!line.points.empty()) line.points.front().E = start.E_abs;
      lines[static_cast<size_t>(k)] = std::move(line);
    } catch (...) {
#pragma omp critical(onset_trace_failure)
      if (!failure) failure = std::current_exception();
    }
  }
  if (failure) std::rethrow_exception(failure);
  return lines;
}

// Each start with what its line says, in the order of the starts (lines[k] belongs to places[k]).
std::vector<OnsetStart> judge_starts(const std::vector<onset::StartPlace>& places, const std::vector<FieldLine>& lines,
                                     const std::vector<SurfaceField>& surfaces, const GasModel& gas,
                                     const OnsetSettings& settings, double highest_scale) {
  const double operating_scale = settings.operating_V / settings.solved_V;
  std::vector<OnsetStart> starts(places.size());
#pragma omp parallel for schedule(dynamic, 8)
  for (long k = 0; k < static_cast<long>(places.size()); ++k) {
    const onset::StartPlace& place = places[static_cast<size_t>(k)];
    const LineVerdict verdict = judge_line(lines[static_cast<size_t>(k)].points, place, gas, settings, highest_scale);
    OnsetStart& start = starts[static_cast<size_t>(k)];
    start.electrode = surfaces[static_cast<size_t>(place.surface)].name;
    start.surface = place.surface, start.contour = place.contour, start.s = place.s, start.at = place.at;
    start.E_operating = place.E_abs * operating_scale;
    start.integral_operating = verdict.integral_operating;
    start.zone_length_operating = verdict.zone_length_operating;
    start.inception_V = verdict.scale * settings.solved_V;
    start.margin = start.inception_V / settings.operating_V;
    start.polarity = verdict.polarity;
    start.line = static_cast<int>(k);
  }
  return starts;
}

// The highest |E| on any electrode surface that borders the gas, V/m at the solved voltage.
double highest_gas_surface_field(const Mesh& mesh, const std::vector<SurfaceField>& surfaces) {
  double highest = 0.0;
  for (const SurfaceField& field : surfaces)
    if (onset::borders_gas(mesh, field)) highest = std::max(highest, onset::highest_field(field));
  return highest;
}

// Electrode names with a gas-side surface, in case order (by conductor index).
std::vector<ElectrodeOnset> gas_electrodes(const Mesh& mesh, const std::vector<SurfaceField>& surfaces) {
  std::vector<std::pair<int, std::string>> named;
  for (const SurfaceField& field : surfaces)
    if (onset::borders_gas(mesh, field)) named.emplace_back(field.conductor, field.name);
  std::sort(named.begin(), named.end());
  named.erase(std::unique(named.begin(), named.end()), named.end());
  std::vector<ElectrodeOnset> electrodes;
  for (const auto& entry : named) electrodes.push_back({entry.second, kNoInception, kNoInception, Point{}});
  return electrodes;
}

// The lowest inception voltage, overall and per electrode.
void gather_lowest(OnsetResult& result) {
  for (const OnsetStart& start : result.starts) {
    if (start.inception_V < result.inception_V) {
      result.inception_V = start.inception_V, result.margin = start.margin;
      result.electrode = start.electrode, result.at = start.at;
    }
    for (ElectrodeOnset& electrode : result.electrodes)
      if (electrode.electrode == start.electrode && start.inception_V < electrode.inception_V) {
        electrode.inception_V = start.inception_V, electrode.margin = start.margin, electrode.at = start.at;
      }
  }
}

// Maximal runs of consecutive starts on one contour whose inception voltage lies below operating x
// required margin (x 1 when none is required).
std::vector<OnsetRegion> regions_below(const std::vector<OnsetStart>& starts, const OnsetSettings& settings) {
  const double limit = settings.operating_V * (std::isnan(settings.required_margin) ? 1.0 : settings.required_margin);
  std::vector<OnsetRegion> regions;
  const OnsetStart* previous = nullptr;
  for (const OnsetStart& start : starts) {
    const bool continues = previous && previous->surface == start.surface && previous->contour == start.contour &&
                           previous->inception_V < limit;
    if (start.inception_V < limit) {
      if (!continues) regions.push_back({start.electrode, start.s, start.s, start.at, start.at, start.margin});
      OnsetRegion& region = regions.back();
      region.s_to = start.s, region.to = start.at;
      region.lowest_margin = std::min(region.lowest_margin, start.margin);
    }
    previous = &start;
  }
  return regions;
}

// Inception voltage and margin on the surface samples the starts sit on; NaN everywhere else.
void mark_samples(const std::vector<OnsetStart>& starts, const std::vector<onset::StartPlace>& places,
                  std::vector<SurfaceField>& surfaces) {
  for (SurfaceField& field : surfaces)
    for (auto& contour : field.contours)
      for (SurfaceSample& sample : contour) sample.inception_V = sample.margin = NAN;
  for (size_t k = 0; k < starts.size(); ++k) {
    if (places[k].sample < 0) continue;
    auto& contour = surfaces[static_cast<size_t>(places[k].surface)].contours[static_cast<size_t>(places[k].contour)];
    const size_t i = static_cast<size_t>(places[k].sample);
    contour[i].inception_V = starts[k].inception_V, contour[i].margin = starts[k].margin;
    if (i == 0 && onset::is_closed(contour)) contour.back().inception_V = starts[k].inception_V, contour.back().margin = starts[k].margin;
  }
}

// The field range the coefficients were evaluated over, V/m: from the critical field (the zone's
// end) or, for the Townsend integral, the line's weakest point, to the line's strongest point, at
// the inception and the operating scales.
struct FieldRange {
  double lowest = INFINITY, highest = 0.0;
  void cover(const FieldLine& line, double scale, double critical_field, bool whole_line) {
    if (!(scale < kNoInception) || line.points.empty()) return;
    double weakest = INFINITY, strongest = 0.0;
    for (const LinePoint& p : line.points) weakest = std::min(weakest, p.E), strongest = std::max(strongest, p.E);
    if (scale * strongest <= critical_field) return;
    lowest = std::min(lowest, whole_line ? scale * weakest : critical_field);
    highest = std::max(highest, scale * strongest);
  }
};

std::string megavolts_per_metre(double E) { return significant(E / 1e6, 3) + " MV/m"; }

// One warning per side of the gas model's validity range that the fields used leave.
std::vector<std::string> validity_warnings(const std::vector<OnsetStart>& starts, const std::vector<FieldLine>& lines,
                                           const GasModel& gas, const OnsetSettings& settings) {
  FieldRange used;
  const bool whole_line = settings.criterion == "townsend";
  for (const OnsetStart& start : starts) {
    const FieldLine& line = lines[static_cast<size_t>(start.line)];
    used.cover(line, start.inception_V / settings.solved_V, gas.critical_field(), whole_line);
    used.cover(line, settings.operating_V / settings.solved_V, gas.critical_field(), whole_line);
  }
  std::vector<std::string> warnings;
  const std::string model = gas.info().title + " (valid " + megavolts_per_metre(gas.valid_min_field()) + " to " +
                            megavolts_per_metre(gas.valid_max_field()) + " at this gas density)";
  if (used.highest > gas.valid_max_field())
    warnings.push_back("onset: fields up to " + megavolts_per_metre(used.highest) + " lie above the validity range of " +
                       model + "; the ionization coefficients there are extrapolated");
  if (used.lowest < gas.valid_min_field())
    warnings.push_back("onset: fields down to " + megavolts_per_metre(used.lowest) + " lie below the validity range of " +
                       model + "; the ionization coefficients there are extrapolated");
  return warnings;
}

}  // namespace

OnsetSettings resolve_onset_settings(const OnsetSpec& spec, const GasModel& gas, double solved_V) {
  if (!(solved_V > 0.0))
    throw InputError(spec.where, "the onset evaluation needs an electrode at a nonzero fixed potential",
                     "give an electrode a potential other than 0 V: the onset voltage scales that field");
  OnsetSettings settings;
  settings.criterion = spec.criterion;
  settings.K = std::isnan(spec.K) ? gas.info().default_K : spec.K;
  settings.gamma = std::isnan(spec.gamma) ? gas.info().default_gamma : spec.gamma;
  settings.polarity = spec.polarity;
  settings.operating_V = std::isnan(spec.operating_V) ? solved_V : spec.operating_V;
  settings.solved_V = solved_V;
  settings.required_margin = spec.required_margin;
  settings.start_points = spec.start_points;
  if (settings.criterion != "streamer" && settings.criterion != "townsend")
    throw InputError(at_key(spec.where, "criterion"), "unknown criterion '" + settings.criterion + "'", "use streamer or townsend");
  if (settings.polarity != "positive" && settings.polarity != "negative" && settings.polarity != "both")
    throw InputError(at_key(spec.where, "polarity"), "unknown polarity '" + settings.polarity + "'", "use positive, negative or both");
  if (!(settings.K > 0.0) || !std::isfinite(settings.K))
    throw InputError(at_key(spec.where, "K"), "K must be a finite number above 0", "the streamer constant of air is about 9.15");
  if (!(settings.gamma > 0.0 && settings.gamma <= 1.0))
    throw InputError(at_key(spec.where, "gamma"), "gamma must lie in (0, 1]", "secondary coefficients of metals in air are 1e-3 to 0.04");
  if (!(settings.operating_V > 0.0) || !std::isfinite(settings.operating_V))
    throw InputError(at_key(spec.where, "operating"), "the operating voltage must be a finite value above 0",
                     "give it with its unit, e.g. 100 kV");
  if (!std::isnan(settings.required_margin) && !(settings.required_margin > 0.0 && std::isfinite(settings.required_margin)))
    throw InputError(at_key(spec.where, "required_margin"), "the required margin must be a finite number above 0",
                     "designers commonly ask for 1.1 to 1.2");
  if (settings.start_points < 0)
    throw InputError(at_key(spec.where, "start_points"), "start_points must not be negative", "use 0 to take them from the mesh");
  return settings;
}

OnsetResult evaluate_onset(const Mesh& mesh, const Eigen::VectorXd& potential, std::vector<SurfaceField>& surfaces,
                           const GasModel& gas, const OnsetSettings& settings) {
  const auto started = std::chrono::steady_clock::now();
  OnsetResult result;
  result.evaluated = true;
  result.settings = settings;
  result.gas = gas.info();
  result.pressure_Pa = gas.pressure_Pa(), result.temperature_K = gas.temperature_K();
  result.relative_density = gas.relative_density(), result.number_density = gas.number_density();
  result.critical_field_V_per_m = gas.critical_field();
  result.electrodes = gas_electrodes(mesh, surfaces);

  // Scales of the solved field: ionization starts somewhere at critical / highest; search up to
  // kSearchRangeFactor times that, and at least up to the operating voltage so that the operating
  // figures see the whole ionization zone.
  const double critical = gas.critical_field(), highest_field = highest_gas_surface_field(mesh, surfaces);
  const double operating_scale = settings.operating_V / settings.solved_V;
  const double highest_scale = highest_field > 0.0 ? std::max(kSearchRangeFactor * critical / highest_field, operating_scale) : 0.0;
  std::vector<onset::StartPlace> places;
  if (highest_scale > 0.0) {
    const double ionizing_field = critical / highest_scale;  // V/m at the solved voltage
    places = onset::place_start_points(mesh, surfaces, ionizing_field, settings.start_points);
    result.lines = trace_lines(mesh, potential, places, ionizing_field);
  }

  result.starts = judge_starts(places, result.lines, surfaces, gas, settings, highest_scale);
  gather_lowest(result);
  result.regions = regions_below(result.starts, settings);
  mark_samples(result.starts, places, surfaces);
  result.warnings = validity_warnings(result.starts, result.lines, gas, settings);
  result.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return result;
}

}  // namespace hv
