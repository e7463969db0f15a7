// Reads a case file into Case: YAML through yaml-cpp, each map's keys checked against the key table
// (case_keys.h), values through the expression evaluator, and every error placed at its file, line,
// column and key path.
#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <map>
#include <memory>
#include <optional>
#include <set>
#include <sstream>
#include <tuple>

#include <yaml-cpp/yaml.h>

#include "tools/case/case.h"
#include "tools/case/case_keys.h"
#include "tools/case/expression.h"
#include "tools/case/suggest.h"

namespace hv {

namespace {

// Case files are a few kilobytes. Anything above this is not a case (or is a device such as
// /dev/zero), and is refused before it fills the memory.
constexpr std::size_t kMaxCaseFileBytes = 10u << 20;

// A value of the case file and its place.
struct Entry {
  YAML::Node node;
  std::string key;      // its key in the parent map, or "" for a list item
  std::string path;     // key path with indices, e.g. "shapes[2].circle.radius"
  std::string pattern;  // its path in the key table, e.g. "shapes[].circle.radius"
  YAML::Mark key_mark;  // where its key (or, for a list item, the item) stands; 0-based
};

// The members of one map after the key checks.
struct Fields {
  Entry self;
  std::vector<Entry> members;

  std::optional<Entry> get(const std::string& key) const {
    for (const Entry& member : members)
      if (member.key == key) return member;
    return std::nullopt;
  }
};

std::string join_path(const std::string& parent, const std::string& key) {
  return parent.empty() ? key : parent + "." + key;
}

std::string lower_case(std::string text) {
  for (char& c : text) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return text;
}

bool is_identifier(const std::string& name) {
  if (name.empty() || !(std::isalpha(static_cast<unsigned char>(name[0])) || name[0] == '_')) return false;
  return std::all_of(name.begin(), name.end(),
                     [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; });
}

std::string format_si(double value, Kind kind) {
  std::ostringstream out;
  out << value;
  const std::string unit = si_symbol(dimension_of(kind));
  if (!unit.empty()) out << ' ' << unit;
  return out.str();
}

// An example of a key's value for hints, e.g. "25 mm" or "[40 mm, 120 mm]".
std::string example_value(const CaseKey& key) {
  switch (key.type) {
    case KeyType::Value: return kind_example(key.kind);
    case KeyType::Expression: return "300 kV * sqrt(2)";
    case KeyType::Integer: return key.default_value == "required" ? "1" : key.default_value;
    case KeyType::Text: return "name";
    case KeyType::Choice: return key.choices.front();
    case KeyType::Boolean: return "true";
    case KeyType::UnitName: return unit_names_of(dimension_of(key.kind)).front();
    case KeyType::Point: return "[40 mm, 120 mm]";
    case KeyType::Range: return "[0, " + kind_example(key.kind) + "]";
    case KeyType::PointList: return "[[0, 0], [40 mm, 0], [0, 60 mm]]";
    case KeyType::Section: return "{" + child_names(key.path).front() + ": ...}";
    case KeyType::Names: return "{name: ...}";
    case KeyType::List: return "[...]";
  }
  return "";
}

std::string describe_expected(const CaseKey& key) {
  switch (key.type) {
    case KeyType::Value:
      return describe_dimension(dimension_of(key.kind)) + " (e.g. " + kind_example(key.kind) + ")";
    case KeyType::Expression: return "a value with or without a unit (e.g. 300 kV)";
    case KeyType::Integer: return "a whole number";
    case KeyType::Text: return "a text value";
    case KeyType::Choice: return type_label(key);
    case KeyType::Boolean: return "true or false";
    case KeyType::UnitName: return "a unit of " + describe_dimension(dimension_of(key.kind));
    case KeyType::Point: return "a point [r, z]";
    case KeyType::Range: return "a pair [low, high]";
    case KeyType::PointList: return "a list of points [[r, z], ...]";
    case KeyType::Section: return "a map with the keys " + quoted_list(child_names(key.path));
    case KeyType::Names: return "a map of names";
    case KeyType::List: return "a list";
  }
  return "";
}

std::string describe_node(const YAML::Node& node) {
  switch (node.Type()) {
    case YAML::NodeType::Map: return "a map";
    case YAML::NodeType::Sequence: return "a list";
    case YAML::NodeType::Scalar: return "`" + node.Scalar() + "`";
    default: return "nothing";
  }
}

class CaseReader {
 public:
  CaseReader(const std::string& text, const std::string& file) : text_(text), file_(file) {}

  Case read(const std::vector<std::string>& overrides) {
    Case result;
    result.file = file_;
    result.text = text_;
    const Fields top = section(load());
    result.format = read_format(top);
    if (const auto title = top.get("title")) result.title = text(*title);
    if (const auto units = top.get("units")) read_units(*units);
    result.parameters = read_parameters(top.get("parameters"), overrides);

    GeometrySpec& geometry = result.geometry;
    if (const auto materials = top.get("materials")) geometry.materials = read_materials(*materials);
    if (const auto electrodes = top.get("electrodes")) geometry.electrodes = read_electrodes(*electrodes);
    geometry.shapes = read_shapes(require(top, "shapes"), geometry);
    geometry.ground_plane = read_ground_plane(top.get("ground_plane"));
    geometry.domain = read_domain(top.get("domain"), geometry);
    geometry.mesh = read_mesh(top.get("mesh"));
    require_fixed_potential(top, geometry);
    result.gas = read_gas(top.get("gas"));
    result.onset = read_onset(top.get("onset"));
    result.output = read_output(top.get("output"));
    return result;
  }

