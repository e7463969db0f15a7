// The gas in one state: a reduced model (postproc/gas_models.h, postproc/gas_table.h) evaluated at the
// number density N = p / (k_B T), and its critical field found once by bracketing and bisection.
#include "postproc/gas.h"

#include <cassert>
#include <cmath>
#include <optional>

#include "postproc/gas_models.h"
#include "postproc/gas_table.h"

namespace hv {

struct GasModel::Model {
  std::unique_ptr<const ReducedGasModel> reduced;
  double number_density = 0.0;     // N, 1/m^3
  double critical_E_over_N = 0.0;  // alpha_eff = 0 at N, V m^2
};

namespace {

// Bisection stops when the bracket is this narrow relative to the field: well inside the 1e-10 that
// the critical field is promised to.
constexpr double kCriticalFieldTolerance = 1e-12;

struct ChosenModel {
  std::unique_ptr<const ReducedGasModel> reduced;
  GasModelInfo info;
};

SourceLocation at_key(const SourceLocation& gas_place, const std::string& key_path) {
  SourceLocation where = gas_place;
  where.key_path = key_path;
  return where;
}

ChosenModel choose_model(const GasSpec& spec) {
  if (spec.name == "air") {
    if (spec.model.empty() || spec.model == "morrow-lowke") return {make_morrow_lowke_air(), morrow_lowke_air_info()};
    if (spec.model == "quadratic") return {make_quadratic_fit_air(), quadratic_fit_air_info()};
    throw InputError(at_key(spec.where, "gas.model"), "unknown air model '" + spec.model + "'",
                     "use morrow-lowke (the default) or quadratic");
  }
  if (spec.name == "sf6") return {make_linear_fit_sf6(), linear_fit_sf6_info()};
  if (spec.name == "table") {
    auto table = std::make_unique<GasTable>(GasTable::read(spec.table, spec.where));
    GasModelInfo info = table->info();
    return {std::move(table), std::move(info)};
  }
  throw InputError(at_key(spec.where, "gas.name"), "unknown gas '" + spec.name + "'", "use air, sf6 or table");
}

void check_state(const GasSpec& spec) {
  if (!(spec.pressure_Pa > 0.0) || !std::isfinite(spec.pressure_Pa))
    throw InputError(at_key(spec.where, "gas.pressure"), "the gas pressure must be a finite value above 0",
                     "give it with its unit, e.g. 101.325 kPa");
  if (!(spec.temperature_K > 0.0) || !std::isfinite(spec.temperature_K))
    throw InputError(at_key(spec.where, "gas.temperature"), "the gas temperature must be a finite value above 0 K",
                     "give it with its unit, e.g. 20 degC");
}

// The reduced field (V m^2) above which the gas ionizes at density N: the highest bracket point that
// does not ionize and the next one above it bracket the crossing, bisection narrows it down. Nothing
// when no bracket point below the highest one is non-ionizing or the highest one does not ionize.
std::optional<double> critical_reduced_field(const ReducedGasModel& gas, double N) {
  const auto ionizes = [&](double E_over_N) { return gas.at(E_over_N, N).effective() > 0.0; };
  const std::vector<double> points = gas.bracket_points();
  if (points.empty() || !ionizes(points.back())) return std::nullopt;
  size_t above = points.size() - 1;
  while (above > 0 && ionizes(points[above - 1])) --above;
  if (above == 0) return std::nullopt;
  double below_crossing = points[above - 1], above_crossing = points[above];
  while (above_crossing - below_crossing > kCriticalFieldTolerance * above_crossing) {
    const double middle = 0.5 * (below_crossing + above_crossing);
    (ionizes(middle) ? above_crossing : below_crossing) = middle;
  }
  return 0.5 * (below_crossing + above_crossing);
}

}  // namespace

const std::vector<GasModelInfo>& gas_model_catalogue() {
  static const std::vector<GasModelInfo> catalogue = {morrow_lowke_air_info(), quadratic_fit_air_info(),
                                                      linear_fit_sf6_info(), gas_table_catalogue_info()};
  return catalogue;
}

GasModel GasModel::from_spec(const GasSpec& spec) {
  check_state(spec);
  ChosenModel chosen = choose_model(spec);
  auto model = std::make_shared<Model>();
  model->number_density = spec.pressure_Pa / (kBoltzmann * spec.temperature_K);
  const std::optional<double> critical = critical_reduced_field(*chosen.reduced, model->number_density);
  if (!critical)
    throw InputError(at_key(spec.where, "gas"),
                     "the " + chosen.info.title + " model has no critical field between 1 Td and 10 kTd at " +
                         std::to_string(spec.pressure_Pa) + " Pa and " + std::to_string(spec.temperature_K) + " K",
                     "check the gas pressure and temperature");
  model->critical_E_over_N = *critical;
  model->reduced = std::move(chosen.reduced);

  GasModel gas;
  gas.model_ = std::move(model);
  gas.info_ = std::move(chosen.info);
  gas.pressure_Pa_ = spec.pressure_Pa;
  gas.temperature_K_ = spec.temperature_K;
  return gas;
}

const GasModelInfo& GasModel::info() const { return info_; }
double GasModel::pressure_Pa() const { return pressure_Pa_; }
double GasModel::temperature_K() const { return temperature_K_; }

double GasModel::number_density() const {
  assert(model_ && "a GasModel comes from GasModel::from_spec");
  return model_->number_density;
}

double GasModel::relative_density() const {
  return (pressure_Pa_ / kReferencePressure_Pa) * (kReferenceTemperature_K / temperature_K_);
}

IonizationCoefficients GasModel::coefficients(double E_V_per_m) const {
  const double N = number_density();
  const ReducedCoefficients reduced = model_->reduced->at(std::abs(E_V_per_m) / N, N);
  return {reduced.alpha_over_N * N, reduced.eta_over_N * N};
}

double GasModel::critical_field() const { return model_->critical_E_over_N * number_density(); }

bool GasModel::is_valid_at(double E_V_per_m) const {
  const double E = std::abs(E_V_per_m);
  return E >= valid_min_field() && E <= valid_max_field();
}

double GasModel::valid_min_field() const { return model_->reduced->valid_min() * number_density(); }
double GasModel::valid_max_field() const { return model_->reduced->valid_max() * number_density(); }

}  // namespace hv
