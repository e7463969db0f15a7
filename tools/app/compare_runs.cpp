#include "tools/app/compare_runs.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <map>

namespace hv {

namespace fs = std::filesystem;

namespace {

// The fields of one CSV line, RFC 4180 (Shafranov, IETF, 2005): quoted fields may hold commas, and a
// doubled quote inside them is one quote. Our files hold no line breaks inside fields.
std::vector<std::string> csv_fields(const std::string& line) {
  std::vector<std::string> fields(1);
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted && c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
      fields.back() += '"';
      ++i;
    } else if (c == '"') {
      quoted = !quoted;
    } else if (c == ',' && !quoted) {
      fields.emplace_back();
    } else if (c != '\r') {
      fields.back() += c;
    }
  }
  return fields;
}

size_t column(const std::vector<std::string>& header, const std::string& name) {
  const auto found = std::find(header.begin(), header.end(), name);
  return static_cast<size_t>(found - header.begin());  // header.size() when absent
}

// The electrode whose surface limits the design: where the onset starts, else where |E| is highest.
std::string critical_electrode(const RunSummary& summary) {
  if (summary.onset.evaluated && !summary.onset.electrode.empty()) return summary.onset.electrode;
  return summary.max_field_electrode;
}

LoadedRun load_run(const ComparedRun& run, int index) {
  LoadedRun loaded;
  loaded.run = run;
  loaded.index = index;
  if (!run.finished) return loaded;
  try {
    loaded.summary = read_summary((fs::path(run.folder) / "summary.json").string());
    loaded.has_summary = true;
  } catch (const InputError& error) {
    loaded.run.finished = false;
    loaded.run.message = error.what();
    return loaded;
  }
  loaded.critical_electrode = critical_electrode(loaded.summary);
  loaded.profile = read_surface_profile((fs::path(run.folder) / "surface-field.csv").string(), loaded.critical_electrode);
  return loaded;
}

// Sort key of a run ranked by inception: higher is better; no inception in the searched range is best.
double inception_key(const LoadedRun& run) {
  return run.summary.onset.inception_found ? run.summary.onset.inception_V : std::numeric_limits<double>::infinity();
}

}  // namespace

std::vector<LoadedRun> load_runs(const std::vector<ComparedRun>& runs) {
  std::vector<LoadedRun> loaded;
  for (size_t i = 0; i < runs.size(); ++i) loaded.push_back(load_run(runs[i], static_cast<int>(i)));
  return loaded;
}

std::vector<std::string> varying_parameters(const std::vector<LoadedRun>& runs) {
  std::vector<std::string> names;
  const LoadedRun* first = nullptr;
  for (const LoadedRun& run : runs) {
    if (!run.has_summary) continue;
    if (!first) first = &run;
    for (const Parameter& parameter : run.summary.parameters)
      if (std::find(names.begin(), names.end(), parameter.name) == names.end()) names.push_back(parameter.name);
  }
  std::vector<std::string> varying;
  for (const std::string& name : names) {
    const double reference = first->summary.parameter(name);
    const bool differs = std::any_of(runs.begin(), runs.end(), [&](const LoadedRun& run) {
      if (!run.has_summary) return false;
      const double value = run.summary.parameter(name);
      return !(value == reference);  // NaN (a parameter only some runs have) differs too
    });
    if (differs) varying.push_back(name);
  }
  return varying;
}

std::string parameter_unit(const std::vector<LoadedRun>& runs, const std::string& name) {
  for (const LoadedRun& run : runs)
    for (const Parameter& parameter : run.summary.parameters)
      if (parameter.name == name && !parameter.unit.empty()) return parameter.unit;
  return "";
}

bool ranked_by_inception(const std::vector<LoadedRun>& runs) {
  bool any = false;
  for (const LoadedRun& run : runs) {
    if (!run.has_summary) continue;
    if (!run.summary.onset.evaluated) return false;
    any = true;
  }
  return any;
}

std::vector<size_t> ranking(const std::vector<LoadedRun>& runs) {
  std::vector<size_t> order(runs.size());
  for (size_t i = 0; i < order.size(); ++i) order[i] = i;
  const bool by_inception = ranked_by_inception(runs);
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    const LoadedRun& first = runs[a];
    const LoadedRun& second = runs[b];
    if (first.has_summary != second.has_summary) return first.has_summary;
    if (!first.has_summary) return false;
    if (by_inception && inception_key(first) != inception_key(second)) return inception_key(first) > inception_key(second);
    return first.summary.max_field_V_per_m < second.summary.max_field_V_per_m;
  });
  return order;
}

DisplayUnit display_unit(const std::string& si_unit) {
  static const std::map<std::string, DisplayUnit> engineering{
      {"m", {1e3, "mm"}}, {"V", {1e-3, "kV"}}, {"V/m", {1e-6, "kV/mm"}}, {"F", {1e12, "pF"}}};
  const auto found = engineering.find(si_unit);
  return found != engineering.end() ? found->second : DisplayUnit{1.0, si_unit};
}

std::vector<std::pair<double, double>> read_surface_profile(const std::string& csv_path, const std::string& electrode) {
  std::ifstream in(csv_path);
  std::string line;
  if (!in || !std::getline(in, line)) return {};
  const std::vector<std::string> header = csv_fields(line);
  const size_t surface = column(header, "surface"), region = column(header, "region"),
               contour = column(header, "contour"), s = column(header, "s_m"), field = column(header, "E_abs_V_per_m");
  const size_t needed = std::max({surface, region, contour, s, field});
  if (needed >= header.size()) return {};

  // Every stretch of the electrode, keyed by "region,contour", with its highest |E|.
  std::map<std::string, std::vector<std::pair<double, double>>> stretches;
  std::string worst;
  double worst_field = -1.0;
  while (std::getline(in, line)) {
    const std::vector<std::string> fields = csv_fields(line);
    if (fields.size() <= needed || fields[surface] != electrode) continue;
    const std::string key = fields[region] + "," + fields[contour];
    const double E = std::strtod(fields[field].c_str(), nullptr);
    stretches[key].emplace_back(std::strtod(fields[s].c_str(), nullptr), E);
    if (E > worst_field) {
      worst_field = E;
      worst = key;
    }
  }
  return worst_field < 0 ? std::vector<std::pair<double, double>>{} : stretches[worst];
}

}  // namespace hv
