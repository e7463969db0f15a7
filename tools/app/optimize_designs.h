// The designs `hvstress optimize` evaluates: the varied parameters and their ranges, the goal, and an
// evaluator that turns parameter values into a computed design (mesh, field, onset), caches it by its
// values, records every evaluation in order and keeps the best design's full results for writing.
#pragma once

#include <map>
#include <memory>
#include <string>
#include <vector>

#include "tools/app/run_case.h"
#include "tools/case/case.h"

namespace hv {

enum class OptimizeGoal { MaxInception, MinField, MinSizeWithMargin };

// "max-inception", "min-field", "min-size-with-margin"; InputError (at "--goal") for anything else.
OptimizeGoal parse_goal(const std::string& text);
std::string goal_name(OptimizeGoal goal);

// One `--vary NAME=LO:HI`, in SI units.
struct VariedParameter {
  std::string name;
  double lo = 0.0, hi = 0.0;  // SI, lo < hi
  std::string unit;           // SI unit symbol of LO and HI ("m", "V", "" for a pure number)
};

// Parses "NAME=LO:HI" against the case: NAME must be a parameter of `base` not also given by --set
// (`overrides`), LO and HI values in the case file's syntax of one dimension, the parameter's
// dimension when the case gives it one, with LO < HI. Throws InputError at "--vary NAME".
VariedParameter parse_varied(const std::string& text, const Case& base, const std::vector<std::string>& overrides);

// What one design gave. Numbers are SI; NaN where the design could not be computed.
struct Evaluation {
  std::vector<double> parameters;  // in the order of the varied parameters
  bool valid = false;              // the design could be meshed and solved
  bool bad_input = false;          // not valid because these values make bad input (InputError)
  bool feasible = false;           // valid, and under min-size-with-margin it meets the required margin
  double objective = NAN;          // max-inception: inception V; min-field: max |E| V/m;
                                   // min-size-with-margin: the first varied parameter's value
  double max_field_V_per_m = NAN;
  double inception_V = NAN;        // +inf: no inception found in the searched range
  double margin = NAN;
  std::string message;             // why the design is not valid or not feasible; empty otherwise
};

class DesignEvaluator {
 public:
  // `base_case` is the case with the --set overrides applied; designs are parsed again from its text
  // with `overrides` plus one "NAME=<17 digits> <SI unit>" per varied parameter.
  DesignEvaluator(const Case& base_case, std::vector<std::string> overrides, OptimizeGoal goal,
                  std::vector<VariedParameter> varied, bool quiet);

  // The design at `values` (SI, one per varied parameter), computed once: a repeated call returns
  // the cached evaluation. Bad input for these values (e.g. a ring touching the rod) or a failed
  // solve gives an evaluation that is not valid, with the message.
  const Evaluation& evaluate(const std::vector<double>& values);

  // The value the search methods minimize: -inception, max field, or the size; +inf when not feasible.
  double score(const Evaluation& evaluation) const;

  const std::vector<Evaluation>& history() const { return history_; }
  const std::vector<VariedParameter>& varied() const { return varied_; }
  OptimizeGoal goal() const { return goal_; }

  // The best evaluation so far: the feasible one of lowest score, else (min-size-with-margin with
  // no design meeting the margin) the valid one of highest margin; nullptr while none is valid.
  const Evaluation* best() const { return best_index_ < 0 ? nullptr : &history_[static_cast<size_t>(best_index_)]; }
  // Its case and full results, for writing them out (valid while best() is not nullptr).
  const Case& best_case() const { return *best_case_; }
  const RunOutcome& best_outcome() const { return *best_outcome_; }

  // "tube_r = 28.5 mm, ring_R = 150 mm": the values in engineering units, for people.
  std::string describe(const std::vector<double>& values) const;

 private:
  bool ranks_before(const Evaluation& a, const Evaluation& b) const;
  Evaluation compute(const std::vector<double>& values, std::unique_ptr<RunOutcome>& outcome,
                     std::unique_ptr<Case>& design) const;
  void report(const Evaluation& evaluation) const;

  const Case& base_case_;
  std::vector<std::string> overrides_;
  OptimizeGoal goal_;
  std::vector<VariedParameter> varied_;
  bool quiet_;
  std::vector<Evaluation> history_;
  std::map<std::vector<double>, size_t> cache_;  // values -> index into history_
  int best_index_ = -1;
  std::unique_ptr<Case> best_case_;
  std::unique_ptr<RunOutcome> best_outcome_;
};

// `value` (SI) with an engineering prefix that the case file accepts: 0.0285 "m" -> "28.5 mm",
// 311127 "V" -> "311.1 kV"; 4 significant digits; a pure number or a unit without prefixes stays SI.
// Fields are given in kV/mm, as `run` prints them.
std::string engineering(double value, const std::string& unit);

}  // namespace hv
