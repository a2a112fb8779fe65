#include "lapwing/io/car_file.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>

#include "lapwing/base/units.hpp"
#include "lapwing/io/document.hpp"

namespace lapwing {

// The reader takes the file's keys, units and forms; the values' rules are Car::validate's (and
// its parts'), called as soon as what they need is read, so that an error is the one a reader
// of the file meets first. Each violation is mapped back to its place by the source map.

namespace {

// A violation of the part of the car under `prefix` is the file's error there.
struct Checker {
  const SourceMap& sources;
  void operator()(std::optional<Violation> v, std::string_view prefix = {}) const {
    if (v) throw sources.error(v->under(prefix));
  }
};

void check_format(Reader& r) {
  const Node& n = r.require("format");
  double v = r.node_quantity(n, Quantity::number, "format");
  if (v != 1.0)
    r.fail(n, "unsupported format " + n.scalar + " (this lapwing reads format 1)", "format");
}

Tyres read_tyres(Reader r) {
  r.keys({"mu_long", "mu_lat", "nominal_load", "load_sensitivity", "ellipse_exponent",
          "rolling_radius", "rolling_resistance"});
  Tyres t;
  t.mu_long = r.quantity("mu_long", Quantity::number);
  t.mu_lat = r.quantity("mu_lat", Quantity::number);
  t.nominal_load_n = r.quantity("nominal_load", Quantity::force);
  t.load_sensitivity = r.quantity_or("load_sensitivity", Quantity::number, 0.0);
  t.ellipse_exponent = r.quantity_or("ellipse_exponent", Quantity::number, 2.0);
  t.rolling_radius_m = r.quantity("rolling_radius", Quantity::length);
  t.rolling_resistance = r.quantity_or("rolling_resistance", Quantity::number, 0.0);
  r.finish();
  return t;
}

// A curve {rpm: [...], <value>: [...]}.
void read_curve(Reader c, const char* value_key, Quantity q, std::vector<double>& radps,
                std::vector<double>& values) {
  radps = c.quantities("rpm", Quantity::engine_speed);
  values = c.quantities(value_key, q);
  c.finish();
}

Powertrain read_powertrain(Reader r, SourceMap& sources) {
  Powertrain p;
  const bool has_torque = r.has("torque_curve"), has_power = r.has("power_curve"),
             has_const = r.has("constant_power");
  if (int(has_torque) + int(has_power) + int(has_const) != 1)
    r.fail(r.node(), "give exactly one of torque_curve, power_curve, constant_power");
  if (has_const) {
    p.ideal = true;
    p.constant_power_w = r.quantity("constant_power", Quantity::power);
    for (const char* k : {"gears", "final_drive", "rev_limit", "shift_time"})
      if (const Node* n = r.get(k))
        r.fail(*n,
               std::string("'") + k + "' does not apply with constant_power (ideal transmission)",
               k);
  } else {
    if (has_torque) {
      read_curve(r.map("torque_curve"), "torque", Quantity::torque, p.engine_radps, p.torque_nm);
    } else {
      std::vector<double> power;
      read_curve(r.map("power_curve"), "power", Quantity::power, p.engine_radps, power);
      // torque = power / engine speed; the model's rules on torque are the file's on power
      // (a positive engine speed keeps the sign), at the power curve's keys.
      const std::size_t n = p.engine_radps.size();
      p.torque_nm.resize(power.size());
      for (std::size_t i = 0; i < power.size(); ++i)
        p.torque_nm[i] = n ? power[i] / p.engine_radps[std::min(i, n - 1)] : power[i];
      sources.alias("powertrain.torque_curve", "powertrain.power_curve");
      sources.alias("powertrain.torque_curve.torque", "powertrain.power_curve.power");
    }
    const double last = p.engine_radps.empty() ? 0.0 : p.engine_radps.back();
    p.rev_limit_radps = r.quantity_or("rev_limit", Quantity::engine_speed, last);
    p.gears = r.quantities("gears", Quantity::number);
    p.final_drive = r.quantity("final_drive", Quantity::number);
    p.shift_time_s = r.quantity_or("shift_time", Quantity::time, 0.0);
  }
  p.efficiency = r.quantity_or("efficiency", Quantity::fraction, 1.0);
  const std::string aspiration = r.choice("aspiration", {"fixed", "natural", "turbo"}, "fixed");
  p.aspiration = aspiration == "natural" ? Aspiration::natural
                 : aspiration == "turbo" ? Aspiration::turbo
                                         : Aspiration::fixed;
  p.full_power_altitude_m = r.optional_quantity("full_power_altitude", Quantity::length);
  const std::string axle = r.choice("driven_axle", {"rear", "front", "all"}, "rear");
  p.driven = axle == "rear"    ? DrivenAxle::rear
             : axle == "front" ? DrivenAxle::front
                               : DrivenAxle::all;
  r.finish();
  return p;
}

void read_speed_table(Reader t, AeroConfig& c) {
  c.speed_mps = t.quantities("speed", Quantity::speed);
  c.cda_m2 = t.quantities("cda", Quantity::area);
  c.cla_m2 = t.quantities("cla", Quantity::area);
  c.balance = t.quantities("balance", Quantity::fraction);
  t.finish();
}

PartsTable read_forces(Reader f) {
  PartsTable table;
  table.speed_mps = f.quantity("speed", Quantity::speed);
  table.density_kg_m3 = f.quantity("density", Quantity::number);
  const Node& list = f.require("parts");
  if (list.kind != Node::Kind::sequence || list.items.empty())
    f.fail(list, "expected a non-empty list of parts", "parts");
  for (std::size_t i = 0; i < list.items.size(); ++i) {
    Reader p(f.doc(), list.items[i], f.child_path("parts") + "[" + std::to_string(i) + "]");
    p.keys({"name", "drag", "downforce", "x", "z"});
    AeroPart part;
    part.name = p.string_or("name", "part " + std::to_string(i + 1));
    part.drag_n = p.quantity("drag", Quantity::force);
    part.downforce_n = p.quantity("downforce", Quantity::force);
    part.x_m = p.quantity("x", Quantity::length);
    part.z_m = p.quantity("z", Quantity::length);
    p.finish();
    table.parts.push_back(part);
  }
  f.finish();
  return table;
}

// A grid of the ride-height map: a list of rows, one per front height, each with one value per
// rear height (a ragged table is no matrix: its rows are checked here; the rest is the map's
// validate()).
MapGrid read_grid(Reader& m, std::string_view key, std::size_t cols) {
  const Node& g = m.require(key);
  const std::string path = m.child_path(key);
  if (g.kind != Node::Kind::sequence)
    m.fail(g, "expected a list of rows, one per front ride height", key);
  MapGrid out(g.items.size(), cols);
  for (std::size_t i = 0; i < g.items.size(); ++i) {
    const Node& row = g.items[i];
    const std::string rp = path + "[" + std::to_string(i) + "]";
    if (row.kind != Node::Kind::sequence || row.items.size() != cols)
      throw InputError(m.doc().file, row.mark,
                       "columns differ from rear: expected " + std::to_string(cols) + ", got " +
                           std::to_string(row.kind == Node::Kind::sequence ? row.items.size() : 0),
                       rp);
    for (std::size_t j = 0; j < cols; ++j)
      out(i, j) =
          m.node_quantity(row.items[j], Quantity::number, rp + "[" + std::to_string(j) + "]");
  }
  return out;
}

RideHeightMap read_ride_height_map(Reader& c, Reader m, const Checker& check) {
  RideHeightMap map;
  map.front_m = m.quantities("front", Quantity::length);
  map.rear_m = m.quantities("rear", Quantity::length);
  check(map.validate_axes(), c.path());  // the grids' rows follow the axes
  map.cda_m2 = read_grid(m, "cda", map.rear_m.size());
  map.cla_m2 = read_grid(m, "cla", map.rear_m.size());
  map.balance = read_grid(m, "balance", map.rear_m.size());
  m.finish();
  {
    Reader s = c.map("static_ride_height");
    s.keys({"front", "rear"});
    map.static_front_m = s.quantity("front", Quantity::length);
    map.static_rear_m = s.quantity("rear", Quantity::length);
    s.finish();
  }
  {
    Reader k = c.map("heave_stiffness");
    k.keys({"front", "rear"});
    map.stiffness_front_npm = k.quantity("front", Quantity::stiffness);
    map.stiffness_rear_npm = k.quantity("rear", Quantity::stiffness);
    k.finish();
  }
  return map;
}

StraightTrim read_trim(Reader t) {
  t.keys({"cda", "cla", "balance", "below_curvature"});
  StraightTrim s;
  s.dcda_m2 = t.quantity_or("cda", Quantity::area, 0.0);
  s.dcla_m2 = t.quantity_or("cla", Quantity::area, 0.0);
  s.dbalance = t.quantity_or("balance", Quantity::number, 0.0);
  // A curvature in 1/m, or given as the radius above which the car counts as on a straight.
  s.below_curvature_1pm = t.quantity("below_curvature", Quantity::number);
  t.finish();
  return s;
}

// One config; `wheelbase_m` is valid (the car-level values are checked before the configs).
AeroConfig read_config(const std::string& name, Reader r, double wheelbase_m,
                       const Checker& check) {
  AeroConfig c;
  c.name = name;
  r.keys({"cda", "cla", "balance", "speed_table", "forces", "ride_height_map", "static_ride_height",
          "heave_stiffness", "straight_trim", "mass", "inertia_factor", "cg_height", "front_weight",
          "drag_height"});
  const int forms = int(r.has("cda") || r.has("cla") || r.has("balance")) +
                    int(r.has("speed_table")) + int(r.has("forces")) +
                    int(r.has("ride_height_map"));
  if (forms != 1)
    r.fail(r.node(),
           "give exactly one of {cda, cla, balance}, speed_table, forces, ride_height_map");
  if (r.has("speed_table")) {
    c.form = AeroConfig::Form::speed_table;
    read_speed_table(r.map("speed_table"), c);
  } else if (r.has("forces")) {
    c.form = AeroConfig::Form::forces;
    if (const Node* n = r.get("drag_height"))
      r.fail(*n, "drag_height comes from the parts' z with forces", "drag_height");
    const PartsTable table = read_forces(r.map("forces"));
    check(table.validate(), r.child_path("forces"));
    c.parts = table;
    const PartsReduction red =
        reduce_parts(table.parts, table.speed_mps, table.density_kg_m3, wheelbase_m);
    c.cda_m2 = {red.cda_m2};
    c.cla_m2 = {red.cla_m2};
    c.balance = {red.balance};
    c.drag_height_m = red.drag_height_m;
  } else if (r.has("ride_height_map")) {
    c.form = AeroConfig::Form::ride_height_map;
    RideHeightMap map = read_ride_height_map(r, r.map("ride_height_map"), check);
    check(map.validate(), r.path());
    // The coefficients at rest stand for the config where one number is asked for (check).
    const MapCoefficients at_rest = map_coefficients(map, map.static_front_m, map.static_rear_m);
    c.cda_m2 = {at_rest.cda_m2};
    c.cla_m2 = {at_rest.cla_m2};
    c.balance = {at_rest.balance};
    c.map = std::move(map);
  } else {
    c.cda_m2 = {r.quantity("cda", Quantity::area)};
    c.cla_m2 = {r.quantity("cla", Quantity::area)};
    c.balance = {r.quantity("balance", Quantity::fraction)};
  }
  if (!c.map)
    for (const char* k : {"static_ride_height", "heave_stiffness"})
      if (const Node* n = r.get(k)) r.fail(*n, std::string(k) + " goes with ride_height_map", k);
  if (r.has("straight_trim")) c.trim = read_trim(r.map("straight_trim"));
  c.mass_kg = r.optional_quantity("mass", Quantity::mass);
  c.inertia_factor = r.optional_quantity("inertia_factor", Quantity::number);
  c.cg_height_m = r.optional_quantity("cg_height", Quantity::length);
  c.front_weight = r.optional_quantity("front_weight", Quantity::fraction);
  if (c.form != AeroConfig::Form::forces)
    c.drag_height_m = r.optional_quantity("drag_height", Quantity::length);
  r.finish();
  return c;
}

// track_width: {front, rear}, roll_stiffness_front, roll_centre_height: {front, rear}: all of
// the first two or neither (then no lateral load transfer); the roll centres default to the
// ground and need the other two. The values' rules are RollGeometry::validate's.
std::optional<RollGeometry> read_roll(Reader& r) {
  const Node* width = r.get("track_width");
  const Node* stiffness = r.get("roll_stiffness_front");
  const Node* centres = r.get("roll_centre_height");
  if (!width && !stiffness) {
    if (centres)
      r.fail(*centres, "roll_centre_height goes with track_width and roll_stiffness_front",
             "roll_centre_height");
    return std::nullopt;
  }
  if (!width || !stiffness)
    r.fail(width ? *width : *stiffness,
           "give track_width and roll_stiffness_front together (lateral load transfer needs "
           "both; without either there is none)",
           width ? "track_width" : "roll_stiffness_front");
  RollGeometry g;
  {
    Reader t = r.map("track_width");
    t.keys({"front", "rear"});
    g.track_front_m = t.quantity("front", Quantity::length);
    g.track_rear_m = t.quantity("rear", Quantity::length);
    t.finish();
  }
  g.roll_stiffness_front = r.quantity("roll_stiffness_front", Quantity::fraction);
  if (centres) {
    Reader c = r.map("roll_centre_height");
    c.keys({"front", "rear"});
    g.roll_centre_front_m = c.quantity_or("front", Quantity::length, 0.0);
    g.roll_centre_rear_m = c.quantity_or("rear", Quantity::length, 0.0);
    c.finish();
  }
  return g;
}

// aero.families (README, "Wing families"): each family becomes one more config, named after it,
// blended from its measured configs at its setting `at`.
void read_families(Reader families, Car& car, const Checker& check) {
  const std::size_t measured = car.configs.size();
  for (std::size_t i = 0; i < families.node().entries.size(); ++i) {
    const auto& [name, node] = families.node().entries[i];
    families.get(name);
    const std::string path = "aero.families." + name;
    if (!is_config_name(name))
      throw InputError(families.doc().file, families.node().key_marks[i],
                       "family name '" + name + "' must use letters, digits, '_' or '-' only",
                       path);
    if (car.config_index(name) >= 0)
      throw InputError(families.doc().file, families.node().key_marks[i],
                       "family '" + name + "' has the name of a config (it adds a config so named)",
                       path);
    Reader f(families.doc(), node, path);
    f.keys({"setting", "configs", "at"});
    AeroFamily fam;
    fam.name = name;
    fam.setting_rad = f.quantities("setting", Quantity::angle);
    const Node& list = f.require("configs");
    if (list.kind != Node::Kind::sequence)
      f.fail(list, "expected a list of config names, one per setting", "configs");
    for (std::size_t k = 0; k < list.items.size(); ++k) {
      const std::string item_path = f.child_path("configs") + "[" + std::to_string(k) + "]";
      const std::string config = f.node_string(list.items[k], item_path);
      const int index = car.config_index(config);
      if (index < 0 || static_cast<std::size_t>(index) >= measured) {
        std::vector<std::string> names;
        for (std::size_t c = 0; c < measured; ++c) names.push_back(car.configs[c].name);
        const std::string near = closest(config, names);
        throw InputError(families.doc().file, list.items[k].mark,
                         "no config named '" + config + "'" +
                             (near.empty() ? "" : "; did you mean '" + near + "'?"),
                         item_path);
      }
      fam.configs.push_back(static_cast<std::size_t>(index));
      if (k > 0)
        if (const auto why =
                blend_mismatch(car.configs[fam.configs[k - 1]], car.configs[fam.configs[k]]))
          throw InputError(families.doc().file, list.items[k].mark, "cannot blend: " + *why,
                           item_path);
    }
    fam.at_rad = f.quantity_or("at", Quantity::angle,
                               fam.setting_rad.empty() ? 0.0 : fam.setting_rad.front());
    f.finish();
    check(fam.validate(), path);
    car.configs.push_back(family_config(fam, car.configs, car.wheelbase_m));
    check(car.validate_config(car.configs.size() - 1));
  }
  families.finish();
}

// balance_window: {front_share: [min, max], above: speed}. The form (two shares) is the
// reader's; the values' rules are BalanceWindow::validate's.
BalanceWindow read_balance_window(Reader w) {
  w.keys({"front_share", "above"});
  BalanceWindow b;
  const std::vector<double> share = w.quantities("front_share", Quantity::fraction);
  if (share.size() != 2)
    w.fail(*w.node().find("front_share"),
           "expected 2 values [min, max], got " + std::to_string(share.size()), "front_share");
  b.front_share_min = share[0];
  b.front_share_max = share[1];
  b.above_mps = w.quantity("above", Quantity::speed);
  w.finish();
  return b;
}

// The car of `doc`, its values' places in `sources` (doc's).
CarFile read_from(const Document& doc, SourceMap sources) {
  const std::string& file = doc.file;
  CarFile out{Car{}, std::move(sources)};
  Car& car = out.car;
  const Checker check{out.sources};
  Reader r(doc, doc.root, "");
  r.keys({"format", "name", "model", "mass", "inertia_factor", "cg_height", "wheelbase",
          "front_weight", "track_width", "roll_stiffness_front", "roll_centre_height", "tyres",
          "powertrain", "brakes", "aero", "balance_window"});
  check_format(r);
  car.file = file;
  car.name = r.string("name");
  car.model = r.choice("model", {"point-mass", "axle"}, "axle") == "axle"
                  ? VehicleModel::axle
                  : VehicleModel::point_mass;
  car.mass_kg = r.quantity("mass", Quantity::mass);
  car.inertia_factor = r.quantity_or("inertia_factor", Quantity::number, 0.0);
  car.wheelbase_m = r.quantity("wheelbase", Quantity::length);
  car.cg_height_m = r.quantity("cg_height", Quantity::length);
  car.front_weight = r.quantity("front_weight", Quantity::fraction);
  car.roll = read_roll(r);
  car.tyres = read_tyres(r.map("tyres"));
  car.powertrain = read_powertrain(r.map("powertrain"), out.sources);
  {
    Reader b = r.map("brakes");
    car.brake_front_bias = b.quantity("front_bias", Quantity::fraction);
    b.finish();
  }
  if (r.has("balance_window")) car.balance_window = read_balance_window(r.map("balance_window"));
  Reader aero = r.map("aero");
  aero.keys({"drag_height", "configs", "families"});
  car.drag_height_m = aero.quantity_or("drag_height", Quantity::length, 0.0);
  check(car.validate_without_configs());
  Reader configs = aero.map("configs");
  for (std::size_t i = 0; i < configs.node().entries.size(); ++i) {
    const auto& [name, node] = configs.node().entries[i];
    configs.get(name);
    // At the name itself (Car::validate_config says the same of a car built in code).
    if (!is_config_name(name))
      throw InputError(file, configs.node().key_marks[i],
                       "config name '" + name + "' must use letters, digits, '_' or '-' only",
                       "aero.configs." + name);
    Reader cr(doc, node, "aero.configs." + name);
    car.configs.push_back(read_config(name, cr, car.wheelbase_m, check));
    check(car.validate_config(car.configs.size() - 1));
  }
  configs.finish();
  if (aero.has("families")) read_families(aero.map("families"), car, check);
  check(car.validate());  // what is left: a car needs a config
  aero.finish();
  r.finish();
  return out;
}

}  // namespace

CarFile read_car_file(const std::string& file) {
  return read_car_document(std::make_shared<const Document>(load_document(file)));
}

CarFile read_car_document(const Document& doc) {
  return read_from(doc, SourceMap(doc));
}

CarFile read_car_document(std::shared_ptr<const Document> doc) {
  const Document& d = *doc;
  return read_from(d, SourceMap(std::move(doc)));
}

Car load_car(const std::string& file) {
  return read_car_file(file).car;
}

}  // namespace lapwing