 private:
  // ---- Places and errors -------------------------------------------------------------------------

  SourceLocation at_mark(const YAML::Mark& mark, const std::string& path) const {
    SourceLocation where{file_, 0, 0, path};
    if (!mark.is_null()) {
      where.line = mark.line + 1;  // yaml-cpp counts from 0
      where.column = mark.column + 1;
    }
    return where;
  }

  // Where the value stands (its first character inside quotes), or its key when it is empty.
  SourceLocation value_place(const Entry& entry) const {
    if (!entry.node.IsDefined() || entry.node.IsNull()) return key_place(entry);
    SourceLocation where = at_mark(entry.node.Mark(), entry.path);
    const std::size_t pos = static_cast<std::size_t>(std::max(0, entry.node.Mark().pos));
    if (entry.node.IsScalar() && pos < text_.size() && (text_[pos] == '"' || text_[pos] == '\'')) ++where.column;
    return where;
  }

  SourceLocation key_place(const Entry& entry) const { return at_mark(entry.key_mark, entry.path); }

  [[noreturn]] void fail(const Entry& entry, const std::string& problem, const std::string& hint) const {
    throw InputError(value_place(entry), problem, hint);
  }

  [[noreturn]] void fail_at_key(const Entry& entry, const std::string& problem, const std::string& hint) const {
    throw InputError(key_place(entry), problem, hint);
  }

  [[noreturn]] void fail_type(const Entry& entry, const CaseKey& key) const {
    const std::string example = entry.key.empty() ? example_value(key) : entry.key + ": " + example_value(key);
    fail(entry, "expected " + describe_expected(key) + ", got " + describe_node(entry.node),
         "Write it like `" + example + "`");
  }

  // ---- Structure --------------------------------------------------------------------------------

  // Line and column (1-based) of a byte offset into the text.
  SourceLocation at_offset(std::size_t offset) const {
    const std::size_t line_start = offset == 0 ? 0 : text_.rfind('\n', offset - 1) + 1;  // npos + 1 == 0
    const auto line = 1 + std::count(text_.begin(), text_.begin() + static_cast<std::ptrdiff_t>(line_start), '\n');
    return SourceLocation{file_, static_cast<int>(line), static_cast<int>(offset - line_start) + 1, ""};
  }

  Entry load() const {
    const std::size_t nul = text_.find('\0');
    if (nul != std::string::npos)
      throw InputError(at_offset(nul), "the case file holds binary data (a NUL byte), not YAML text",
                       "Check that this is the case file; save it as plain text (UTF-8)");
    YAML::Node root;
    try {
      root = YAML::Load(text_);
    } catch (const YAML::Exception& error) {
      throw InputError(at_mark(error.mark, ""), "YAML syntax: " + error.msg,
                       "Check the indentation, colons, quotes and brackets here and on the line above");
    }
    const Entry entry{root, "", "", "", YAML::Mark()};
    if (!root.IsMap())
      throw InputError(SourceLocation{file_, 1, 1, ""},
                       root.IsNull() ? "the case file is empty" : "expected a map of keys at the top level",
                       "Start the file with `hvstress: 1` and continue with keys such as `shapes:`");
    return entry;
  }

  Entry member_entry(const Entry& parent, const YAML::Node& key, const YAML::Node& value, bool user_name) const {
    Entry member{value, "", parent.path, parent.pattern, key.Mark()};
    if (!key.IsScalar()) fail_at_key(member, "a key must be a plain name", "Write keys as `name: value`");
    member.key = key.Scalar();
    member.path = join_path(parent.path, member.key);
    member.pattern = join_path(parent.pattern, user_name ? "<name>" : member.key);
    return member;
  }

  void reject_repeated(const std::vector<Entry>& earlier, const Entry& member) const {
    for (const Entry& other : earlier)
      if (other.key == member.key)
        fail_at_key(member, "the key `" + member.key + "` is given twice",
                    "Keep one of them (the other is on line " + std::to_string(other.key_mark.line + 1) + ")");
  }

  // The members of a map whose keys the table lists; empty for a key with no value.
  Fields section(const Entry& map) const {
    Fields fields{map, {}};
    if (map.node.IsNull()) return fields;
    if (!map.node.IsMap()) fail_type(map, case_key(map.pattern));
    const std::vector<std::string> allowed = child_names(map.pattern);
    for (auto it = map.node.begin(); it != map.node.end(); ++it) {
      const Entry member = member_entry(map, it->first, it->second, false);
      if (std::find(allowed.begin(), allowed.end(), member.key) == allowed.end()) {
        const std::string suggestion = did_you_mean(member.key, allowed);
        fail_at_key(member, "unknown key `" + member.key + "`",
                    suggestion.empty() ? "Keys allowed here: " + quoted_list(allowed) : suggestion);
      }
      reject_repeated(fields.members, member);
      fields.members.push_back(member);
    }
    return fields;
  }

