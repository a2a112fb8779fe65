#include "lapwing/io/car_file.hpp"

#include <algorithm>
#include <cctype>

#include "lapwing/base/units.hpp"
#include "lapwing/io/document.hpp"

namespace lapwing {

namespace {

constexpr Range friction{0.0, 3.0, true, false};

void check_format(Reader& r) {
  const Node& n = r.require("format");
  double v = r.node_quantity(n, Quantity::number, Range{}, "format");
  if (v != 1.0)
    r.fail(n, "unsupported format " + n.scalar + " (this lapwing reads format 1)", "format");
}

Tyres read_tyres(Reader r) {
  r.keys({"mu_long", "mu_lat", "nominal_load", "load_sensitivity", "ellipse_exponent",
          "rolling_radius", "rolling_resistance"});
  Tyres t;
  t.mu_long = r.quantity("mu_long", Quantity::number, friction);
  t.mu_lat = r.quantity("mu_lat", Quantity::number, friction);
  t.nominal_load_n = r.quantity("nominal_load", Quantity::force, positive());
  t.load_sensitivity =
      r.quantity_or("load_sensitivity", Quantity::number, Range{0.0, 1.0, false, true}, 0.0);
  t.ellipse_exponent = r.quantity_or("ellipse_exponent", Quantity::number, Range{1.0, 10.0}, 2.0);
  t.rolling_radius_m = r.quantity("rolling_radius", Quantity::length, Range{0.0, 2.0, true, false});
  t.rolling_resistance =
      r.quantity_or("rolling_resistance", Quantity::number, Range{0.0, 0.1}, 0.0);
  r.finish();
  return t;
}

void check_increasing(Reader& r, const std::string& key, const std::vector<double>& v,
                      bool increasing) {
  const Node& list = *r.node().find(key);
  for (std::size_t i = 1; i < v.size(); ++i) {
    bool ok = increasing ? v[i] > v[i - 1] : v[i] < v[i - 1];
    if (!ok)
      r.fail(list.items[i],
             std::string("values must be strictly ") + (increasing ? "increasing" : "decreasing") +
                 " (item " + std::to_string(i) + ": " + list.items[i].scalar + " after " +
                 list.items[i - 1].scalar + ")",
             key);
  }
}

// A curve {rpm: [...], <value>: [...]}: sizes equal, rpm strictly increasing, at least two points.
void read_curve(Reader c, const char* value_key, Quantity q, std::vector<double>& radps,
                std::vector<double>& values) {
  radps = c.quantities("rpm", Quantity::engine_speed, positive());
  values = c.quantities(value_key, q, non_negative());
  if (radps.size() < 2) c.fail(*c.node().find("rpm"), "a curve needs at least 2 points", "rpm");
  if (values.size() != radps.size())
    c.fail(*c.node().find(value_key),
           "size differs from rpm: expected " + std::to_string(radps.size()) + ", got " +
               std::to_string(values.size()),
           value_key);
  check_increasing(c, "rpm", radps, true);
  c.finish();
}

Powertrain read_powertrain(Reader r) {
  Powertrain p;
  const bool has_torque = r.has("torque_curve"), has_power = r.has("power_curve"),
             has_const = r.has("constant_power");
  if (int(has_torque) + int(has_power) + int(has_const) != 1)
    r.fail(r.node(), "give exactly one of torque_curve, power_curve, constant_power");
  if (has_const) {
    p.ideal = true;
    p.constant_power_w = r.quantity("constant_power", Quantity::power, positive());
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
      p.torque_nm.resize(power.size());
      for (std::size_t i = 0; i < power.size(); ++i) p.torque_nm[i] = power[i] / p.engine_radps[i];
    }
    const double first = p.engine_radps.front(), last = p.engine_radps.back();
    p.rev_limit_radps = r.quantity_or("rev_limit", Quantity::engine_speed, positive(), last);
    if (p.rev_limit_radps <= first || p.rev_limit_radps > last * (1 + 1e-12))
      r.fail(*r.node().find("rev_limit"),
             "rev_limit must lie above the curve's first rpm and not beyond its last", "rev_limit");
    p.gears = r.quantities("gears", Quantity::number, positive());
    if (p.gears.empty()) r.fail(*r.node().find("gears"), "at least one gear is needed", "gears");
    check_increasing(r, "gears", p.gears, false);
    p.final_drive = r.quantity("final_drive", Quantity::number, positive());
    p.shift_time_s = r.quantity_or("shift_time", Quantity::time, Range{0.0, 2.0}, 0.0);
  }
  p.efficiency = r.quantity_or("efficiency", Quantity::fraction, Range{0.0, 1.0, true, false}, 1.0);
  const std::string axle = r.choice("driven_axle", {"rear", "front", "all"}, "rear");
  p.driven = axle == "rear"    ? DrivenAxle::rear
             : axle == "front" ? DrivenAxle::front
                               : DrivenAxle::all;
  r.finish();
  return p;
}

bool is_word(const std::string& s) {
  return !s.empty() && std::all_of(s.begin(), s.end(), [](unsigned char c) {
    return std::isalnum(c) || c == '_' || c == '-';
  });
}

// A list of quantities under `key` that must have `n` entries (a table's column).
std::vector<double> column(Reader& r, std::string_view key, Quantity q, Range range, std::size_t n,
                           std::string_view against) {
  std::vector<double> v = r.quantities(key, q, range);
  if (v.size() != n)
    r.fail(*r.node().find(key),
           "size differs from " + std::string(against) + ": expected " + std::to_string(n) +
               ", got " + std::to_string(v.size()),
           key);
  return v;
}

void read_speed_table(Reader t, AeroConfig& c) {
  c.speed_mps = t.quantities("speed", Quantity::speed, non_negative());
  if (c.speed_mps.size() < 2)
    t.fail(*t.node().find("speed"), "a table needs at least 2 rows", "speed");
  check_increasing(t, "speed", c.speed_mps, true);
  const std::size_t n = c.speed_mps.size();
  c.cda_m2 = column(t, "cda", Quantity::area, Range{0.0, 20.0}, n, "speed");
  c.cla_m2 = column(t, "cla", Quantity::area, Range{0.0, 30.0}, n, "speed");
  c.balance = column(t, "balance", Quantity::fraction, Range{0.0, 1.0}, n, "speed");
  t.finish();
}

void read_forces(Reader f, AeroConfig& c, double wheelbase) {
  const double speed = f.quantity("speed", Quantity::speed, Range{0.0, 200.0, true, false});
  const double density = f.quantity("density", Quantity::number, Range{0.5, 1.5});
  const Node& list = f.require("parts");
  if (list.kind != Node::Kind::sequence || list.items.empty())
    f.fail(list, "expected a non-empty list of parts", "parts");
  std::vector<AeroPart> parts;
  for (std::size_t i = 0; i < list.items.size(); ++i) {
    Reader p(f.doc(), list.items[i], f.child_path("parts") + "[" + std::to_string(i) + "]");
    p.keys({"name", "drag", "downforce", "x", "z"});
    AeroPart part;
    part.name = p.string_or("name", "part " + std::to_string(i + 1));
    part.drag_n = p.quantity("drag", Quantity::force, non_negative());
    part.downforce_n = p.quantity("downforce", Quantity::force, Range{-1e6, 1e6});
    part.x_m = p.quantity("x", Quantity::length, Range{-5.0, 15.0});
    part.z_m = p.quantity("z", Quantity::length, Range{0.0, 3.0});
    p.finish();
    parts.push_back(part);
  }
  double down = 0.0;
  for (const auto& p : parts) down += p.downforce_n;
  if (!(down > 0.0))
    f.fail(list,
           "the parts' downforce sums to " + std::to_string(down) + " N: net lift is not modelled",
           "parts");
  const PartsReduction red = reduce_parts(parts, speed, density, wheelbase);
  if (red.balance < 0.0 || red.balance > 1.0)
    f.fail(list,
           "the parts put " + std::to_string(100 * red.balance) +
               " % of the downforce on the front axle: outside 0..100 %",
           "parts");
  if (red.cla_m2 > 30.0 || red.cda_m2 > 20.0)
    f.fail(list,
           "the parts give CdA " + std::to_string(red.cda_m2) + " m2, ClA " +
               std::to_string(red.cla_m2) + " m2: beyond the ranges of a config",
           "parts");
  c.cda_m2 = {red.cda_m2};
  c.cla_m2 = {red.cla_m2};
  c.balance = {red.balance};
  c.drag_height_m = red.drag_height_m;
  f.finish();
}

Eigen::MatrixXd read_grid(Reader& m, std::string_view key, Range range, std::size_t rows,
                          std::size_t cols) {
  const Node& g = m.require(key);
  const std::string path = m.child_path(key);
  if (g.kind != Node::Kind::sequence)
    m.fail(g, "expected a list of rows, one per front ride height", key);
  if (g.items.size() != rows)
    m.fail(g,
           "rows differ from front: expected " + std::to_string(rows) + ", got " +
               std::to_string(g.items.size()),
           key);
  Eigen::MatrixXd out(static_cast<Eigen::Index>(rows), static_cast<Eigen::Index>(cols));
  for (std::size_t i = 0; i < rows; ++i) {
    const Node& row = g.items[i];
    const std::string rp = path + "[" + std::to_string(i) + "]";
    if (row.kind != Node::Kind::sequence || row.items.size() != cols)
      throw InputError(m.doc().file, row.mark,
                       "columns differ from rear: expected " + std::to_string(cols) + ", got " +
                           std::to_string(row.kind == Node::Kind::sequence ? row.items.size() : 0),
                       rp);
    for (std::size_t j = 0; j < cols; ++j)
      out(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = m.node_quantity(
          row.items[j], Quantity::number, range, rp + "[" + std::to_string(j) + "]");
  }
  return out;
}

void read_ride_height_map(Reader& c, Reader m, AeroConfig& a) {
  RideHeightMap map;
  map.front_m = m.quantities("front", Quantity::length, Range{-0.5, 1.0});
  map.rear_m = m.quantities("rear", Quantity::length, Range{-0.5, 1.0});
  for (const char* k : {"front", "rear"}) {
    const auto& axis = std::string(k) == "front" ? map.front_m : map.rear_m;
    if (axis.size() < 2) m.fail(*m.node().find(k), "a map needs at least 2 points per axis", k);
    check_increasing(m, k, axis, true);
  }
  map.cda_m2 = read_grid(m, "cda", Range{0.0, 20.0}, map.front_m.size(), map.rear_m.size());
  map.cla_m2 = read_grid(m, "cla", Range{0.0, 30.0}, map.front_m.size(), map.rear_m.size());
  map.balance = read_grid(m, "balance", Range{0.0, 1.0}, map.front_m.size(), map.rear_m.size());
  m.finish();
  {
    Reader s = c.map("static_ride_height");
    s.keys({"front", "rear"});
    map.static_front_m = s.quantity("front", Quantity::length, Range{0.0, 1.0, true, false});
    map.static_rear_m = s.quantity("rear", Quantity::length, Range{0.0, 1.0, true, false});
    s.finish();
  }
  {
    Reader k = c.map("heave_stiffness");
    k.keys({"front", "rear"});
    map.stiffness_front_npm =
        k.quantity("front", Quantity::stiffness, Range{0.0, 1e9, true, false});
    map.stiffness_rear_npm = k.quantity("rear", Quantity::stiffness, Range{0.0, 1e9, true, false});
    k.finish();
  }
  // The coefficients at rest stand for the config where one number is asked for (check).
  const MapCoefficients at_rest = map_coefficients(map, map.static_front_m, map.static_rear_m);
  a.cda_m2 = {at_rest.cda_m2};
  a.cla_m2 = {at_rest.cla_m2};
  a.balance = {at_rest.balance};
  a.map = std::move(map);
}

StraightTrim read_trim(Reader t) {
  t.keys({"cda", "cla", "balance", "below_curvature"});
  StraightTrim s;
  s.dcda_m2 = t.quantity_or("cda", Quantity::area, Range{-20.0, 20.0}, 0.0);
  s.dcla_m2 = t.quantity_or("cla", Quantity::area, Range{-30.0, 30.0}, 0.0);
  s.dbalance = t.quantity_or("balance", Quantity::number, Range{-1.0, 1.0}, 0.0);
  // A curvature in 1/m, or given as the radius above which the car counts as on a straight.
  s.below_curvature_1pm =
      t.quantity("below_curvature", Quantity::number, Range{0.0, 1.0, true, false});
  t.finish();
  return s;
}

AeroConfig read_config(const std::string& name, Reader r, double wheelbase) {
  AeroConfig c;
  c.name = name;
  c.file = r.doc().file;
  c.mark = r.node().mark;
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
    read_forces(r.map("forces"), c, wheelbase);
  } else if (r.has("ride_height_map")) {
    c.form = AeroConfig::Form::ride_height_map;
    read_ride_height_map(r, r.map("ride_height_map"), c);
  } else {
    c.cda_m2 = {r.quantity("cda", Quantity::area, Range{0.0, 20.0})};
    c.cla_m2 = {r.quantity("cla", Quantity::area, Range{0.0, 30.0})};
    c.balance = {r.quantity("balance", Quantity::fraction, Range{0.0, 1.0})};
  }
  if (!c.map)
    for (const char* k : {"static_ride_height", "heave_stiffness"})
      if (const Node* n = r.get(k)) r.fail(*n, std::string(k) + " goes with ride_height_map", k);
  if (r.has("straight_trim")) {
    c.trim = read_trim(r.map("straight_trim"));
    // Rows known now are checked now; a map's are checked where its ride heights are solved.
    for (std::size_t k = 0; k < c.cda_m2.size() && !c.map; ++k) {
      const double cda = c.cda_m2[k] + c.trim->dcda_m2, cla = c.cla_m2[k] + c.trim->dcla_m2,
                   bal = c.balance[k] + c.trim->dbalance;
      if (cda < 0.0 || cla < 0.0 || bal < 0.0 || bal > 1.0)
        r.fail(*r.node().find("straight_trim"),
               "straight_trim takes CdA, ClA or balance out of range (CdA " + std::to_string(cda) +
                   " m2, ClA " + std::to_string(cla) + " m2, balance " + std::to_string(bal) + ")",
               "straight_trim");
    }
  }
  c.mass_kg = r.optional_quantity("mass", Quantity::mass, Range{0.0, 1e5, true, false});
  c.inertia_factor =
      r.optional_quantity("inertia_factor", Quantity::number, Range{0.0, 1.0, false, true});
  c.cg_height_m = r.optional_quantity("cg_height", Quantity::length, positive());
  c.front_weight = r.optional_quantity("front_weight", Quantity::fraction, open_unit());
  if (c.form != AeroConfig::Form::forces)
    c.drag_height_m = r.optional_quantity("drag_height", Quantity::length, non_negative());
  r.finish();
  return c;
}

// balance_window: {front_share: [min, max], above: speed}.
BalanceWindow read_balance_window(Reader w) {
  w.keys({"front_share", "above"});
  BalanceWindow b;
  const std::vector<double> share =
      w.quantities("front_share", Quantity::fraction, Range{0.0, 1.0});
  const Node& list = *w.node().find("front_share");
  if (share.size() != 2)
    w.fail(list, "expected 2 values [min, max], got " + std::to_string(share.size()),
           "front_share");
  if (!(share[0] < share[1]))
    w.fail(list.items[1],
           "the window's max (" + list.items[1].scalar + ") must lie above its min (" +
               list.items[0].scalar + ")",
           "front_share");
  b.front_share_min = share[0];
  b.front_share_max = share[1];
  b.above_mps = w.quantity("above", Quantity::speed, Range{0.0, 200.0});
  w.finish();
  return b;
}

}  // namespace

