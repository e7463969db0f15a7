#include "tools/app/optimize_designs.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <utility>

#include "postproc/text_format.h"
#include "tools/case/expression.h"
#include "tools/case/units.h"

namespace hv {

// ---- goal ----

namespace {
const std::vector<std::pair<std::string, OptimizeGoal>>& goals() {
  static const std::vector<std::pair<std::string, OptimizeGoal>> table{
      {"max-inception", OptimizeGoal::MaxInception},
      {"min-field", OptimizeGoal::MinField},
      {"min-size-with-margin", OptimizeGoal::MinSizeWithMargin}};
  return table;
}
}  // namespace

OptimizeGoal parse_goal(const std::string& text) {
  for (const auto& [name, goal] : goals()) {
    if (name == text) return goal;
  }
  throw InputError(SourceLocation{"", 0, 0, "--goal"}, "`" + text + "` is not a goal",
                   "Use max-inception, min-field or min-size-with-margin");
}

std::string goal_name(OptimizeGoal goal) {
  for (const auto& [name, listed] : goals()) {
    if (listed == goal) return name;
  }
  return "";
}

// ---- --vary NAME=LO:HI ----

namespace {

std::string trimmed(const std::string& text) {
  const size_t first = text.find_first_not_of(" \t");
  if (first == std::string::npos) return "";
  return text.substr(first, text.find_last_not_of(" \t") - first + 1);
}

const Parameter* find_parameter(const Case& the_case, const std::string& name) {
  for (const Parameter& parameter : the_case.parameters) {
    if (parameter.name == name) return &parameter;
  }
  return nullptr;
}

bool is_set_by(const std::vector<std::string>& overrides, const std::string& name) {
  return std::any_of(overrides.begin(), overrides.end(), [&](const std::string& assignment) {
    return trimmed(assignment.substr(0, assignment.find('='))) == name;
  });
}

}  // namespace

VariedParameter parse_varied(const std::string& text, const Case& base, const std::vector<std::string>& overrides) {
  const size_t equals = text.find('=');
  const std::string name = equals == std::string::npos ? "" : trimmed(text.substr(0, equals));
  const SourceLocation where{"", 0, 0, name.empty() ? "--vary" : "--vary " + name};
  const std::string example = "Write e.g. `--vary \"tube_r=20 mm:80 mm\"`";
  if (name.empty()) throw InputError(where, "`" + text + "` is not NAME=LO:HI", example);
  const std::string range = text.substr(equals + 1);
  const size_t colon = range.find(':');
  if (colon == std::string::npos || range.find(':', colon + 1) != std::string::npos)
    throw InputError(where, "`" + range + "` is not a range LO:HI", example + " (a range without a count)");

  const Parameter* parameter = find_parameter(base, name);
  if (parameter == nullptr) throw InputError(where, "the case has no parameter `" + name + "`", "Vary a parameter the case declares");
  if (is_set_by(overrides, name))
    throw InputError(where, "`" + name + "` is also given with --set", "Either vary it or set it, not both");

  const Quantity lo = evaluate_expression(range.substr(0, colon), {}, where);
  const Quantity hi = evaluate_expression(range.substr(colon + 1), {}, where);
  if (lo.dimension != hi.dimension)
    throw InputError(where, "LO is " + describe_dimension(lo.dimension) + " but HI is " + describe_dimension(hi.dimension),
                     "Give both ends in units of one kind, e.g. `20 mm:80 mm`");
  if (!parameter->unit.empty() && si_symbol(lo.dimension) != parameter->unit)
    throw InputError(where, "the case gives `" + name + "` in " + parameter->unit + ", the range is " +
                                describe_dimension(lo.dimension), "Give the range with units of the parameter's kind");
  if (!(lo.value < hi.value))
    throw InputError(where, "LO must be below HI", "Write the smaller value first, e.g. `20 mm:80 mm`");
  return {name, lo.value, hi.value, si_symbol(lo.dimension)};
}

// ---- engineering units ----

std::string engineering(double value, const std::string& unit) {
  if (unit == "V/m") return significant(value / 1e6, 4) + " kV/mm";  // the trade's unit, as `run` prints it
  static const char* const prefixes[] = {"G", "M", "k", "", "m", "u", "n", "p"};
  if (!unit.empty() && std::isfinite(value) && value != 0.0) {
    for (const char* prefix : prefixes) {
      const Unit* prefixed = find_unit(prefix + unit);
      if (prefixed == nullptr) continue;
      const double scaled = value / prefixed->scale;
      if (std::abs(scaled) >= 1.0 && std::abs(scaled) < 1000.0) return significant(scaled, 4) + " " + prefixed->name;
    }
  }
  return significant(value, 4) + (unit.empty() ? "" : " " + unit);
}

// ---- evaluating designs ----

DesignEvaluator::DesignEvaluator(const Case& base_case, std::vector<std::string> overrides, OptimizeGoal goal,
                                 std::vector<VariedParameter> varied, bool quiet)
    : base_case_(base_case),
      overrides_(std::move(overrides)),
      goal_(goal),
      varied_(std::move(varied)),
      quiet_(quiet) {}

std::string DesignEvaluator::describe(const std::vector<double>& values) const {
  std::string text;
  for (size_t i = 0; i < varied_.size(); ++i)
    text += (i ? ", " : "") + varied_[i].name + " = " + engineering(values[i], varied_[i].unit);
  return text;
}

const Evaluation& DesignEvaluator::evaluate(const std::vector<double>& values) {
  const auto cached = cache_.find(values);
  if (cached != cache_.end()) return history_[cached->second];
  std::unique_ptr<RunOutcome> outcome;
  std::unique_ptr<Case> design;
  history_.push_back(compute(values, outcome, design));
  cache_[values] = history_.size() - 1;
  const Evaluation& latest = history_.back();
  report(latest);
  if (latest.valid && (best() == nullptr || ranks_before(latest, *best()))) {
    best_index_ = static_cast<int>(history_.size()) - 1;
    best_case_ = std::move(design);
    best_outcome_ = std::move(outcome);
  }
  return latest;
}

// Each design is the base case parsed again with one --set per varied parameter, the value written
// with 17 significant digits so that it reads back to the same double.
Evaluation DesignEvaluator::compute(const std::vector<double>& values, std::unique_ptr<RunOutcome>& outcome,
                                    std::unique_ptr<Case>& design) const {
  Evaluation evaluation;
  evaluation.parameters = values;
  if (goal_ == OptimizeGoal::MinSizeWithMargin) evaluation.objective = values.front();
  std::vector<std::string> settings = overrides_;
  for (size_t i = 0; i < varied_.size(); ++i) {
    char number[32];
    std::snprintf(number, sizeof number, "%.17g", values[i]);
    settings.push_back(varied_[i].name + "=" + number + (varied_[i].unit.empty() ? "" : " " + varied_[i].unit));
  }
  try {
    design = std::make_unique<Case>(parse_case(base_case_.text, base_case_.file, settings));
    outcome = compute_case(*design);
  } catch (const InputError& error) {
    evaluation.bad_input = true;
    evaluation.message = std::string("not a valid design: ") + error.what();
    return evaluation;
  } catch (const RunError& error) {
    evaluation.message = std::string("could not be computed: ") + error.what();
    return evaluation;
  }
  const RunResults& results = outcome->results;
  evaluation.valid = true;
  evaluation.max_field_V_per_m = results.max_field_V_per_m;
  if (results.onset.evaluated) {
    evaluation.inception_V = results.onset.inception_V;
    evaluation.margin = results.onset.margin;
  }
  switch (goal_) {
    case OptimizeGoal::MaxInception: evaluation.objective = evaluation.inception_V; break;
    case OptimizeGoal::MinField: evaluation.objective = evaluation.max_field_V_per_m; break;
    case OptimizeGoal::MinSizeWithMargin: break;
  }
  evaluation.feasible = goal_ != OptimizeGoal::MinSizeWithMargin || results.onset.meets_required_margin();
  if (!evaluation.feasible)
    evaluation.message = "misses the required margin " + significant(results.onset.settings.required_margin, 4);
  return evaluation;
}

double DesignEvaluator::score(const Evaluation& evaluation) const {
  if (!evaluation.feasible) return INFINITY;
  switch (goal_) {
    case OptimizeGoal::MaxInception: return -evaluation.inception_V;
    case OptimizeGoal::MinField: return evaluation.max_field_V_per_m;
    case OptimizeGoal::MinSizeWithMargin: return evaluation.parameters.front();
  }
  return INFINITY;
}

// Feasible designs by score; below them (only under min-size-with-margin, where a valid design may
// miss the margin) the valid designs by margin, so that a study where none passes shows the closest.
// Ties keep the earlier design.
bool DesignEvaluator::ranks_before(const Evaluation& a, const Evaluation& b) const {
  if (a.feasible != b.feasible) return a.feasible;
  if (a.feasible) return score(a) < score(b);
  return a.margin > b.margin;
}

// One progress line on stderr per evaluation.
void DesignEvaluator::report(const Evaluation& evaluation) const {
  if (quiet_) return;
  std::string outcome;
  if (!evaluation.valid) {
    outcome = evaluation.message;
  } else {
    outcome = "max field " + engineering(evaluation.max_field_V_per_m, "V/m");
    if (!std::isnan(evaluation.inception_V))
      outcome += ", inception " + engineering(evaluation.inception_V, "V") + ", margin " +
                 significant(evaluation.margin, 5);
    if (!evaluation.message.empty()) outcome += " (" + evaluation.message + ")";
  }
  std::fprintf(stderr, "evaluation %zu: %s: %s\n", history_.size(), describe(evaluation.parameters).c_str(),
               outcome.c_str());
}

}  // namespace hv