  // The members of a map from the user's names (parameters, materials, electrodes).
  std::vector<Entry> named(const Entry& map) const {
    std::vector<Entry> members;
    if (map.node.IsNull()) return members;
    if (!map.node.IsMap()) fail_type(map, case_key(map.pattern));
    for (auto it = map.node.begin(); it != map.node.end(); ++it) {
      const Entry member = member_entry(map, it->first, it->second, true);
      reject_repeated(members, member);
      members.push_back(member);
    }
    return members;
  }

  std::vector<Entry> items(const Entry& list) const {
    std::vector<Entry> result;
    if (list.node.IsNull()) return result;
    if (!list.node.IsSequence()) fail_type(list, case_key(list.pattern));
    for (std::size_t i = 0; i < list.node.size(); ++i) {
      const YAML::Node item = list.node[i];
      result.push_back({item, "", list.path + "[" + std::to_string(i) + "]", list.pattern + "[]", item.Mark()});
    }
    return result;
  }

  Entry require(const Fields& fields, const std::string& key) const {
    if (const auto member = fields.get(key)) return *member;
    const CaseKey& info = case_key(join_path(fields.self.pattern, key));
    fail_at_key(fields.self, "missing key `" + key + "`", "Add `" + key + ": " + example_value(info) + "`");
  }

  // ---- Values -----------------------------------------------------------------------------------

  std::string scalar(const Entry& entry, const CaseKey& key) const {
    if (!entry.node.IsScalar()) fail_type(entry, key);
    return entry.node.Scalar();
  }

  double value_of_kind(const Entry& entry, Kind kind) const {
    if (!entry.node.IsScalar())
      fail(entry,
           "expected " + describe_dimension(dimension_of(kind)) + " (e.g. " + kind_example(kind) + "), got " +
               describe_node(entry.node),
           "Write a number, with a unit if it has one, e.g. `" + kind_example(kind) + "`");
    return evaluate_as(entry.node.Scalar(), kind, variables_, units_, value_place(entry));
  }

  double value(const Entry& entry) const {
    const CaseKey& key = case_key(entry.pattern);
    if (!entry.node.IsScalar()) fail_type(entry, key);
    return value_of_kind(entry, key.kind);
  }

  double positive(const Entry& entry) const {
    const double result = value(entry);
    if (!(result > 0.0))
      fail(entry, "must be greater than zero, got `" + entry.node.Scalar() + "`",
           "Give a positive value, e.g. `" + example_value(case_key(entry.pattern)) + "`");
    return result;
  }

  double non_negative(const Entry& entry) const {
    const double result = value(entry);
    if (result < 0.0) fail(entry, "must not be negative, got `" + entry.node.Scalar() + "`", "Give 0 or more");
    return result;
  }

  int integer(const Entry& entry) const {
    if (!entry.node.IsScalar()) fail_type(entry, case_key(entry.pattern));
    const double result = value_of_kind(entry, Kind::Number);
    if (result != std::round(result) || std::fabs(result) > 1e9)
      fail(entry, "expected a whole number, got `" + entry.node.Scalar() + "`", "Write e.g. `2`");
    return static_cast<int>(result);
  }

  std::string text(const Entry& entry) const {
    const std::string result = scalar(entry, case_key(entry.pattern));
    if (result.empty()) fail(entry, "expected " + describe_expected(case_key(entry.pattern)) + ", got nothing", "Give a value");
    return result;
  }

  // One of the key's choices, ignoring case; returned in lower case.
  std::string choice(const Entry& entry) const {
    const CaseKey& key = case_key(entry.pattern);
    const std::string given = lower_case(scalar(entry, key));
    if (std::find(key.choices.begin(), key.choices.end(), given) != key.choices.end()) return given;
    const std::string suggestion = did_you_mean(given, key.choices);
    fail(entry, "expected " + type_label(key) + ", got `" + entry.node.Scalar() + "`",
         suggestion.empty() ? "Choose one of them (case does not matter)" : suggestion);
  }

  std::string choice_or(const std::optional<Entry>& entry, const std::string& otherwise) const {
    return entry ? choice(*entry) : otherwise;
  }

  bool boolean(const Entry& entry) const {
    const std::string given = lower_case(scalar(entry, case_key(entry.pattern)));
    if (given == "true") return true;
    if (given == "false") return false;
    fail(entry, "expected true or false, got `" + entry.node.Scalar() + "`", "Write `" + entry.key + ": true`");
  }

  // A list of exactly two values of `kind`: a point [r, z] or a range [low, high].
  std::pair<double, double> pair_of(const Entry& entry, Kind kind) const {
    const CaseKey& key = case_key(entry.pattern);
    if (!entry.node.IsSequence() || entry.node.size() != 2) {
      const std::string got = entry.node.IsSequence() ? "a list of " + std::to_string(entry.node.size())
                                                       : describe_node(entry.node);
      fail(entry, "expected " + describe_expected(key) + ", got " + got,
           "Write two values in brackets, e.g. `" + example_value(key) + "`");
    }
    const std::vector<Entry> parts = items_of_pair(entry);
    return {value_of_kind(parts[0], kind), value_of_kind(parts[1], kind)};
  }

