// `hvstress optimize`: the command around the search methods (optimize_methods.h) and the design
// evaluator (optimize_designs.h): check the options, search in fractions of each parameter's range,
// then write history.csv, best/ and summary.json into a staged output folder and print a short table.
#include "tools/app/optimize.h"

#include <cmath>
#include <cstdio>
#include <filesystem>

#include "postproc/text_format.h"
#include "tools/app/optimize_designs.h"
#include "tools/app/optimize_methods.h"
#include "tools/app/output_folder.h"

namespace hv {

namespace {

constexpr int kMarginMissed = 3;  // spec/cli.md

// ---- checks before the long work ----

void check_tolerance(double tolerance) {
  if (!(tolerance > 0.0 && tolerance < 1.0))
    throw InputError(SourceLocation{"", 0, 0, "--tolerance"}, "the tolerance must lie between 0 and 1",
                     "It is a fraction of each parameter's range, e.g. 1e-3");
}

// A goal that reads the onset evaluation needs the case to ask for one.
void check_goal_fits_case(OptimizeGoal goal, const Case& the_case) {
  const SourceLocation where{the_case.file, 0, 0, "--goal " + goal_name(goal)};
  if (goal != OptimizeGoal::MinField && !the_case.onset.present)
    throw InputError(where, "the case has no `onset` section, so it has no inception voltage to optimize",
                     "Add e.g. `onset: {criterion: streamer, required_margin: 1.2}` to the case, or use --goal min-field");
  if (goal == OptimizeGoal::MinSizeWithMargin && std::isnan(the_case.onset.required_margin))
    throw InputError(where, "the case's `onset` section sets no `required_margin` to meet",
                     "Add e.g. `required_margin: 1.2` to the `onset` section");
}

// ---- the search, in fractions u of each range (so one tolerance fits every parameter) ----

std::vector<double> from_fractions(const std::vector<double>& u, const std::vector<VariedParameter>& varied) {
  std::vector<double> values(u.size());
  // lo (1 - u) + hi u gives lo and hi exactly at u = 0 and 1
  for (size_t i = 0; i < u.size(); ++i) values[i] = varied[i].lo * (1.0 - u[i]) + varied[i].hi * u[i];
  return values;
}

struct SearchSummary {
  std::string method;
  bool converged = false;
};

// min-size-with-margin: bisection on the first parameter, every other one held at its midpoint (the
// size threshold of one design, not of a family). Else golden-section search for one parameter and
// the Nelder-Mead simplex for several.
SearchSummary search(DesignEvaluator& designs, double tolerance, int max_evaluations) {
  const std::vector<VariedParameter>& varied = designs.varied();
  if (designs.goal() == OptimizeGoal::MinSizeWithMargin) {
    std::vector<double> u(varied.size(), 0.5);
    const auto meets_margin = [&](double size) {
      u.front() = size;
      return designs.evaluate(from_fractions(u, varied)).feasible;
    };
    return {"bisection", bisect_smallest_feasible(meets_margin, 0.0, 1.0, tolerance, max_evaluations).converged};
  }
  const auto objective = [&](const std::vector<double>& u) {
    return designs.score(designs.evaluate(from_fractions(u, varied)));
  };
  if (varied.size() == 1) {
    const auto along_one = [&](double u) { return objective({u}); };
    return {"golden-section", golden_section_minimize(along_one, 0.0, 1.0, tolerance, max_evaluations).converged};
  }
  const std::vector<double> zeros(varied.size(), 0.0), ones(varied.size(), 1.0);
  return {"nelder-mead", nelder_mead_minimize(objective, zeros, ones, tolerance, max_evaluations).converged};
}

// ---- history.csv ----

std::string csv_number(double value) { return std::isnan(value) ? "" : round_trip_number(value); }


// A column name from a parameter and its SI unit: "tube_r_m", "U_V", "E_V_per_m".
std::string column_name(const VariedParameter& parameter) {
  std::string unit;
  for (const char c : parameter.unit) unit += c == '/' ? "_per_" : c == ' ' ? "_" : std::string(1, c);
  return unit.empty() ? parameter.name : parameter.name + "_" + unit;
}

std::string history_csv(const DesignEvaluator& designs) {
  std::string out = "evaluation";
  for (const VariedParameter& parameter : designs.varied()) out += "," + column_name(parameter);
  out += ",objective,max_field_V_per_m,inception_V,margin,feasible,message\n";
  int index = 0;
  for (const Evaluation& evaluation : designs.history()) {
    out += std::to_string(++index);
    for (const double value : evaluation.parameters) out += "," + round_trip_number(value);
    out += "," + csv_number(evaluation.objective) + "," + csv_number(evaluation.max_field_V_per_m) + "," +
           csv_number(evaluation.inception_V) + "," + csv_number(evaluation.margin) + "," +
           (evaluation.feasible ? "true" : "false") + "," + csv_field(evaluation.message) + "\n";
  }
  return out;
}

// ---- summary.json ("hvstress-optimize/1"), also the mark of an earlier result for OutputFolder ----



std::string summary_json(const DesignEvaluator& designs, const Case& base, const SearchSummary& summary,
                         double tolerance) {
  const Evaluation& best = *designs.best();
  std::string varied, best_values;
  for (size_t i = 0; i < designs.varied().size(); ++i) {
    const VariedParameter& parameter = designs.varied()[i];
    varied += std::string(i ? ",\n" : "") + "    {\"name\": " + json_string(parameter.name) + ", \"unit\": " +
              json_string(parameter.unit) + ", \"lo\": " + json_number(parameter.lo) + ", \"hi\": " +
              json_number(parameter.hi) + "}";
    best_values += std::string(i ? ", " : "") + json_string(parameter.name) + ": " + json_number(best.parameters[i]);
  }
  return "{\n  \"format\": \"hvstress-optimize/1\",\n  \"version\": " + json_string(HV_VERSION) +
         ",\n  \"case_file\": " + json_string(base.file) + ",\n  \"goal\": " + json_string(goal_name(designs.goal())) +
         ",\n  \"method\": " + json_string(summary.method) + ",\n  \"tolerance\": " + json_number(tolerance) +
         ",\n  \"converged\": " + (summary.converged ? "true" : "false") +
         ",\n  \"evaluations\": " + std::to_string(designs.history().size()) +
         ",\n  \"required_margin\": " + json_number(base.onset.required_margin) + ",\n  \"varied\": [\n" + varied +
         "\n  ],\n  \"best\": {\n    \"parameters\": {" + best_values + "},\n    \"objective\": " +
         json_number(best.objective) + ",\n    \"max_field_V_per_m\": " + json_number(best.max_field_V_per_m) +
         ",\n    \"inception_V\": " + json_number(best.inception_V) + ",\n    \"margin\": " +
         json_number(best.margin) + ",\n    \"feasible\": " + (best.feasible ? "true" : "false") +
         "\n  },\n  \"history\": \"history.csv\",\n  \"best_results\": \"best/\"\n}\n";
}

// ---- stdout ----

std::string headline(const DesignEvaluator& designs, const Case& base) {
  const Evaluation& best = *designs.best();
  const VariedParameter& first = designs.varied().front();
  std::string line;
  switch (designs.goal()) {
    case OptimizeGoal::MaxInception: line = "highest inception voltage " + engineering(best.inception_V, "V"); break;
    case OptimizeGoal::MinField: line = "lowest maximum field " + engineering(best.max_field_V_per_m, "V/m"); break;
    case OptimizeGoal::MinSizeWithMargin:
      line = best.feasible ? "smallest " + first.name + " meeting the required margin " +
                                 significant(base.onset.required_margin, 4) + ": " +
                                 engineering(best.parameters.front(), first.unit)
                           : "NO design in the range meets the required margin " +
                                 significant(base.onset.required_margin, 4) + "; the closest";
      break;
  }
  line += " (max field " + engineering(best.max_field_V_per_m, "V/m");
  if (!std::isnan(best.inception_V))
    line += ", inception " + engineering(best.inception_V, "V") + ", margin " + significant(best.margin, 5);
  return line + ")";
}

void print_table(const DesignEvaluator& designs, const Case& base, const SearchSummary& summary, double tolerance,
                 const std::string& folder) {
  std::printf("%-16s %-14s %s\n", "parameter", "best", "range");
  for (size_t i = 0; i < designs.varied().size(); ++i) {
    const VariedParameter& parameter = designs.varied()[i];
    const std::string range = engineering(parameter.lo, parameter.unit) + " to " + engineering(parameter.hi, parameter.unit);
    std::printf("%-16s %-14s %s\n", parameter.name.c_str(),
                engineering(designs.best()->parameters[i], parameter.unit).c_str(), range.c_str());
  }
  std::printf("%s\n", headline(designs, base).c_str());
  std::printf("%zu evaluations (%s, %s to %g of each range); results in %s/\n", designs.history().size(),
              summary.method.c_str(), summary.converged ? "converged" : "budget spent before converging", tolerance,
              folder.c_str());
}

// Every design failed: say why the first one did, as bad input (exit 2) when it was.
[[noreturn]] void fail_without_a_valid_design(const DesignEvaluator& designs) {
  const Evaluation& first = designs.history().front();
  const std::string problem = "no design in the ranges could be computed; the first " + first.message;
  if (!first.bad_input) throw RunError(problem);
  throw InputError(SourceLocation{"", 0, 0, "--vary"}, problem,
                   "Check one design with `hvstress check CASE --set NAME=VALUE` and narrow the ranges");
}

}  // namespace

int optimize_command(const OptimizeOptions& options) {
  const OptimizeGoal goal = parse_goal(options.goal);
  check_tolerance(options.tolerance);
  const Case base = read_case(options.case_path, options.overrides);
  if (options.varies.empty())
    throw InputError(SourceLocation{"", 0, 0, "--vary"}, "nothing to vary", "Give at least one --vary NAME=LO:HI");
  std::vector<VariedParameter> varied;
  for (const std::string& text : options.varies) {
    varied.push_back(parse_varied(text, base, options.overrides));
    for (size_t i = 0; i + 1 < varied.size(); ++i) {
      if (varied[i].name == varied.back().name)
        throw InputError(SourceLocation{"", 0, 0, "--vary " + varied.back().name}, "the parameter is varied twice",
                         "Give each --vary NAME once");
    }
  }
  check_goal_fits_case(goal, base);
  const std::string destination = options.output_dir.empty() ? base.output.dir + "-optimize" : options.output_dir;
  OutputFolder folder(destination);  // refuses before the long work, not after

  DesignEvaluator designs(base, options.overrides, goal, varied, options.quiet);
  const SearchSummary summary = search(designs, options.tolerance, options.max_evaluations);
  if (designs.best() == nullptr) fail_without_a_valid_design(designs);

  const std::filesystem::path staging(folder.staging());
  std::filesystem::create_directory(staging / "best");
  write_run_outputs(designs.best_outcome(), designs.best_case(), (staging / "best").string());
  write_file_atomically((staging / "history.csv").string(), history_csv(designs));
  write_file_atomically((staging / "summary.json").string(), summary_json(designs, base, summary, options.tolerance));
  folder.commit();

  print_table(designs, base, summary, options.tolerance, destination);
  return designs.best()->feasible ? 0 : kMarginMissed;
}

}  // namespace hv
