// summary.json and sweep.json read with yaml-cpp (JSON being YAML 1.2 flow style). Every missing or
// mistyped key is an InputError naming the file and the key path.
#include "tools/case/summary_reader.h"

#include <yaml-cpp/yaml.h>

#include <fstream>
#include <sstream>

namespace hv {

namespace {

constexpr const char* kSummaryFormat = "hvstress-summary/1";
constexpr const char* kSweepFormat = "hvstress-sweep/1";  // optional in sweep.json

// A JSON document with its file name, for the error messages.
class JsonDocument {
 public:
  JsonDocument(const std::string& text, std::string file, const std::string& what) : file_(std::move(file)) {
    try {
      root_ = YAML::Load(text);
    } catch (const YAML::Exception& error) {
      throw InputError(SourceLocation{file_, error.mark.line + 1, error.mark.column + 1, ""},
                       "cannot be read as JSON: " + error.msg, "Give " + what + " as hvstress wrote it");
    }
    if (!root_.IsMap()) fail("", "is not " + what + " (no JSON object at the top level)");
  }

  const YAML::Node& root() const { return root_; }

  [[noreturn]] void fail(const std::string& key_path, const std::string& problem) const {
    throw InputError(SourceLocation{file_, 0, 0, key_path}, problem,
                     "Give the folder of a finished hvstress run or sweep");
  }

  YAML::Node member(const YAML::Node& object, const std::string& key, const std::string& path) const {
    const YAML::Node value = object[key];
    if (!value.IsDefined()) fail(path, "missing");
    return value;
  }

  // The member, or a null node when absent (yaml-cpp 0.7 throws InvalidNode when an absent member's
  // type is asked for, so absent members never leave this class).
  YAML::Node optional_member(const YAML::Node& object, const std::string& key) const {
    if (!object.IsMap()) return YAML::Node();
    const YAML::Node value = object[key];
    return value.IsDefined() ? value : YAML::Node();
  }

  // A number; JSON null (how non-finite values are written) gives NaN.
  double number(const YAML::Node& node, const std::string& path) const {
    if (node.IsNull()) return NAN;
    try {
      if (node.IsScalar()) return node.as<double>();
    } catch (const YAML::BadConversion&) {
    }
    fail(path, "expected a number");
  }

  std::string text(const YAML::Node& node, const std::string& path) const {
    if (node.IsNull()) return "";
    if (!node.IsScalar()) fail(path, "expected a text");
    return node.Scalar();
  }

  bool boolean(const YAML::Node& node, const std::string& path) const {
    try {
      if (node.IsScalar()) return node.as<bool>();
    } catch (const YAML::BadConversion&) {
    }
    fail(path, "expected true or false");
  }

  // [r, z]; null (an inception not found) gives the origin.
  Point point(const YAML::Node& node, const std::string& path) const {
    if (node.IsNull()) return {};
    if (!node.IsSequence() || node.size() != 2) fail(path, "expected [r, z]");
    return {number(node[0], path + "[0]"), number(node[1], path + "[1]")};
  }

  const YAML::Node& map(const YAML::Node& node, const std::string& path) const {
    if (!node.IsMap()) fail(path, "expected a JSON object");
    return node;
  }

 private:
  std::string file_;
  YAML::Node root_;
};

std::string read_text_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(SourceLocation{path, 0, 0, ""}, "cannot be opened", "Check the path");
  std::stringstream text;
  text << in.rdbuf();
  return text.str();
}

std::vector<Parameter> read_parameters(const JsonDocument& json) {
  const YAML::Node values = json.map(json.member(json.root(), "parameters", "parameters"), "parameters");
  const YAML::Node units = json.optional_member(json.root(), "parameter_units");
  std::vector<Parameter> parameters;
  for (const auto& item : values) {
    const std::string name = item.first.Scalar();
    const YAML::Node unit_node = json.optional_member(units, name);
    const std::string unit = unit_node.IsScalar() ? unit_node.Scalar() : "";
    parameters.push_back({name, json.number(item.second, "parameters." + name), unit});
  }
  return parameters;
}

SummaryElectrode read_electrode(const JsonDocument& json, const std::string& name, const YAML::Node& node) {
  const std::string path = "electrodes." + name;
  json.map(node, path);
  SummaryElectrode electrode;
  electrode.name = name;
  electrode.max_field_V_per_m = json.number(json.member(node, "max_field_V_per_m", path + ".max_field_V_per_m"),
                                            path + ".max_field_V_per_m");
  electrode.max_field_at = json.point(json.member(node, "max_field_at_m", path + ".max_field_at_m"),
                                      path + ".max_field_at_m");
  electrode.max_gas_field_V_per_m =
      json.number(json.optional_member(node, "max_gas_field_V_per_m"), path + ".max_gas_field_V_per_m");
  electrode.max_gas_field_at = json.point(json.optional_member(node, "max_gas_field_at_m"), path + ".max_gas_field_at_m");
  return electrode;
}

// The electrodes in the order of capacitance_order (JSON objects have no order of their own).
std::vector<SummaryElectrode> read_electrodes(const JsonDocument& json) {
  const YAML::Node electrodes = json.map(json.member(json.root(), "electrodes", "electrodes"), "electrodes");
  const YAML::Node order = json.optional_member(json.root(), "capacitance_order");
  std::vector<SummaryElectrode> out;
  if (order.IsSequence()) {
    for (size_t i = 0; i < order.size(); ++i) {
      const std::string name = json.text(order[i], "capacitance_order[" + std::to_string(i) + "]");
      out.push_back(read_electrode(json, name, json.member(electrodes, name, "electrodes." + name)));
    }
  } else {
    for (const auto& item : electrodes) out.push_back(read_electrode(json, item.first.Scalar(), item.second));
  }
  return out;
}

std::vector<std::vector<double>> read_capacitance(const JsonDocument& json, size_t electrode_count) {
  const YAML::Node rows = json.member(json.root(), "capacitance_matrix_F", "capacitance_matrix_F");
  if (!rows.IsSequence() || rows.size() != electrode_count)
    json.fail("capacitance_matrix_F", "expected one row per electrode");
  std::vector<std::vector<double>> matrix;
  for (size_t i = 0; i < rows.size(); ++i) {
    const std::string path = "capacitance_matrix_F[" + std::to_string(i) + "]";
    if (!rows[i].IsSequence() || rows[i].size() != electrode_count) json.fail(path, "expected one value per electrode");
    std::vector<double> row;
    for (size_t j = 0; j < rows[i].size(); ++j) row.push_back(json.number(rows[i][j], path + "[" + std::to_string(j) + "]"));
    matrix.push_back(row);
  }
  return matrix;
}

SummaryOnset read_onset(const JsonDocument& json) {
  SummaryOnset onset;
  const YAML::Node node = json.optional_member(json.root(), "onset");
  if (node.IsNull()) return onset;
  json.map(node, "onset");
  onset.evaluated = true;
  onset.electrode = json.text(json.member(node, "electrode", "onset.electrode"), "onset.electrode");
  onset.inception_V = json.number(json.member(node, "inception_voltage_V", "onset.inception_voltage_V"),
                                  "onset.inception_voltage_V");
  const YAML::Node found = json.optional_member(node, "inception_found");
  onset.inception_found = found.IsNull() ? std::isfinite(onset.inception_V) : json.boolean(found, "onset.inception_found");
  onset.margin = json.number(json.member(node, "margin", "onset.margin"), "onset.margin");
  onset.required_margin = json.number(json.optional_member(node, "required_margin"), "onset.required_margin");
  const YAML::Node meets = json.optional_member(node, "meets_required_margin");
  if (!meets.IsNull()) onset.meets_required_margin = json.boolean(meets, "onset.meets_required_margin");
  return onset;
}

}  // namespace