  std::vector<Entry> items_of_pair(const Entry& entry) const {
    std::vector<Entry> parts;
    for (std::size_t i = 0; i < 2; ++i) {
      const YAML::Node part = entry.node[i];
      parts.push_back({part, "", entry.path + "[" + std::to_string(i) + "]", entry.pattern, part.Mark()});
    }
    return parts;
  }

  Point point(const Entry& entry) const {
    const auto [r, z] = pair_of(entry, Kind::Length);
    return {r, z};
  }

  // [low, high] with low < high.
  std::pair<double, double> range(const Entry& entry) const {
    const auto result = pair_of(entry, case_key(entry.pattern).kind);
    if (!(result.first < result.second))
      fail(entry,
           "the first value must be less than the second, got [" + entry.node[0].Scalar() + ", " +
               entry.node[1].Scalar() + "]",
           "Write the smaller value first, e.g. `" + example_value(case_key(entry.pattern)) + "`");
    return result;
  }

  // ---- Sections, in the order of the file format ---------------------------------------------------

  int read_format(const Fields& top) const {
    if (!top.get("hvstress"))
      throw InputError(SourceLocation{file_, 1, 1, "hvstress"}, "missing key `hvstress`",
                       "Start the file with `hvstress: 1` (the case format version)");
    const Entry version = *top.get("hvstress");
    const int format = integer(version);
    if (format != 1)
      fail(version, "this hvstress reads case format 1, not " + std::to_string(format),
           "Write `hvstress: 1` and use the keys of docs/case-file.md");
    return format;
  }

  void read_units(const Entry& entry) {
    for (const Entry& member : section(entry).members) {
      const CaseKey& key = case_key(member.pattern);
      const std::string name = scalar(member, key);
      const Unit* unit = find_unit(name);
      if (!unit || unit->dimension != dimension_of(key.kind)) {
        const std::vector<std::string> allowed = unit_names_of(dimension_of(key.kind));
        const std::string suggestion = unit ? "" : did_you_mean(name, allowed);
        fail(member, "expected " + describe_expected(key) + ", got `" + name + "`",
             suggestion.empty() ? "Choose one of " + quoted_list(allowed) : suggestion);
      }
      units_[key.kind] = unit;
    }
  }

  // Parameters in file order; a `--set NAME=VALUE` replaces the value of NAME before later
  // parameters use it.
  std::vector<Parameter> read_parameters(const std::optional<Entry>& entry, const std::vector<std::string>& overrides) {
    const std::vector<Entry> members = entry ? named(*entry) : std::vector<Entry>{};
    const std::map<std::string, std::string> replaced = parse_overrides(overrides, members);
    std::vector<Parameter> parameters;
    for (const Entry& member : members) {
      check_parameter_name(member);
      const auto override_text = replaced.find(member.key);
      const Quantity in_case = evaluate_expression(scalar(member, case_key(member.pattern)), variables_, value_place(member));
      const Quantity quantity = override_text == replaced.end() ? in_case : overridden(member.key, override_text->second, in_case);
      variables_[member.key] = quantity;
      parameters.push_back({member.key, quantity.value, si_symbol(quantity.dimension)});
    }
    return parameters;
  }

  // The value of `--set NAME=text`. It must measure what the case's own value measures (a length
  // stays a length), unless the case gives a bare number, whose meaning depends on where it is used.
  Quantity overridden(const std::string& name, const std::string& text, const Quantity& in_case) const {
    const SourceLocation place{"", 0, 0, "--set " + name};
    const Quantity quantity = evaluate_expression(text, variables_, place);
    if (!in_case.dimension.is_dimensionless() && quantity.dimension != in_case.dimension)
      throw InputError(place, "the case gives `" + name + "` as " + describe_dimension(in_case.dimension) + ", got " +
                                  describe_dimension(quantity.dimension),
                       "Give a value with a unit of " + describe_dimension(in_case.dimension));
    return quantity;
  }

  void check_parameter_name(const Entry& member) const {
    if (!is_identifier(member.key))
      fail_at_key(member, "`" + member.key + "` is not a valid parameter name",
                  "Use letters, digits and `_`, starting with a letter, e.g. `ring_R`");
    if (is_reserved_name(member.key))
      fail_at_key(member, "`" + member.key + "` is a unit, function or constant, so it cannot name a parameter",
                  "Choose another name, e.g. `" + member.key + "_1`");
  }

  // NAME -> VALUE from the --set strings; every NAME must be a parameter of the case.
  static std::map<std::string, std::string> parse_overrides(const std::vector<std::string>& overrides,
                                                            const std::vector<Entry>& members) {
    std::vector<std::string> names;
    for (const Entry& member : members) names.push_back(member.key);
    std::map<std::string, std::string> replaced;
    for (const std::string& assignment : overrides) {
      const std::size_t equals = assignment.find('=');
      const std::string name = equals == std::string::npos ? "" : trimmed(assignment.substr(0, equals));
      if (name.empty())
        throw InputError(SourceLocation{"", 0, 0, "--set"}, "`" + assignment + "` is not NAME=VALUE",
                         "Write e.g. `--set \"ring_R=300 mm\"`");
      const SourceLocation where{"", 0, 0, "--set " + name};
      if (std::find(names.begin(), names.end(), name) == names.end()) {
        const std::string suggestion = did_you_mean(name, names);
        throw InputError(where, "the case has no parameter `" + name + "`",
                         !suggestion.empty() ? suggestion
                         : names.empty()     ? "This case declares no `parameters:`"
                                             : "Its parameters: " + quoted_list(names));
      }
      if (replaced.count(name)) throw InputError(where, "`" + name + "` is set twice", "Give each --set NAME once");
      replaced[name] = assignment.substr(equals + 1);
    }
    return replaced;
  }

