// Discharge onset: at what voltage does the gas around the electrodes start to ionize, where, and
// how much margin is left at the operating voltage (physics.md, "Onset criteria").
//
// From start points along every electrode surface in the gas, field lines run away from the
// electrode through the solved field. Because the Laplace field scales with the applied voltage, a
// line's geometry does not change with voltage: each line is traced once, and the voltage at which
// its criterion is met is found by root finding on its stored samples (Brent, Algorithms for
// Minimization without Derivatives, 1973). All fixed potentials are scaled together: the "voltage"
// of this module is the largest |fixed potential| of the case, and the field at voltage U is
// U / solved_V times the solved field.
//   streamer:  integral of alpha_eff ds over the ionization zone (alpha_eff > 0) reaches K;
//   townsend:  gamma * integral of alpha(x) exp(integral_0^x alpha_eff) dx = 1 from the cathode.
//
// As built (postproc/onset.cpp, onset_starts.cpp, onset_criteria.cpp):
// - Start points: every node of an electrode surface in the gas whose |E| could ionize within the
//   searched range, 1-3 more between nodes where |E| is within 20 % of that surface's highest, and,
//   when `start_points` asks for more, the rest evenly in arc length over the stressed stretches.
// - Scales searched: from critical / E_start (the surface starts to ionize) up to 5 x critical /
//   (highest gas-side surface field), and at least up to the operating voltage. Onset fields in air
//   reach about 4.7 x critical at 0.1 mm radius (Peek's coaxial law), so 5 covers resolved radii.
// - The ionization zone is the stretch from the surface to where x |E| first falls to critical.
// - Polarity p (+1 positive, -1 negative: every fixed potential times p). The start's electrode is
//   the cathode where p E_n < 0, E_n the normal field of the solved potentials (positive away from
//   the conductor). The streamer criterion does not depend on the direction of travel and is
//   evaluated on every line; the Townsend criterion only on lines from a cathode of a polarity asked
//   for ("both": whichever polarity makes the start a cathode), other lines report kNoInception.
#pragma once

#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "mesh/mesh.h"
#include "postproc/field_lines.h"
#include "postproc/gas.h"

namespace hv {

struct SurfaceField;

// The case's `onset` section (filled by the case reader); NaN means "the default".
struct OnsetSpec {
  bool present = false;                 // the case has an `onset` section
  std::string criterion = "streamer";   // streamer | townsend
  double K = NAN;                       // critical integral; NaN = the gas's default
  double gamma = NAN;                   // Townsend secondary coefficient; NaN = the gas's default
  std::string polarity = "positive";    // positive | negative | both
  double operating_V = NAN;             // NaN = highest |potential| of the fixed electrodes
  double required_margin = NAN;         // NaN = none required
  int start_points = 0;                 // at least this many start points in all; 0 = from the mesh
  SourceLocation where;
};

// The onset settings with every default resolved.
struct OnsetSettings {
  std::string criterion = "streamer";
  double K = 0.0;
  double gamma = 0.0;
  std::string polarity = "positive";
  double operating_V = 0.0;      // the voltage the margin refers to
  double solved_V = 0.0;         // largest |fixed potential| of the solved field
  double required_margin = NAN;  // NaN: none
  int start_points = 0;
};

// Resolves the defaults: K and gamma from the gas, operating voltage = solved_V. InputError (at
// spec.where) when no electrode has a nonzero fixed potential.
OnsetSettings resolve_onset_settings(const OnsetSpec& spec, const GasModel& gas, double solved_V);

constexpr double kNoInception = std::numeric_limits<double>::infinity();

// One start point on an electrode surface and what its field line says.
struct OnsetStart {
  std::string electrode;
  int surface = -1;             // index into the run's surface fields
  int contour = -1;
  double s = 0.0;               // arc length along that contour, m
  Point at;
  double E_operating = 0.0;     // |E| at the start at the operating voltage, V/m
  double integral_operating = 0.0;  // the criterion's integral at the operating voltage (streamer:
                                    // integral of alpha_eff; townsend: gamma * generation integral;
                                    // 0 on lines where the Townsend criterion does not apply)
  double zone_length_operating = 0.0;  // length of the ionization zone along the line at operating, m
  double inception_V = kNoInception;   // kNoInception: not reached within the searched range
  double margin = kNoInception;        // inception_V / operating_V
  std::string polarity;                // the polarity that gave inception_V: "positive", "negative",
                                       // or "both" for the streamer under polarity both (either gives
                                       // it); empty when there is no inception
  int line = -1;                       // index into OnsetResult::lines
};

struct ElectrodeOnset {
  std::string electrode;
  double inception_V = kNoInception;
  double margin = kNoInception;
  Point at;
};

// A stretch of an electrode surface whose local inception voltage is below operating x
// required_margin (or below operating when no margin is required).
struct OnsetRegion {
  std::string electrode;
  double s_from = 0.0, s_to = 0.0;  // along the contour, m
  Point from, to;
  double lowest_margin = 0.0;
};

struct OnsetResult {
  bool evaluated = false;
  OnsetSettings settings;
  GasModelInfo gas;
  double pressure_Pa = 0.0, temperature_K = 0.0, relative_density = 0.0, number_density = 0.0;
  double critical_field_V_per_m = 0.0;  // alpha_eff = 0 in this gas state
  double inception_V = kNoInception;    // lowest over all start points
  double margin = kNoInception;
  std::string electrode;                // where the lowest inception voltage is
  Point at;
  std::vector<ElectrodeOnset> electrodes;  // per electrode with a gas-side surface, in case order
  std::vector<OnsetStart> starts;
  std::vector<FieldLine> lines;
  std::vector<OnsetRegion> regions;
  std::vector<std::string> warnings;    // e.g. fields outside the gas model's range of validity
  double seconds = 0.0;

  // False when a required margin is set and the design falls short of it (exit code 3).
  bool meets_required_margin() const {
    return std::isnan(settings.required_margin) || margin >= settings.required_margin;
  }
};

// Evaluates onset on every electrode surface that borders the gas. `surfaces` are the run's surface
// fields; their samples get inception_V and margin (NaN where no start point lies).
OnsetResult evaluate_onset(const Mesh& mesh, const Eigen::VectorXd& potential, std::vector<SurfaceField>& surfaces,
                           const GasModel& gas, const OnsetSettings& settings);

}  // namespace hv
