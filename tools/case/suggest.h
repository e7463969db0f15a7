// Suggestions for misspelt names (keys, units, parameters, electrodes): the nearest candidate by
// edit distance, as a hint sentence for an InputError.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

namespace hv {

// The Levenshtein distance (V. I. Levenshtein, Soviet Physics Doklady 10(8), 707-710, 1966):
// the fewest single-character insertions, deletions and substitutions that turn `a` into `b`,
// ignoring letter case.
std::size_t edit_distance(const std::string& a, const std::string& b);

// "Did you mean `radius`?" for the candidate nearest to `word` if it is close enough (at most one
// edit per three characters, and at least one), else "".
std::string did_you_mean(const std::string& word, const std::vector<std::string>& candidates);

// "`a`, `b`, `c`": candidates for a hint listing what is allowed.
std::string quoted_list(const std::vector<std::string>& names);

}  // namespace hv