  static std::string trimmed(const std::string& text) {
    const std::size_t first = text.find_first_not_of(" \t");
    if (first == std::string::npos) return "";
    return text.substr(first, text.find_last_not_of(" \t") - first + 1);
  }

  std::vector<MaterialSpec> read_materials(const Entry& entry) const {
    std::vector<MaterialSpec> materials;
    for (const Entry& member : named(entry)) {
      const Entry permittivity = require(section(member), "permittivity");
      MaterialSpec material{member.key, value(permittivity), key_place(member)};
      if (!(material.permittivity >= 1.0))
        fail(permittivity, "relative permittivity must be at least 1, got `" + permittivity.node.Scalar() + "`",
             "Gases are close to 1; solid and liquid insulation is above 1");
      materials.push_back(material);
    }
    return materials;
  }

  std::vector<ElectrodeSpec> read_electrodes(const Entry& entry) const {
    std::vector<ElectrodeSpec> electrodes;
    for (const Entry& member : named(entry)) {
      const Fields fields = section(member);
      const auto floating = fields.get("floating");
      const auto potential = fields.get("potential");
      ElectrodeSpec electrode{member.key, floating && boolean(*floating), 0.0, key_place(member)};
      if (electrode.floating && potential)
        fail_at_key(*potential, "a floating electrode has no fixed potential",
                    "Remove `potential`, or remove `floating: true`");
      if (!electrode.floating && !potential)
        fail_at_key(member, "electrode `" + member.key + "` has neither `potential` nor `floating: true`",
                    "Add e.g. `potential: 145 kV`, or `floating: true` for isolated metal");
      if (potential) electrode.potential_V = value(*potential);
      electrodes.push_back(electrode);
    }
    return electrodes;
  }

  std::vector<ShapeSpec> read_shapes(const Entry& entry, const GeometrySpec& geometry) const {
    const std::vector<Entry> list = items(entry);
    if (list.empty()) fail_at_key(entry, "the case has no shapes", "Add at least one shape under `shapes:`");
    std::vector<ShapeSpec> shapes;
    std::set<std::string> names;
    for (const Entry& item : list) {
      const Fields fields = section(item);
      ShapeSpec shape;
      shape.where = value_place(item);
      shape.name = item.path;
      if (const auto name = fields.get("name")) {
        shape.name = text(*name);
        if (!names.insert(shape.name).second)
          fail(*name, "another shape is already called `" + shape.name + "`", "Give every shape its own name");
      }
      shape.outline = read_outline(fields);
      read_owner(fields, geometry, shape);
      shapes.push_back(shape);
    }
    return shapes;
  }

  decltype(ShapeSpec::outline) read_outline(const Fields& shape) const {
    std::optional<Entry> outline;
    for (const Entry& member : shape.members) {
      if (member.key != "rect" && member.key != "circle" && member.key != "polygon" && member.key != "path") continue;
      if (outline)
        fail_at_key(member, "the shape already has the outline `" + outline->key + "`",
                    "Give each shape one outline; split it into two shapes");
      outline = member;
    }
    if (!outline)
      fail_at_key(shape.self, "the shape has no outline", "Give it one of `rect`, `circle`, `polygon` or `path`");
    const Fields fields = section(*outline);
    if (outline->key == "rect") return read_rect(fields);
    if (outline->key == "circle") return read_circle(fields);
    if (outline->key == "polygon") return read_polygon(fields);
    return read_path(fields);
  }

  RectShape read_rect(const Fields& fields) const {
    RectShape rect;
    std::tie(rect.r0, rect.r1) = range(require(fields, "r"));
    std::tie(rect.z0, rect.z1) = range(require(fields, "z"));
    if (const auto round = fields.get("round")) rect.round = non_negative(*round);
    return rect;
  }

  CircleShape read_circle(const Fields& fields) const {
    return CircleShape{point(require(fields, "center")), positive(require(fields, "radius"))};
  }

  PolygonShape read_polygon(const Fields& fields) const {
    PolygonShape polygon;
    const Entry points = require(fields, "points");
    for (const Entry& corner : items(points)) polygon.points.push_back(point(corner));
    if (polygon.points.size() < 3)
      fail(points, "a polygon needs at least 3 points, got " + std::to_string(polygon.points.size()),
           "List the corners in order, e.g. `[[0, 0], [40 mm, 0], [0, 60 mm]]`; the last joins the first");
    if (const auto round = fields.get("round")) polygon.round = non_negative(*round);
    return polygon;
  }

  PathShape read_path(const Fields& fields) const {
    PathShape path;
    path.start = point(require(fields, "start"));
    const Entry segments = require(fields, "segments");
    for (const Entry& item : items(segments)) path.segments.push_back(read_segment(section(item)));
    if (path.segments.empty())
      fail_at_key(segments, "a path needs at least one segment", "Add e.g. `- line: [40 mm, 0]`");
    return path;
  }

