#include "tools/case/case_keys.h"

#include <stdexcept>

namespace hv {

const std::vector<CaseKey>& case_keys() {
  using T = KeyType;
  using K = Kind;
  static const std::vector<CaseKey> keys = {
      {"hvstress", T::Integer, K::Number, "required", "format version of the case file: 1"},
      {"title", T::Text, K::Number, "empty", "title of the design, shown in the report"},

      {"units", T::Section, K::Number, "SI", "units that bare numbers take, by kind"},
      {"units.length", T::UnitName, K::Length, "m", "unit of bare lengths"},
      {"units.voltage", T::UnitName, K::Voltage, "V", "unit of bare voltages"},
      {"units.field", T::UnitName, K::Field, "V/m", "unit of bare electric fields"},
      {"units.pressure", T::UnitName, K::Pressure, "Pa", "unit of bare pressures"},
      {"units.temperature", T::UnitName, K::Temperature, "K", "unit of bare temperatures"},

      {"parameters", T::Names, K::Number, "none",
       "named values in file order; each may use earlier ones; `--set NAME=VALUE` replaces one"},
      {"parameters.<name>", T::Expression, K::Number, "required",
       "a value with any unit, or an expression; a bare number stays a pure number"},

      {"materials", T::Names, K::Number, "none", "the dielectrics, by name"},
      {"materials.<name>", T::Section, K::Number, "required", "one dielectric"},
      {"materials.<name>.permittivity", T::Value, K::Number, "required", "relative permittivity, at least 1"},

      {"electrodes", T::Names, K::Number, "none", "the conductors, by name"},
      {"electrodes.<name>", T::Section, K::Number, "required",
       "one conductor: give `potential` or `floating: true`"},
      {"electrodes.<name>.potential", T::Value, K::Voltage, "required unless floating", "fixed potential"},
      {"electrodes.<name>.floating", T::Boolean, K::Number, "false",
       "isolated metal: unknown potential, zero net charge"},

      {"shapes", T::List, K::Number, "required",
       "the shapes in painting order: a later shape overrides an earlier one where they overlap"},
      {"shapes[]", T::Section, K::Number, "required",
       "one shape: one outline (`rect`, `circle`, `polygon` or `path`) and `electrode` or `material`"},
      {"shapes[].name", T::Text, K::Number, "its key path, e.g. shapes[2]", "name of the shape in messages"},
      {"shapes[].electrode", T::Text, K::Number, "none", "the electrode this shape belongs to"},
      {"shapes[].material", T::Text, K::Number, "none", "the material this shape is made of"},
      {"shapes[].rect", T::Section, K::Number, "none", "rectangle outline"},
      {"shapes[].rect.r", T::Range, K::Length, "required", "radial extent [r0, r1], r0 < r1"},
      {"shapes[].rect.z", T::Range, K::Length, "required", "axial extent [z0, z1], z0 < z1"},
      {"shapes[].rect.round", T::Value, K::Length, "0", "radius of every corner off the axis (0: sharp)"},
      {"shapes[].circle", T::Section, K::Number, "none", "circle outline: a sphere on the axis, a torus off it"},
      {"shapes[].circle.center", T::Point, K::Length, "required", "centre"},
      {"shapes[].circle.radius", T::Value, K::Length, "required", "radius, greater than 0"},
      {"shapes[].polygon", T::Section, K::Number, "none", "closed polygon outline"},
      {"shapes[].polygon.points", T::PointList, K::Length, "required",
       "at least 3 corners; the last joins the first"},
      {"shapes[].polygon.points[]", T::Point, K::Length, "required", "one corner"},
      {"shapes[].polygon.round", T::Value, K::Length, "0", "radius of every corner off the axis (0: sharp)"},
      {"shapes[].path", T::Section, K::Number, "none",
       "outline of lines and arcs; closed by returning to its start or by the axis"},
      {"shapes[].path.start", T::Point, K::Length, "required", "first point"},
      {"shapes[].path.segments", T::List, K::Number, "required", "the pieces, in order of travel"},
      {"shapes[].path.segments[]", T::Section, K::Number, "required", "one piece: `line` or `arc`"},
      {"shapes[].path.segments[].line", T::Point, K::Length, "none", "straight line to this point"},
      {"shapes[].path.segments[].arc", T::Section, K::Number, "none", "circular arc"},
      {"shapes[].path.segments[].arc.to", T::Point, K::Length, "required", "end point of the arc"},
      {"shapes[].path.segments[].arc.radius", T::Value, K::Length, "required",
       "signed radius: positive bulges to the left of travel, negative to the right"},

      {"ground_plane", T::Section, K::Number, "none", "an infinite grounded plane; the domain lies above it"},
      {"ground_plane.z", T::Value, K::Length, "0", "height of the plane"},

      {"domain", T::Section, K::Number, "open", "the region that is solved"},
      {"domain.outer", T::Choice, K::Number, "open",
       "open: far-field condition on a half circle; box: a rectangle with given sides",
       {"open", "box"}},
      {"domain.radius", T::Value, K::Length, "5 x model extent", "open: radius of the half circle"},
      {"domain.r_max", T::Value, K::Length, "required for box", "box: right side"},
      {"domain.z", T::Range, K::Length, "required for box",
       "box: [z_min, z_max]; with a ground plane, z_min is the plane's z"},
      {"domain.sides", T::Section, K::Number, "symmetry", "box: what each side is"},
      {"domain.sides.top", T::Text, K::Number, "symmetry",
       "an electrode with a fixed potential, or `symmetry` (zero normal field)"},
      {"domain.sides.right", T::Text, K::Number, "symmetry",
       "an electrode with a fixed potential, or `symmetry` (zero normal field)"},
      {"domain.sides.bottom", T::Text, K::Number, "symmetry",
       "as top; not allowed with a ground plane, which is the bottom"},

      {"mesh", T::Section, K::Number, "automatic", "mesh controls"},
      {"mesh.order", T::Integer, K::Number, "2 (adaptive: 2, or 3 at tolerances of 1e-5 and below)", "1: straight 3-node triangles, 2: curved 6-node triangles, 3: curved 10-node triangles"},
      {"mesh.surface_size", T::Value, K::Length, "60 per turn of curvature",
       "element size on electrode surfaces (default: 60 elements per full turn of the smallest radius, or 1/8 of the shorter side of a straight-edged electrode)"},
      {"mesh.max_size", T::Value, K::Length, "domain size / 10",
       "largest element anywhere (default: a tenth of the open radius or of the box's longer side)"},
      {"mesh.growth", T::Value, K::Number, "1.3", "largest size ratio of neighbouring elements, above 1"},
      {"mesh.max_elements", T::Integer, K::Number, "5000000",
       "refuse to mesh when the sizes call for more triangles than this (an estimate, checked before meshing)"},
      {"mesh.adapt", T::Section, K::Number, "on unless a size is given",
       "adaptive refinement from an error estimate until the results stop changing"},
      {"mesh.adapt.enabled", T::Boolean, K::Number, "true unless surface_size or max_size is given",
       "refine adaptively (true) or mesh once with the given sizes (false)"},
      {"mesh.adapt.tolerance", T::Value, K::Number, "0.001",
       "stop when each electrode's maximum field and the inception voltage change by less than this fraction"},
      {"mesh.adapt.max_steps", T::Integer, K::Number, "8", "most meshes solved, at least 2"},

      {"gas", T::Section, K::Number, "air", "the insulating gas around the shapes"},
      {"gas.name", T::Choice, K::Number, "air", "the gas; `table` reads its coefficients from a file",
       {"air", "sf6", "table"}},
      {"gas.model", T::Choice, K::Number, "morrow-lowke", "air only: the ionization model",
       {"morrow-lowke", "quadratic"}},
      {"gas.table", T::Text, K::Number, "required for table", "CSV file, relative to the case file's folder"},
      {"gas.pressure", T::Value, K::Pressure, "101.325 kPa", "gas pressure, greater than 0"},
      {"gas.temperature", T::Value, K::Temperature, "20 degC", "gas temperature, above 0 K"},

      {"onset", T::Section, K::Number, "none", "the discharge-onset evaluation; absent: not evaluated"},
      {"onset.criterion", T::Choice, K::Number, "streamer", "onset criterion", {"streamer", "townsend"}},
      {"onset.K", T::Value, K::Number, "per gas", "critical ionization integral, greater than 0"},
      {"onset.gamma", T::Value, K::Number, "per gas", "townsend only: secondary emission coefficient, in (0, 1)"},
      {"onset.polarity", T::Choice, K::Number, "positive", "polarity of the stressed electrodes",
       {"positive", "negative", "both"}},
      {"onset.operating", T::Value, K::Voltage, "highest fixed potential", "the voltage the margin refers to"},
      {"onset.required_margin", T::Value, K::Number, "none",
       "least inception margin; `run` exits with 3 below it"},
      {"onset.start_points", T::Integer, K::Number, "from the mesh",
       "at least this many field-line start points on the electrodes in all"},

      {"output", T::Section, K::Number, "all on", "what `run` writes"},
      {"output.dir", T::Text, K::Number, "out", "output folder, relative to the current folder"},
      {"output.vtk", T::Boolean, K::Number, "true", "write field.vtu and surfaces.vtp"},
      {"output.csv", T::Boolean, K::Number, "true", "write surface-field.csv"},
      {"output.report", T::Boolean, K::Number, "true", "write report.md"},
  };
  return keys;
}

const CaseKey& case_key(const std::string& path) {
  for (const CaseKey& key : case_keys())
    if (key.path == path) return key;
  // A programmer error, but thrown rather than asserted: release builds (the tests too) would
  // otherwise go on with a wrong key.
  throw std::logic_error("the case key table lacks " + path);
}

std::vector<std::string> child_names(const std::string& parent) {
  const std::string prefix = parent.empty() ? "" : parent + ".";
  std::vector<std::string> names;
  for (const CaseKey& key : case_keys()) {
    if (key.path.compare(0, prefix.size(), prefix) != 0) continue;
    const std::string rest = key.path.substr(prefix.size());
    if (!rest.empty() && rest.find_first_of(".[") == std::string::npos) names.push_back(rest);
  }
  return names;
}

std::string type_label(const CaseKey& key) {
  switch (key.type) {
    case KeyType::Section: return "map";
    case KeyType::Names: return "map of names";
    case KeyType::List: return "list";
    case KeyType::Value:
    case KeyType::Expression: return "number";
    case KeyType::Integer: return "integer";
    case KeyType::Text: return "text";
    case KeyType::Boolean: return "true or false";
    case KeyType::UnitName: return "unit";
    case KeyType::Point: return "[r, z]";
    case KeyType::Range: return "[low, high]";
    case KeyType::PointList: return "list of [r, z]";
    case KeyType::Choice: {
      std::string label;
      for (std::size_t i = 0; i < key.choices.size(); ++i)
        label += (i == 0 ? "" : i + 1 == key.choices.size() ? " or " : ", ") + ("`" + key.choices[i] + "`");
      return label;
    }
  }
  return "";
}

std::string kind_label(const CaseKey& key) {
  if (key.type == KeyType::Expression) return "any";
  if (key.type == KeyType::Point || key.type == KeyType::PointList) return "length";
  const bool measures = key.type == KeyType::Value || key.type == KeyType::Range || key.type == KeyType::UnitName;
  if (!measures) return "-";
  return key.kind == Kind::Number ? "pure number" : kind_key(key.kind);
}

}  // namespace hv
