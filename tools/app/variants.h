// The variants of a parameter study: `--vary NAME=SPEC` (spec/cli.md: a list `30mm,40mm,50mm` or a
// range `LO:HI:COUNT`), expanded to a full grid or zipped, and split into shards for batch clusters.
#pragma once

#include <string>
#include <utility>
#include <vector>

namespace hv {

// One varied parameter and its values, each in the case file's value syntax (a range's values are
// written as SI numbers with their SI unit, e.g. "0.25 m").
struct VaryArg {
  std::string name;
  std::vector<std::string> values;
};

// Parses "NAME=SPEC". Throws InputError (where: "--vary NAME") for a malformed spec, a COUNT below 2,
// or LO and HI of different dimensions.
VaryArg parse_vary(const std::string& text);

// One design of the study: its index in the full study and NAME=VALUE settings for --set.
struct Variant {
  int index = 0;
  std::vector<std::pair<std::string, std::string>> settings;
  std::string label;  // e.g. "ring_R=0.25 m, tube_r=0.04 m"
};

// Every combination (grid, the first parameter varying slowest), or with `zip` the k-th values of
// all parameters together (InputError when their counts differ).
std::vector<Variant> expand_variants(const std::vector<VaryArg>& varies, bool zip);

// Shard K of N (K from 1 to N): every N-th variant starting at the K-th. Throws InputError for a
// malformed "K/N".
std::vector<Variant> select_shard(const std::vector<Variant>& variants, const std::string& shard);

}  // namespace hv
