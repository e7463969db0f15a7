#include "tools/case/suggest.h"

#include <algorithm>
#include <cctype>

namespace hv {

std::size_t edit_distance(const std::string& a, const std::string& b) {
  const auto same = [](char x, char y) {
    return std::tolower(static_cast<unsigned char>(x)) == std::tolower(static_cast<unsigned char>(y));
  };
  // One row of the dynamic-programming table: previous[j] = distance(a[0..i), b[0..j)).
  std::vector<std::size_t> previous(b.size() + 1), current(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) previous[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    current[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t substitution = previous[j - 1] + (same(a[i - 1], b[j - 1]) ? 0 : 1);
      current[j] = std::min({previous[j] + 1, current[j - 1] + 1, substitution});
    }
    std::swap(previous, current);
  }
  return previous[b.size()];
}

std::string did_you_mean(const std::string& word, const std::vector<std::string>& candidates) {
  const std::size_t reach = std::max<std::size_t>(1, word.size() / 3);
  const std::string* nearest = nullptr;
  std::size_t nearest_distance = reach + 1;
  for (const std::string& candidate : candidates) {
    const std::size_t distance = edit_distance(word, candidate);
    if (distance < nearest_distance) {
      nearest = &candidate;
      nearest_distance = distance;
    }
  }
  return nearest ? "Did you mean `" + *nearest + "`?" : "";
}

std::string quoted_list(const std::vector<std::string>& names) {
  std::string list;
  for (const std::string& name : names) list += (list.empty() ? "`" : ", `") + name + "`";
  return list;
}

}  // namespace hv