  PathSegment read_segment(const Fields& segment) const {
    if (segment.members.size() != 1) {
      if (segment.members.empty())
        fail_at_key(segment.self, "the segment is empty", "Write `- line: [r, z]` or `- arc: {to: [r, z], radius: R}`");
      fail_at_key(segment.members[1], "a segment is either `line` or `arc`, not both",
                  "Start a new list item with `-` for the next segment");
    }
    const Entry& piece = segment.members.front();
    PathSegment result;
    if (piece.key == "line") {
      result.to = point(piece);
      return result;
    }
    const Fields arc = section(piece);
    result.kind = PathSegment::Kind::Arc;
    result.to = point(require(arc, "to"));
    const Entry radius = require(arc, "radius");
    result.radius = value(radius);
    if (result.radius == 0.0) fail(radius, "an arc radius cannot be 0", "Use `line` for a straight piece");
    return result;
  }

  void read_owner(const Fields& shape, const GeometrySpec& geometry, ShapeSpec& spec) const {
    const auto electrode = shape.get("electrode");
    const auto material = shape.get("material");
    if (electrode && material)
      fail_at_key(*material, "a shape is an electrode or a material, not both", "Remove `electrode` or `material`");
    if (!electrode && !material)
      fail_at_key(shape.self, "the shape has neither `electrode` nor `material`",
                  "Add e.g. `electrode: terminal` or `material: epoxy`");
    std::vector<std::string> electrodes, materials;
    for (const ElectrodeSpec& e : geometry.electrodes) electrodes.push_back(e.name);
    for (const MaterialSpec& m : geometry.materials) materials.push_back(m.name);
    if (electrode) spec.electrode = declared_name(*electrode, electrodes, "electrode", materials, "material");
    if (material) spec.material = declared_name(*material, materials, "material", electrodes, "electrode");
  }

  // The name at `entry`, which must be one of `declared` (things of kind `what`). A name of the other
  // kind gets a hint to use the other key.
  std::string declared_name(const Entry& entry, const std::vector<std::string>& declared, const std::string& what,
                            const std::vector<std::string>& others, const std::string& other_what) const {
    const std::string name = text(entry);
    if (std::find(declared.begin(), declared.end(), name) != declared.end()) return name;
    std::string hint = did_you_mean(name, declared);
    if (std::find(others.begin(), others.end(), name) != others.end())
      hint = "`" + name + "` is " + (other_what == "electrode" ? "an " : "a ") + other_what + ": write `" +
             other_what + ": " + name + "`";
    else if (hint.empty())
      hint = declared.empty() ? "Declare it under `" + what + "s:`" : "Declared " + what + "s: " + quoted_list(declared);
    fail(entry, "no " + what + " is called `" + name + "`", hint);
  }

  GroundPlaneSpec read_ground_plane(const std::optional<Entry>& entry) const {
    GroundPlaneSpec plane;
    plane.where = SourceLocation{file_, 0, 0, "ground_plane"};
    if (!entry) return plane;
    plane.present = true;
    plane.where = key_place(*entry);
    if (const auto z = section(*entry).get("z")) plane.z = value(*z);
    return plane;
  }

  DomainSpec read_domain(const std::optional<Entry>& entry, const GeometrySpec& geometry) const {
    DomainSpec domain;
    domain.where = SourceLocation{file_, 0, 0, "domain"};
    if (!entry) return domain;
    domain.where = key_place(*entry);
    const Fields fields = section(*entry);
    const bool box = choice_or(fields.get("outer"), "open") == "box";
    const std::string outer = box ? "box" : "open";
    for (const char* key : box ? std::vector<const char*>{"radius"} : std::vector<const char*>{"r_max", "z", "sides"})
      if (const auto misplaced = fields.get(key))
        fail_at_key(*misplaced, "`" + misplaced->key + "` does not apply to `outer: " + outer + "`",
                    "Remove it, or change `outer`");
    if (!box) {
      if (const auto radius = fields.get("radius")) domain.radius = positive(*radius);
      return domain;
    }
    domain.outer = DomainSpec::Outer::Box;
    domain.r_max = positive(require(fields, "r_max"));
    const Entry z = require(fields, "z");
    std::tie(domain.z_min, domain.z_max) = range(z);
    const GroundPlaneSpec& plane = geometry.ground_plane;
    if (plane.present && std::fabs(domain.z_min - plane.z) > 1e-9 * (domain.z_max - domain.z_min))
      fail(z, "the box bottom is the ground plane at z = " + format_si(plane.z, Kind::Length) + ", but z_min is " +
                  format_si(domain.z_min, Kind::Length),
           "Start `z` at the plane's height, or remove `ground_plane`");
    if (const auto sides = fields.get("sides")) read_box_sides(section(*sides), geometry, domain);
    return domain;
  }