namespace lapwing {

std::string car_key_path(const Document& doc, std::string_view key) {
  const std::string k(key);
  if (k.find('.') != std::string::npos || doc.root.find(k)) return k;
  const Node* aero = doc.root.find("aero");
  const Node* families = aero ? aero->find("families") : nullptr;
  if (families && families->find(k)) return "aero.families." + k + ".at";
  return k;
}

namespace {
// A key path's part: its key and the indices after it, as numbers and as typed ("cla[1][0]": cla,
// 1 and 0, a list of lists' item); nullopt where the part is not a key followed by [INDEX]
// groups (an index too large for a number is no item either: last_index).
struct KeyPart {
  std::string key;
  std::vector<std::size_t> indices;
  std::vector<std::string> typed;
};
std::optional<KeyPart> key_part(const std::string& part) {
  const std::size_t open = part.find('[');
  KeyPart k{part.substr(0, open), {}, {}};
  for (std::size_t a = open; a < part.size();) {
    const std::size_t close = part.find(']', a);
    if (part[a] != '[' || close == std::string::npos) return std::nullopt;
    const auto i = last_index(std::string_view(part).substr(a, close - a + 1));
    if (!i) return std::nullopt;
    k.indices.push_back(*i);
    k.typed.push_back(part.substr(a + 1, close - a - 1));
    a = close + 1;
  }
  return k;
}

[[noreturn]] void no_key(const Document& doc, const Node& at, const std::string& what,
                         const std::string& key_path) {
  throw InputError(doc.file, at.mark, what, key_path);
}

std::vector<std::string> map_keys(const Node& n) {
  std::vector<std::string> keys;
  for (const auto& e : n.entries) keys.push_back(e.key);
  return keys;
}
}  // namespace

void set_car_value(Document& doc, std::string_view key_path, const std::string& text) {
  const std::string path(key_path);
  Node* node = &doc.root;
  std::string walked;
  std::size_t a = 0;
  while (true) {
    const std::size_t dot = path.find('.', a);
    std::string part = path.substr(a, dot == std::string::npos ? dot : dot - a);
    // "gears[2]": a key, then an index into the list it holds ("cla[1][0]": a list of lists').
    const std::optional<KeyPart> kp = key_part(part);
    if (!kp) no_key(doc, *node, "'" + part + "' is not a key or key[INDEX]", path);
    part = kp->key;
    const bool index = !kp->indices.empty();
    if (part.empty()) no_key(doc, *node, "empty key in '" + path + "'", path);
    if (node->kind != Node::Kind::map)
      no_key(doc, *node, "'" + walked + "' holds no keys (it is a value)", path);
    const bool last = dot == std::string::npos;
    Node* child = nullptr;
    for (auto& [k, n] : node->entries)
      if (k == part) child = &n;
    std::string here = walked.empty() ? part : walked + "." + part;
    if (!child) {
      if (!last || index) {
        const std::string near = closest(part, map_keys(*node));
        no_key(doc, *node,
               "no key '" + part + "'" + (walked.empty() ? "" : " under '" + walked + "'") +
                   (near.empty() ? "" : "; did you mean '" + near + "'?"),
               path);
      }
      // A key the file leaves to its default: added, and the loader judges it.
      Node value;
      value.kind = Node::Kind::scalar;
      value.mark = node->mark;
      value.scalar = text;
      node->entries.push_back(Node::Entry{part, std::move(value)});
      node->key_marks.push_back(node->mark);
      return;
    }
    for (std::size_t q = 0; q < kp->indices.size(); ++q) {
      if (child->kind != Node::Kind::sequence || kp->indices[q] >= child->items.size())
        no_key(doc, *child,
               "'" + here + "' has no item " + kp->typed[q] +
                   (child->kind == Node::Kind::sequence
                        ? " (it has " + std::to_string(child->items.size()) + ")"
                        : " (it is not a list)"),
               path);
      child = &child->items[kp->indices[q]];
      here += "[" + kp->typed[q] + "]";
    }
    walked = path.substr(0, last ? path.size() : dot);
    if (last) {
      if (child->kind != Node::Kind::scalar && child->kind != Node::Kind::null) {
        const std::string what = child->kind == Node::Kind::map ? "a map" : "a list";
        no_key(doc, *child,
               "'" + walked + "' is " + what + "; set one of its " +
                   (child->kind == Node::Kind::map ? "keys" : "items ([INDEX])"),
               path);
      }
      child->kind = Node::Kind::scalar;
      child->scalar = text;
      return;
    }
    node = child;
    a = dot + 1;
  }
}

namespace {

// The scalar nodes at a key path ("a.b[2].c"); a list or a list of lists gives every scalar in
// it. Nothing when the path is not in the document.
void scalars_at(Node& root, const std::string& path, std::vector<Node*>& out) {
  Node* node = &root;
  std::size_t a = 0;
  while (a <= path.size()) {
    const std::size_t dot = std::min(path.find('.', a), path.size());
    const std::optional<KeyPart> kp = key_part(path.substr(a, dot - a));
    if (!kp || node->kind != Node::Kind::map) return;
    Node* child = nullptr;
    for (auto& [k, n] : node->entries)
      if (k == kp->key) child = &n;
    if (!child) return;
    for (const std::size_t index : kp->indices) {
      if (child->kind != Node::Kind::sequence || index >= child->items.size()) return;
      child = &child->items[index];
    }
    node = child;
    a = dot + 1;
  }
  std::vector<Node*> stack{node};
  while (!stack.empty()) {
    Node* n = stack.back();
    stack.pop_back();
    if (n->kind == Node::Kind::scalar) out.push_back(n);
    if (n->kind == Node::Kind::sequence)
      for (auto it = n->items.rbegin(); it != n->items.rend(); ++it) stack.push_back(&*it);
  }
}

}  // namespace

std::string edited_car_text(const std::string& file, const std::vector<CarValueEdit>& edits) {
  std::ifstream in(file, std::ios::binary);
  std::ostringstream ss;
  ss << in.rdbuf();
  const std::string text = ss.str();
  Document doc = parse_document(text, file);
  // Line starts, to place a node's (line, column).
  std::vector<std::size_t> line_at{0};
  for (std::size_t i = 0; i < text.size(); ++i)
    if (text[i] == '\n') line_at.push_back(i + 1);
  struct Replace {
    std::size_t at, length;
    std::string with;
  };
  std::vector<Replace> replaces;
  for (const CarValueEdit& e : edits) {
    std::vector<Node*> nodes;
    scalars_at(doc.root, e.key_path, nodes);
    const std::string torque = "powertrain.torque_curve.torque";
    if (nodes.empty() && e.key_path == torque)
      scalars_at(doc.root, "powertrain.power_curve.power", nodes);
    if (nodes.empty())
      // At the nearest key the file holds on the way (a family's configs: aero.configs).
      throw InputError(file, SourceMap(doc).mark(e.key_path),
                       "the file holds no value at this key path to write a fitted "
                       "value into (a config made by a wing family is fitted as one of its "
                       "measured configs)",
                       e.key_path);
    for (Node* n : nodes) {
      const std::size_t line = static_cast<std::size_t>(n->mark.line);
      if (line < 1 || line > line_at.size())
        throw InputError(file, n->mark, "no place", e.key_path);
      std::size_t at = line_at[line - 1] + static_cast<std::size_t>(n->mark.col - 1);
      if (at < text.size() && (text[at] == '"' || text[at] == '\'')) ++at;
      if (text.compare(at, n->scalar.size(), n->scalar) != 0)
        throw InputError(file, n->mark, "cannot place the value to write here", e.key_path);
      // The number, then its unit as written ("1.05 m2", "43 %").
      const char* begin = n->scalar.c_str();
      char* end = nullptr;
      const double v = std::strtod(begin, &end);
      if (end == begin || !std::isfinite(v))
        throw InputError(file, n->mark, "'" + n->scalar + "' is not a number to scale", e.key_path);
      const std::string unit = n->scalar.substr(static_cast<std::size_t>(end - begin));
      const bool percent = unit.find('%') != std::string::npos;
      const double nv = v * e.scale + (percent ? 100.0 : 1.0) * e.add;
      char buf[40];
      std::snprintf(buf, sizeof buf, "%.6g", nv);
      replaces.push_back({at, n->scalar.size(), buf + unit});
    }
  }
  // From the end, so that earlier places stay where they are.
  std::sort(replaces.begin(), replaces.end(),
            [](const Replace& x, const Replace& y) { return x.at > y.at; });
  std::string out = text;
  for (std::size_t i = 0; i < replaces.size(); ++i) {
    if (i && replaces[i].at == replaces[i - 1].at) continue;  // one value edited twice: once
    out.replace(replaces[i].at, replaces[i].length, replaces[i].with);
  }
  return out;
}

std::size_t pick_config(const Car& car, const std::string& name) {
  if (name.empty()) return 0;
  const int i = car.config_index(name);
  if (i < 0) {
    const std::vector<std::string> names = car.config_names();
    std::string list;
    for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
    // The nearest name by spelling, case aside ('LOW' for 'low'), else the one name that starts
    // with what was typed.
    const auto lower = [](std::string s) {
      for (char& c : s)
        if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
      return s;
    };
    std::vector<std::string> lowered;
    for (const auto& n : names) lowered.push_back(lower(n));
    std::string near;
    if (const std::string l = closest(lower(name), lowered); !l.empty())
      near = names[static_cast<std::size_t>(std::find(lowered.begin(), lowered.end(), l) -
                                            lowered.begin())];
    if (near.empty()) {
      std::vector<std::string> starting;
      for (std::size_t k = 0; k < names.size(); ++k)
        if (lowered[k].rfind(lower(name), 0) == 0) starting.push_back(names[k]);
      if (starting.size() == 1) near = starting.front();
    }
    // The car file's aero.configs: a command maps it to its line (io/source_map.hpp).
    throw InvalidInput(
        car.file,
        broken_rule("aero.configs", "no config named '" + name + "'" +
                                        (near.empty() ? "" : "; did you mean '" + near + "'?") +
                                        " (the car has " + list + ")"));
  }
  return static_cast<std::size_t>(i);
}

}  // namespace lapwing
