#include "lapwing/car.hpp"

#include <algorithm>
#include <cctype>

#include "lapwing/document.hpp"
#include "lapwing/units.hpp"

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

AeroConfig read_config(const std::string& name, Reader r) {
  AeroConfig c;
  c.name = name;
  r.keys({"cda", "cla", "balance", "mass", "inertia_factor", "cg_height", "front_weight",
          "drag_height"});
  c.cda_m2 = {r.quantity("cda", Quantity::area, Range{0.0, 20.0})};
  c.cla_m2 = {r.quantity("cla", Quantity::area, Range{0.0, 30.0})};
  c.balance = {r.quantity("balance", Quantity::fraction, Range{0.0, 1.0})};
  c.mass_kg = r.optional_quantity("mass", Quantity::mass, Range{0.0, 1e5, true, false});
  c.inertia_factor =
      r.optional_quantity("inertia_factor", Quantity::number, Range{0.0, 1.0, false, true});
  c.cg_height_m = r.optional_quantity("cg_height", Quantity::length, positive());
  c.front_weight = r.optional_quantity("front_weight", Quantity::fraction, open_unit());
  c.drag_height_m = r.optional_quantity("drag_height", Quantity::length, non_negative());
  r.finish();
  return c;
}

}  // namespace

int Car::config_index(const std::string& n) const {
  for (std::size_t i = 0; i < configs.size(); ++i)
    if (configs[i].name == n) return static_cast<int>(i);
  return -1;
}

std::vector<std::string> Car::config_names() const {
  std::vector<std::string> v;
  for (const auto& c : configs) v.push_back(c.name);
  return v;
}

Car Car::configured(std::size_t index) const {
  Car c = *this;
  const AeroConfig& a = configs.at(index);
  c.mass_kg = a.mass_kg.value_or(mass_kg);
  c.inertia_factor = a.inertia_factor.value_or(inertia_factor);
  c.cg_height_m = a.cg_height_m.value_or(cg_height_m);
  c.front_weight = a.front_weight.value_or(front_weight);
  c.drag_height_m = a.drag_height_m.value_or(drag_height_m);
  c.configs = {a};
  return c;
}

Car load_car(const std::string& file) {
  Document doc = load_document(file);
  Reader r(doc, doc.root, "");
  r.keys({"format", "name", "mass", "inertia_factor", "cg_height", "wheelbase", "front_weight",
          "tyres", "powertrain", "brakes", "aero"});
  check_format(r);
  Car car;
  car.file = file;
  car.name = r.string("name");
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
    car.configs.push_back(read_config(name, cr));
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