  void read_box_sides(const Fields& sides, const GeometrySpec& geometry, DomainSpec& domain) const {
    if (geometry.ground_plane.present)
      if (const auto bottom = sides.get("bottom"))
        fail_at_key(*bottom, "with a ground plane, the bottom of the box is the plane", "Remove `bottom`");
    std::vector<std::string> fixed;  // electrodes with a fixed potential
    for (const ElectrodeSpec& electrode : geometry.electrodes)
      if (!electrode.floating) fixed.push_back(electrode.name);
    for (const Entry& side : sides.members) {
      const std::string name = text(side);
      if (name == "symmetry") continue;  // BoxSide's default
      if (std::find(fixed.begin(), fixed.end(), name) == fixed.end()) {
        const bool floating = std::any_of(geometry.electrodes.begin(), geometry.electrodes.end(),
                                          [&](const ElectrodeSpec& e) { return e.name == name; });
        const std::string suggestion = did_you_mean(name, fixed);
        fail(side, floating ? "the floating electrode `" + name + "` cannot be a side of the box"
                            : "no electrode is called `" + name + "`",
             !suggestion.empty() && !floating
                 ? suggestion
                 : "A side is `symmetry` or an electrode with a fixed potential" +
                       (fixed.empty() ? std::string() : ": " + quoted_list(fixed)));
      }
      BoxSide& target = side.key == "top" ? domain.top : side.key == "right" ? domain.right : domain.bottom;
      target.electrode = name;
    }
  }

  MeshSpec read_mesh(const std::optional<Entry>& entry) const {
    MeshSpec mesh;
    mesh.where = SourceLocation{file_, 0, 0, "mesh"};
    if (!entry) return mesh;
    mesh.where = key_place(*entry);
    const Fields fields = section(*entry);
    if (const auto order = fields.get("order")) {
      mesh.order = integer(*order);
      mesh.order_given = true;
      if (mesh.order < 1 || mesh.order > 3)
        fail(*order, "the element order must be 1, 2 or 3, got " + std::to_string(mesh.order),
             "Use 2 (curved second-order triangles), or 3 (curved cubic triangles) for the highest accuracy per "
             "unknown on smooth fields");
    }
    if (const auto size = fields.get("surface_size")) mesh.surface_size = positive(*size);
    if (const auto size = fields.get("max_size")) mesh.max_size = positive(*size);
    if (const auto growth = fields.get("growth")) {
      mesh.growth = value(*growth);
      if (!(mesh.growth > 1.0))
        fail(*growth, "growth must be greater than 1, got `" + growth->node.Scalar() + "`",
             "Typical values are 1.1 to 1.5");
    }
    if (const auto limit = fields.get("max_elements")) {
      mesh.max_elements = integer(*limit);
      if (mesh.max_elements < 1)
        fail(*limit, "max_elements must be at least 1, got `" + limit->node.Scalar() + "`",
             "Leave it out for the default of 5000000 triangles");
    }
    if (mesh.surface_size > 0.0 && mesh.max_size > 0.0 && mesh.surface_size > mesh.max_size)
      fail(*fields.get("surface_size"), "surface_size is larger than max_size", "Make surface_size at most max_size");
    if (const auto adapt = fields.get("adapt")) mesh.adapt = read_adapt(*adapt);
    return mesh;
  }

  AdaptSpec read_adapt(const Entry& entry) const {
    AdaptSpec adapt;
    const Fields fields = section(entry);
    if (const auto enabled = fields.get("enabled"))
      adapt.mode = boolean(*enabled) ? AdaptSpec::Mode::On : AdaptSpec::Mode::Off;
    if (const auto tolerance = fields.get("tolerance")) {
      adapt.tolerance = value(*tolerance);
      if (!(adapt.tolerance >= 1e-7 && adapt.tolerance <= 0.1))
        fail(*tolerance, "the tolerance must lie between 1e-7 and 0.1, got `" + tolerance->node.Scalar() + "`",
             "It is a relative change: 0.001 stops at 0.1 %");
    }
    if (const auto steps = fields.get("max_steps")) {
      adapt.max_steps = integer(*steps);
      if (adapt.max_steps < 2 || adapt.max_steps > 30)
        fail(*steps, "max_steps must lie between 2 and 30, got `" + steps->node.Scalar() + "`",
             "Two meshes are the fewest that show a change; 8 is the default");
    }
    return adapt;
  }

  // Something must set the potential: a ground plane or an electrode with a fixed potential (box
  // sides only name such electrodes). Else the solver would find no field to compute.
  void require_fixed_potential(const Fields& top, const GeometrySpec& geometry) const {
    if (geometry.ground_plane.present) return;
    if (std::any_of(geometry.electrodes.begin(), geometry.electrodes.end(),
                    [](const ElectrodeSpec& electrode) { return !electrode.floating; }))
      return;
    const std::optional<Entry> electrodes = top.get("electrodes");
    const std::string problem = "nothing sets the potential: " +
                                std::string(geometry.electrodes.empty() ? "there are no electrodes"
                                                                        : "every electrode is floating") +
                                " and there is no ground plane";
    const std::string hint = "Give an electrode a fixed `potential` (e.g. `potential: 0`) or add `ground_plane: {z: 0}`";
    if (electrodes) fail_at_key(*electrodes, problem, hint);
    throw InputError(SourceLocation{file_, 1, 1, "electrodes"}, problem, hint);
  }

