#include "tools/app/finite_results.h"

#include <cmath>
#include <string>

#include "postproc/text_format.h"

namespace hv {

namespace {

// `name` is a callable giving the quantity's name: built only for the error message, since the
// checks run over every node and sample.
template <class Name>
[[noreturn]] void fail(const Name& name, double value) {
  throw RunError("the results hold " + round_trip_number(value) + " for " + name() +
                 ", where only a finite number is meaningful; nothing was written. The computation broke "
                 "down: check the case (degenerate geometry, extreme values), or report it with the case file");
}

template <class Name>
void require_finite(double value, const Name& name) {
  if (!std::isfinite(value)) fail(name, value);
}

// An inception voltage or margin: finite, or kNoInception (+inf: none found in the searched range).
template <class Name>
void require_inception(double value, const Name& name) {
  if (!std::isfinite(value) && value != kNoInception) fail(name, value);
}

template <class Name>
void require_finite_point(const Point& at, const Name& name) {
  require_finite(at.r, [&] { return name() + ".r"; });
  require_finite(at.z, [&] { return name() + ".z"; });
}

std::string indexed(const std::string& name, size_t index) { return name + "[" + std::to_string(index) + "]"; }

void require_finite_electrodes(const RunResults& results) {
  for (const ElectrodeResult& electrode : results.electrodes) {
    const auto named = [&](const char* what) { return [&, what] { return "electrode " + electrode.name + " " + what; }; };
    require_finite(electrode.potential_V, named("potential_V"));
    require_finite(electrode.charge_C, named("charge_C"));
    require_finite(electrode.max_field_V_per_m, named("max_field_V_per_m"));
    require_finite_point(electrode.max_field_at, named("max_field_at_m"));
    require_finite(electrode.max_gas_field_V_per_m, named("max_gas_field_V_per_m"));
    require_finite_point(electrode.max_gas_field_at, named("max_gas_field_at_m"));
  }
  require_finite(results.max_field_V_per_m, [] { return std::string("max_field V_per_m"); });
  require_finite_point(results.max_field_at, [] { return std::string("max_field at_m"); });
  for (Eigen::Index i = 0; i < results.capacitance_F.rows(); ++i)
    for (Eigen::Index j = 0; j < results.capacitance_F.cols(); ++j)
      require_finite(results.capacitance_F(i, j), [&] {
        return "capacitance_matrix_F[" + std::to_string(i) + "][" + std::to_string(j) + "]";
      });
  require_finite(results.energy_J, [] { return std::string("energy_J"); });
  require_finite(results.ground_plane_charge_C, [] { return std::string("ground_plane_charge_C"); });
}

// The nodal potential and field of field.vtu.
void require_finite_field(const RunResults& results) {
  for (Eigen::Index i = 0; i < results.potential.size(); ++i)
    require_finite(results.potential[i], [&] { return indexed("potential_V at node", static_cast<size_t>(i)); });
  for (size_t i = 0; i < results.node_field.size(); ++i) {
    require_finite(results.node_field[i][0], [&] { return indexed("E_r at node", i); });
    require_finite(results.node_field[i][1], [&] { return indexed("E_z at node", i); });
  }
}

// The samples of surfaces.vtp and surface-field.csv.
void require_finite_surfaces(const RunResults& results) {
  for (const SurfaceField& surface : results.surfaces) {
    for (size_t c = 0; c < surface.contours.size(); ++c) {
      for (size_t k = 0; k < surface.contours[c].size(); ++k) {
        const SurfaceSample& sample = surface.contours[c][k];
        const auto named = [&](const char* what) {
          return [&, what] { return "surface " + surface.name + " contour " + std::to_string(c) + " sample " +
                                    std::to_string(k) + " " + what; };
        };
        require_finite(sample.s, named("s_m"));
        require_finite_point(sample.at, named("at_m"));
        require_finite(sample.E_abs, named("E_abs_V_per_m"));
        require_finite(sample.E_n, named("E_n_V_per_m"));
        require_finite(sample.E_t, named("E_t_V_per_m"));
        require_finite(sample.sigma, named("sigma_C_per_m2"));
        // NaN: no start point here (results.h).
        if (!std::isnan(sample.inception_V)) require_inception(sample.inception_V, named("inception_V"));
        if (!std::isnan(sample.margin)) require_inception(sample.margin, named("margin"));
      }
    }
  }
}

void require_finite_onset_settings(const OnsetResult& onset) {
  const OnsetSettings& settings = onset.settings;
  require_finite(settings.K, [] { return std::string("onset K"); });
  require_finite(settings.gamma, [] { return std::string("onset gamma"); });
  require_finite(settings.operating_V, [] { return std::string("onset operating_V"); });
  require_finite(settings.solved_V, [] { return std::string("onset solved_V"); });
  if (!std::isnan(settings.required_margin))  // NaN: none required
    require_finite(settings.required_margin, [] { return std::string("onset required_margin"); });
  require_finite(onset.pressure_Pa, [] { return std::string("onset gas_state pressure_Pa"); });
  require_finite(onset.temperature_K, [] { return std::string("onset gas_state temperature_K"); });
  require_finite(onset.relative_density, [] { return std::string("onset gas_state relative_density"); });
  require_finite(onset.number_density, [] { return std::string("onset gas_state number_density_per_m3"); });
  require_finite(onset.critical_field_V_per_m, [] { return std::string("onset gas_state critical_field_V_per_m"); });
}

// summary.json's onset object, onset.csv and fieldlines.vtp.
void require_finite_onset(const OnsetResult& onset) {
  require_finite_onset_settings(onset);
  require_inception(onset.inception_V, [] { return std::string("onset inception_voltage_V"); });
  require_inception(onset.margin, [] { return std::string("onset margin"); });
  if (std::isfinite(onset.inception_V)) require_finite_point(onset.at, [] { return std::string("onset at_m"); });
  for (const ElectrodeOnset& electrode : onset.electrodes) {
    const auto named = [&](const char* what) { return [&, what] { return "onset of electrode " + electrode.electrode + " " + what; }; };
    require_inception(electrode.inception_V, named("inception_voltage_V"));
    require_inception(electrode.margin, named("margin"));
    if (std::isfinite(electrode.inception_V)) require_finite_point(electrode.at, named("at_m"));
  }
  for (size_t i = 0; i < onset.starts.size(); ++i) {
    const OnsetStart& start = onset.starts[i];
    const auto named = [&](const char* what) { return [&, what] { return indexed("onset start", i) + " " + what; }; };
    require_finite(start.s, named("s_m"));
    require_finite_point(start.at, named("at_m"));
    require_finite(start.E_operating, named("E_operating_V_per_m"));
    require_finite(start.integral_operating, named("integral_operating"));
    require_finite(start.zone_length_operating, named("zone length at operating"));
    require_inception(start.inception_V, named("inception_V"));
    require_inception(start.margin, named("margin"));
  }
  for (size_t l = 0; l < onset.lines.size(); ++l) {
    for (size_t k = 0; k < onset.lines[l].points.size(); ++k) {
      const LinePoint& point = onset.lines[l].points[k];
      const auto named = [&](const char* what) {
        return [&, what] { return indexed("field line", l) + " point " + std::to_string(k) + " " + what; };
      };
      require_finite(point.s, named("s_m"));
      require_finite_point(point.at, named("at_m"));
      require_finite(point.E, named("E_abs_V_per_m"));
    }
  }
  for (size_t i = 0; i < onset.regions.size(); ++i) {
    const OnsetRegion& region = onset.regions[i];
    const auto named = [&](const char* what) { return [&, what] { return indexed("onset region", i) + " " + what; }; };
    require_finite(region.s_from, named("s_from_m"));
    require_finite(region.s_to, named("s_to_m"));
    require_finite_point(region.from, named("from_m"));
    require_finite_point(region.to, named("to_m"));
    require_finite(region.lowest_margin, named("lowest_margin"));
  }
  require_finite(onset.seconds, [] { return std::string("onset seconds"); });
}

void require_finite_timings(const RunResults& results) {
  const Timings& t = results.timings;
  const SolveReport& report = results.solve_report;
  for (const auto& [name, value] : {std::pair<const char*, double>{"timings_s mesh", t.mesh},
                                    {"timings_s assemble", t.assemble},
                                    {"timings_s solve", t.solve},
                                    {"timings_s post", t.post},
                                    {"timings_s total", t.total},
                                    {"solver relative_residual", report.relative_residual},
                                    {"solver seconds_assemble", report.seconds_assemble},
                                    {"solver seconds_factorize", report.seconds_factorize},
                                    {"solver seconds_solve", report.seconds_solve}})
    require_finite(value, [name = name] { return std::string(name); });
}

}  // namespace

void require_finite_mesh(const Mesh& mesh, const MeshStats& stats) {
  for (size_t i = 0; i < mesh.nodes.size(); ++i)
    require_finite_point(mesh.nodes[i], [&] { return indexed("mesh node", i); });
  for (const Region& region : mesh.regions)
    require_finite(region.permittivity, [&] { return "permittivity of region " + region.name; });
  require_finite(stats.min_size, [] { return std::string("mesh min_size_m"); });
  require_finite(stats.max_size, [] { return std::string("mesh max_size_m"); });
  require_finite(stats.seconds, [] { return std::string("mesh seconds"); });
}

void require_finite_results(const RunResults& results) {
  for (const auto& [name, value] : results.parameters)
    require_finite(value, [&name = name] { return "parameter " + name; });
  if (results.mesh) require_finite_mesh(*results.mesh, results.mesh_stats);
  require_finite_electrodes(results);
  require_finite_field(results);
  require_finite_surfaces(results);
  if (results.onset.evaluated) require_finite_onset(results.onset);
  require_finite_timings(results);
}

}  // namespace hv
