// The one table of case-file keys: every key path with its type, kind of quantity, default and a
// one-line meaning. The reader takes each value's kind from here and checks every map's keys
// against it (suggesting the nearest key on a miss); docs/case-file.md lists exactly these keys,
// which a test checks, so the reference cannot drift from the reader.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "tools/case/units.h"

namespace hv {

enum class KeyType {
  Section,     // a map of the keys listed under it
  Names,       // a map from the user's names to values (`<name>` in paths)
  List,        // a list of maps (`[]` in paths)
  Value,       // a number or expression of `kind`
  Expression,  // a number or expression of any kind (parameters)
  Integer,     // a whole number
  Text,        // free text or a name
  Choice,      // one of `choices`, ignoring case
  Boolean,     // true or false
  UnitName,    // a unit of `kind`
  Point,       // [r, z], lengths
  Range,       // [low, high] of `kind`
  PointList,   // [[r, z], ...], lengths
};

struct CaseKey {
  CaseKey(std::string path_, KeyType type_, Kind kind_, std::string default_, std::string meaning_,
          std::vector<std::string> choices_ = {})
      : path(std::move(path_)), type(type_), kind(kind_), default_value(std::move(default_)),
        meaning(std::move(meaning_)), choices(std::move(choices_)) {}

  std::string path;  // e.g. "shapes[].circle.radius"; `[]` is a list item, `<name>` a user's name
  KeyType type;
  Kind kind;                          // what Value, Range and UnitName measure
  std::string default_value;          // as the reference shows it, e.g. "1.3", "required"
  std::string meaning;                // one line
  std::vector<std::string> choices;   // Choice: the allowed values, lower case
};

// Every key, parents before their children, in the order of the reference.
const std::vector<CaseKey>& case_keys();

// The key at `path`. Throws std::logic_error if the table lacks it: a programmer error.
const CaseKey& case_key(const std::string& path);

// The names of the keys directly under `parent` ("" for the top level): `child_names("shapes[].circle")`
// is {"center", "radius"}.
std::vector<std::string> child_names(const std::string& parent);

// For the reference: the type as a reader sees it ("number", "[r, z]", "`open` or `box`") and
// the kind column ("length", "voltage", or "-" for none).
std::string type_label(const CaseKey& key);
std::string kind_label(const CaseKey& key);

}  // namespace hv