Car load_car(const std::string& file) {
  Document doc = load_document(file);
  Reader r(doc, doc.root, "");
  r.keys({"format", "name", "model", "mass", "inertia_factor", "cg_height", "wheelbase",
          "front_weight", "tyres", "powertrain", "brakes", "aero", "balance_window"});
  check_format(r);
  Car car;
  car.file = file;
  car.name = r.string("name");
  car.model = r.choice("model", {"point-mass", "axle"}, "point-mass") == "axle"
                  ? VehicleModel::axle
                  : VehicleModel::point_mass;
  car.mass_kg = r.quantity("mass", Quantity::mass, Range{0.0, 1e5, true, false});
  car.inertia_factor =
      r.quantity_or("inertia_factor", Quantity::number, Range{0.0, 1.0, false, true}, 0.0);
  car.wheelbase_m = r.quantity("wheelbase", Quantity::length, Range{0.5, 10.0});
  car.cg_height_m = r.quantity("cg_height", Quantity::length, positive());
  if (car.cg_height_m >= car.wheelbase_m)
    r.fail(*doc.root.find("cg_height"), "cg_height must be below the wheelbase", "cg_height");
  car.front_weight = r.quantity("front_weight", Quantity::fraction, open_unit());
  car.tyres = read_tyres(r.map("tyres"));
  car.powertrain = read_powertrain(r.map("powertrain"));
  {
    Reader b = r.map("brakes");
    car.brake_front_bias = b.quantity("front_bias", Quantity::fraction, open_unit());
    b.finish();
  }
  if (r.has("balance_window")) car.balance_window = read_balance_window(r.map("balance_window"));
  Reader aero = r.map("aero");
  car.drag_height_m = aero.quantity_or("drag_height", Quantity::length, non_negative(), 0.0);
  Reader configs = aero.map("configs");
  for (std::size_t i = 0; i < configs.node().entries.size(); ++i) {
    const auto& [name, node] = configs.node().entries[i];
    configs.get(name);
    if (!is_word(name))
      throw InputError(file, configs.node().key_marks[i],
                       "config name '" + name + "' must use letters, digits, '_' or '-' only",
                       "aero.configs." + name);
    Reader cr(doc, node, "aero.configs." + name);
    car.configs.push_back(read_config(name, cr, car.wheelbase_m));
    const AeroConfig& c = car.configs.back();
    if (c.cg_height_m && *c.cg_height_m >= car.wheelbase_m)
      cr.fail(*node.find("cg_height"), "cg_height must be below the wheelbase", "cg_height");
  }
  if (car.configs.empty()) configs.fail(configs.node(), "at least one aero config is needed");
  configs.finish();
  aero.finish();
  r.finish();
  return car;
}

}  // namespace lapwing