  GasSpec read_gas(const std::optional<Entry>& entry) const {
    GasSpec gas;
    gas.model = "morrow-lowke";
    gas.where = SourceLocation{file_, 0, 0, "gas"};
    if (!entry) return gas;
    gas.where = key_place(*entry);
    const Fields fields = section(*entry);
    gas.name = choice_or(fields.get("name"), "air");
    const auto model = fields.get("model");
    const auto table = fields.get("table");
    if (model && gas.name != "air")
      fail_at_key(*model, "`model` applies only to `name: air`", "Remove `model`");
    gas.model = gas.name == "air" ? choice_or(model, "morrow-lowke") : "";
    if (table && gas.name != "table")
      fail_at_key(*table, "`table` applies only to `name: table`", "Remove `table`, or write `name: table`");
    if (gas.name == "table") gas.table = table_path(require(fields, "table"));
    if (const auto pressure = fields.get("pressure")) gas.pressure_Pa = positive(*pressure);
    if (const auto temperature = fields.get("temperature")) {
      gas.temperature_K = value(*temperature);
      if (!(gas.temperature_K > 0.0))
        fail(*temperature, "the temperature must be above 0 K, got " + format_si(gas.temperature_K, Kind::Temperature),
             "Write e.g. `20 degC` or `293 K`");
    }
    return gas;
  }

  // The gas table's path, relative to the case file's folder; the file must exist.
  std::string table_path(const Entry& entry) const {
    namespace fs = std::filesystem;
    const fs::path given = text(entry);
    const fs::path resolved = given.is_absolute() ? given : fs::path(file_).parent_path() / given;
    if (!fs::is_regular_file(resolved))
      fail(entry, "cannot find the gas table " + resolved.string(),
           "Paths are relative to the folder of the case file");
    return resolved.string();
  }

  OnsetSpec read_onset(const std::optional<Entry>& entry) const {
    OnsetSpec onset;
    onset.where = SourceLocation{file_, 0, 0, "onset"};
    if (!entry) return onset;
    onset.present = true;
    onset.where = key_place(*entry);
    const Fields fields = section(*entry);
    onset.criterion = choice_or(fields.get("criterion"), onset.criterion);
    onset.polarity = choice_or(fields.get("polarity"), onset.polarity);
    if (const auto K = fields.get("K")) onset.K = positive(*K);
    if (const auto gamma = fields.get("gamma")) {
      if (onset.criterion != "townsend")
        fail_at_key(*gamma, "`gamma` applies only to `criterion: townsend`", "Remove `gamma`");
      onset.gamma = value(*gamma);
      if (!(onset.gamma > 0.0 && onset.gamma < 1.0))
        fail(*gamma, "gamma must lie between 0 and 1, got `" + gamma->node.Scalar() + "`",
             "Secondary emission coefficients are small, e.g. `1e-4`");
    }
    if (const auto operating = fields.get("operating")) onset.operating_V = value(*operating);
    if (const auto margin = fields.get("required_margin")) onset.required_margin = positive(*margin);
    if (const auto starts = fields.get("start_points")) {
      onset.start_points = integer(*starts);
      if (onset.start_points < 1 || onset.start_points > 1000000)
        fail(*starts, "the number of start points must lie between 1 and 1000000, got " + std::to_string(onset.start_points),
             "Leave it out to take the start points from the mesh, or write e.g. `5000`");
    }
    return onset;
  }

  OutputSpec read_output(const std::optional<Entry>& entry) const {
    OutputSpec output;
    if (!entry) return output;
    const Fields fields = section(*entry);
    if (const auto dir = fields.get("dir")) output.dir = text(*dir);
    if (const auto vtk = fields.get("vtk")) output.vtk = boolean(*vtk);
    if (const auto csv = fields.get("csv")) output.csv = boolean(*csv);
    if (const auto report = fields.get("report")) output.report = boolean(*report);
    return output;
  }

  const std::string& text_;
  const std::string& file_;
  DefaultUnits units_;
  Variables variables_;
};

}  // namespace

Case parse_case(const std::string& text, const std::string& file_label, const std::vector<std::string>& overrides) {
  return CaseReader(text, file_label).read(overrides);
}

namespace {

// The whole file at `path`. A read error (EIO, a folder) is reported as such rather than read as
// an empty file; a file above kMaxCaseFileBytes is refused.
std::string read_case_text(const std::string& path) {
  const SourceLocation where{path, 0, 0, ""};
  const auto unreadable = [&] {
    return InputError(where, "cannot read the case file", std::string(std::strerror(errno)) + ": check the path and permissions");
  };
  const std::unique_ptr<std::FILE, int (*)(std::FILE*)> file(std::fopen(path.c_str(), "rb"), &std::fclose);
  if (!file) throw unreadable();
  std::string text;
  char buffer[1 << 16];
  while (const std::size_t got = std::fread(buffer, 1, sizeof buffer, file.get())) {
    text.append(buffer, got);
    if (text.size() > kMaxCaseFileBytes)
      throw InputError(where, "the case file is larger than " + std::to_string(kMaxCaseFileBytes >> 20) + " MB",
                       "A case file is a short YAML text; check that this is the right file");
  }
  if (std::ferror(file.get())) throw unreadable();
  return text;
}

}  // namespace

Case read_case(const std::string& path, const std::vector<std::string>& overrides) {
  return parse_case(read_case_text(path), path, overrides);
}

}  // namespace hv
