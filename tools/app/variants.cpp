#include "tools/app/variants.h"

#include <cerrno>
#include <cstdlib>

#include "mesh/base.h"
#include "postproc/text_format.h"
#include "tools/case/expression.h"
#include "tools/case/units.h"

namespace hv {

namespace {

const char* const kVaryExample = "Write e.g. `--vary ring_R=200mm:400mm:5` (a range) or `--vary tube_r=30mm,50mm` (a list)";

SourceLocation vary_place(const std::string& name) {
  return SourceLocation{"", 0, 0, name.empty() ? "--vary" : "--vary " + name};
}

std::string trimmed(const std::string& text) {
  const std::size_t first = text.find_first_not_of(" \t");
  if (first == std::string::npos) return "";
  return text.substr(first, text.find_last_not_of(" \t") - first + 1);
}

// `text` as a whole number, or false when it is not one (no sign games, nothing after the digits).
bool parse_whole_number(const std::string& text, long& number) {
  if (text.empty() || text.find_first_not_of("0123456789") != std::string::npos) return false;
  errno = 0;
  number = std::strtol(text.c_str(), nullptr, 10);
  return errno == 0;
}

// Splits a list at the commas outside parentheses: a value may call a function of two arguments,
// e.g. `max(20mm, R/2)`.
std::vector<std::string> split_list(const std::string& spec) {
  std::vector<std::string> items(1);
  int depth = 0;
  for (const char c : spec) {
    if (c == '(') ++depth;
    if (c == ')') --depth;
    if (c == ',' && depth == 0) {
      items.emplace_back();
    } else {
      items.back() += c;
    }
  }
  for (std::string& item : items) item = trimmed(item);
  return items;
}

std::vector<std::string> list_values(const std::string& name, const std::string& spec) {
  std::vector<std::string> values = split_list(spec);
  for (const std::string& value : values) {
    if (value.empty())
      throw InputError(vary_place(name), "the list `" + spec + "` has an empty value",
                       "Separate the values by single commas, e.g. `--vary " + name + "=30mm,40mm,50mm`");
  }
  return values;
}

// A value of a range, written so that the case reader reads back exactly `si_value`: the shortest
// decimal that round-trips (at most 17 significant digits) and the coherent SI unit.
std::string si_text(double si_value, const std::string& unit) {
  return unit.empty() ? round_trip_number(si_value) : round_trip_number(si_value) + " " + unit;
}

// LO:HI:COUNT -> COUNT evenly spaced values from LO to HI, both included.
std::vector<std::string> range_values(const std::string& name, const std::string& spec) {
  const SourceLocation where = vary_place(name);
  const std::size_t first = spec.find(':');
  const std::size_t second = spec.find(':', first + 1);
  if (second == std::string::npos || spec.find(':', second + 1) != std::string::npos)
    throw InputError(where, "the range `" + spec + "` is not LO:HI:COUNT", kVaryExample);
  long count = 0;
  if (!parse_whole_number(trimmed(spec.substr(second + 1)), count) || count < 2)
    throw InputError(where, "the range `" + spec + "` needs a COUNT of at least 2 values",
                     "End the range with the number of values, e.g. `--vary " + name + "=200mm:400mm:5`");
  const Quantity low = evaluate_expression(trimmed(spec.substr(0, first)), {}, where);
  const Quantity high = evaluate_expression(trimmed(spec.substr(first + 1, second - first - 1)), {}, where);
  if (low.dimension != high.dimension)
    throw InputError(where, "the range goes from " + describe_dimension(low.dimension) + " to " +
                                describe_dimension(high.dimension),
                     "Give LO and HI in units of the same kind, e.g. `200mm:0.4m:5`");
  const std::string unit = si_symbol(low.dimension);
  if (!unit.empty() && find_unit(unit) == nullptr)
    throw InputError(where, "the range is in " + unit + ", which has no unit name the case file reads",
                     "Vary a parameter of a named kind (a length, a voltage, a field, ...) or give a list");

  std::vector<std::string> values;
  for (long i = 0; i < count; ++i) {
    // The last value is HI itself, not LO plus the rounded steps.
    const double value = i == count - 1 ? high.value : low.value + (high.value - low.value) * i / (count - 1);
    values.push_back(si_text(value, unit));
  }
  return values;
}

}  // namespace

VaryArg parse_vary(const std::string& text) {
  const std::size_t equals = text.find('=');
  const std::string name = equals == std::string::npos ? "" : trimmed(text.substr(0, equals));
  if (name.empty()) throw InputError(vary_place(""), "`" + text + "` is not NAME=SPEC", kVaryExample);
  const std::string spec = trimmed(text.substr(equals + 1));
  if (spec.empty()) throw InputError(vary_place(name), "no values given", kVaryExample);
  // The expression syntax has no ':', so a colon marks a range.
  return VaryArg{name, spec.find(':') != std::string::npos ? range_values(name, spec) : list_values(name, spec)};
}

namespace {

Variant make_variant(int index, std::vector<std::pair<std::string, std::string>> settings) {
  Variant variant;
  variant.index = index;
  for (const auto& [name, value] : settings) {
    if (!variant.label.empty()) variant.label += ", ";
    variant.label += name + "=" + value;
  }
  variant.settings = std::move(settings);
  return variant;
}

void require_distinct_names(const std::vector<VaryArg>& varies) {
  for (std::size_t i = 0; i < varies.size(); ++i) {
    for (std::size_t j = 0; j < i; ++j) {
      if (varies[i].name == varies[j].name)
        throw InputError(vary_place(varies[i].name), "`" + varies[i].name + "` is varied twice",
                         "Give each parameter one --vary with all its values");
    }
  }
}

std::vector<Variant> zipped(const std::vector<VaryArg>& varies) {
  const std::size_t count = varies.front().values.size();
  for (const VaryArg& vary : varies) {
    if (vary.values.size() != count)
      throw InputError(vary_place(vary.name),
                       "--zip pairs the k-th values, but `" + vary.name + "` has " + std::to_string(vary.values.size()) +
                           " values and `" + varies.front().name + "` has " + std::to_string(count),
                       "Give every --vary the same number of values, or leave out --zip for a full grid");
  }
  std::vector<Variant> variants;
  for (std::size_t k = 0; k < count; ++k) {
    std::vector<std::pair<std::string, std::string>> settings;
    for (const VaryArg& vary : varies) settings.emplace_back(vary.name, vary.values[k]);
    variants.push_back(make_variant(static_cast<int>(k) + 1, std::move(settings)));
  }
  return variants;
}

// Every combination, counted like an odometer whose last wheel turns fastest.
std::vector<Variant> grid(const std::vector<VaryArg>& varies) {
  std::vector<std::size_t> wheel(varies.size(), 0);
  std::vector<Variant> variants;
  while (true) {
    std::vector<std::pair<std::string, std::string>> settings;
    for (std::size_t p = 0; p < varies.size(); ++p) settings.emplace_back(varies[p].name, varies[p].values[wheel[p]]);
    variants.push_back(make_variant(static_cast<int>(variants.size()) + 1, std::move(settings)));
    std::size_t p = varies.size();
    while (p > 0 && ++wheel[p - 1] == varies[p - 1].values.size()) wheel[--p] = 0;
    if (p == 0) return variants;
  }
}

}  // namespace

std::vector<Variant> expand_variants(const std::vector<VaryArg>& varies, bool zip) {
  if (varies.empty())
    throw InputError(vary_place(""), "no parameter to vary", "Give at least one --vary NAME=SPEC");
  require_distinct_names(varies);
  return zip ? zipped(varies) : grid(varies);
}

std::vector<Variant> select_shard(const std::vector<Variant>& variants, const std::string& shard) {
  const std::size_t slash = shard.find('/');
  long part = 0;
  long parts = 0;
  if (slash == std::string::npos || !parse_whole_number(trimmed(shard.substr(0, slash)), part) ||
      !parse_whole_number(trimmed(shard.substr(slash + 1)), parts) || parts < 1 || part < 1 || part > parts)
    throw InputError(SourceLocation{"", 0, 0, "--shard"}, "`" + shard + "` is not K/N with 1 <= K <= N",
                     "Write e.g. `--shard 2/8` for the second of eight shards");
  std::vector<Variant> selected;
  for (std::size_t i = static_cast<std::size_t>(part - 1); i < variants.size(); i += static_cast<std::size_t>(parts))
    selected.push_back(variants[i]);
  return selected;
}

}  // namespace hv