double RunSummary::parameter(const std::string& name) const {
  for (const Parameter& parameter : parameters)
    if (parameter.name == name) return parameter.value;
  return NAN;
}

RunSummary parse_summary(const std::string& text, const std::string& file_label) {
  const JsonDocument json(text, file_label, "an hvstress summary.json");
  const YAML::Node format = json.optional_member(json.root(), "format");
  if (!format.IsScalar() || format.Scalar() != kSummaryFormat)
    json.fail("format", std::string("is not an hvstress summary (expected \"format\": \"") + kSummaryFormat + "\")");
  RunSummary summary;
  summary.file = file_label;
  summary.title = json.text(json.member(json.root(), "title", "title"), "title");
  summary.parameters = read_parameters(json);
  summary.electrodes = read_electrodes(json);
  const YAML::Node max_field = json.map(json.member(json.root(), "max_field", "max_field"), "max_field");
  summary.max_field_V_per_m = json.number(json.member(max_field, "V_per_m", "max_field.V_per_m"), "max_field.V_per_m");
  summary.max_field_electrode = json.text(json.member(max_field, "electrode", "max_field.electrode"), "max_field.electrode");
  summary.max_field_at = json.point(json.member(max_field, "at_m", "max_field.at_m"), "max_field.at_m");
  summary.capacitance_F = read_capacitance(json, summary.electrodes.size());
  summary.onset = read_onset(json);
  return summary;
}

RunSummary read_summary(const std::string& path) { return parse_summary(read_text_file(path), path); }

SweepIndex read_sweep_index(const std::string& path) {
  const JsonDocument json(read_text_file(path), path, "an hvstress sweep.json");
  const YAML::Node format = json.optional_member(json.root(), "format");
  if (!format.IsNull() && (!format.IsScalar() || format.Scalar() != kSweepFormat))
    json.fail("format", std::string("is not an hvstress sweep (expected \"format\": \"") + kSweepFormat + "\")");
  SweepIndex sweep;
  sweep.file = path;
  sweep.case_file = json.text(json.member(json.root(), "case", "case"), "case");
  const YAML::Node varied = json.member(json.root(), "varied", "varied");
  if (!varied.IsSequence()) json.fail("varied", "expected a list of parameter names");
  for (size_t i = 0; i < varied.size(); ++i) sweep.varied.push_back(json.text(varied[i], "varied[" + std::to_string(i) + "]"));
  const YAML::Node variants = json.member(json.root(), "variants", "variants");
  if (!variants.IsSequence()) json.fail("variants", "expected a list of variants");
  for (size_t i = 0; i < variants.size(); ++i) {
    const std::string path_i = "variants[" + std::to_string(i) + "]";
    const YAML::Node node = json.map(variants[i], path_i);
    SweepVariant variant;
    variant.index = static_cast<int>(json.number(json.member(node, "index", path_i + ".index"), path_i + ".index"));
    const YAML::Node settings = json.map(json.member(node, "settings", path_i + ".settings"), path_i + ".settings");
    for (const std::string& name : sweep.varied)
      variant.settings.emplace_back(name, json.text(json.member(settings, name, path_i + ".settings." + name),
                                                    path_i + ".settings." + name));
    variant.folder = json.text(json.member(node, "folder", path_i + ".folder"), path_i + ".folder");
    const std::string status = json.text(json.member(node, "status", path_i + ".status"), path_i + ".status");
    if (status != "finished" && status != "failed") json.fail(path_i + ".status", "expected \"finished\" or \"failed\"");
    variant.finished = status == "finished";
    variant.message = json.text(json.optional_member(node, "message"), path_i + ".message");
    sweep.variants.push_back(variant);
  }
  return sweep;
}

}  // namespace hv
