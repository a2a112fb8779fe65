#include "lapwing/model/car.hpp"

#include <algorithm>
#include <cctype>
#include <cstdio>
#include <string>

#include "lapwing/base/format.hpp"

namespace lapwing {

namespace {

// The ranges of the car-level values (README, "Car"), which a config may override.
// The drag force's line of action: at most as high as the aero force points may be (3 m, the
// aero points' z); a height typed in mm as m (420) is refused, not a car that tips.
constexpr Range drag_height_range{0.0, 3.0};
constexpr Range inertia_range{0.0, 1.0, false, true};

}  // namespace

std::optional<Violation> BalanceWindow::validate() const {
  auto percent = [](double v) { return fixed(100 * v, 1) + " %"; };
  return FirstViolation()
      .each("front_share", {front_share_min, front_share_max}, Range{0.0, 1.0}, Quantity::fraction)
      .rule(
          front_share_min < front_share_max, "front_share",
          [&] {
            return "the window's max (" + percent(front_share_max) + ") must lie above its min (" +
                   percent(front_share_min) + ")";
          },
          "front_share[1]")
      .range("above", above_mps, Range{0.0, 200.0}, Quantity::speed)
      .result();
}

std::optional<Violation> RollGeometry::validate(double cg_height_m) const {
  FirstViolation f;
  f.range("track_width.front", track_front_m, track_range, Quantity::length)
      .range("track_width.rear", track_rear_m, track_range, Quantity::length)
      .range("roll_stiffness_front", roll_stiffness_front, Range{0.0, 1.0}, Quantity::fraction);
  for (const auto& [key, z] :
       {std::pair<const char*, double>{"roll_centre_height.front", roll_centre_front_m},
        {"roll_centre_height.rear", roll_centre_rear_m}})
    f.range(key, z, roll_centre_range, Quantity::length)
        .rule(z < cg_height_m, key, "a roll centre must lie below cg_height");
  return f.result();
}

bool is_config_name(std::string_view name) {
  return !name.empty() && std::all_of(name.begin(), name.end(), [](unsigned char c) {
    return std::isalnum(c) || c == '_' || c == '-';
  });
}

namespace {
// The rear axle's load, moments about the front contact patch without aero, is
// W (1 - f) L / L - m a h / L: 0 at a deceleration a = g (1 - f) L / h (a stoppie; Gillespie,
// Fundamentals of Vehicle Dynamics, ch. 2, load transfer under braking, a = g b / h with b the
// cg's distance behind the front axle). The tyres brake up to some mu_long g, so a car with
// mu_long h >= (1 - f) L can lift its rear axle within its grip; the axle model has no wheel lift
// under braking (its axle loads would go negative), and such a car is refused here.
bool below_stoppie(double h, double f, double wheelbase, double mu_long) {
  return !(mu_long * h >= (1.0 - f) * wheelbase);
}
std::string stoppie_words(double f, double wheelbase, double mu_long) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.3f m", (1.0 - f) * wheelbase / mu_long);
  return std::string("cg_height must be below (1 - front_weight) wheelbase / mu_long = ") + buf +
         ": higher, braking within the tyres' grip lifts the rear axle (its load is 0 at a "
         "deceleration of g (1 - front_weight) wheelbase / cg_height), which the model does not "
         "describe";
}
}  // namespace

std::string Car::subject() const {
  return file.empty() ? "car '" + name + "'" : file;
}

std::optional<Violation> Car::validate_without_configs() const {
  return FirstViolation()
      .range("mass", mass_kg, mass_range, Quantity::mass)
      .range("inertia_factor", inertia_factor, inertia_range, Quantity::number)
      .range("wheelbase", wheelbase_m, Range{0.5, 10.0}, Quantity::length)
      .range("cg_height", cg_height_m, positive(), Quantity::length)
      .rule(cg_height_m < wheelbase_m, "cg_height", "cg_height must be below the wheelbase")
      .range("front_weight", front_weight, open_unit(), Quantity::fraction)
      .part("", [&] { return roll ? roll->validate(cg_height_m) : std::nullopt; })
      .part("tyres", [&] { return tyres.validate(); })
      .rule(below_stoppie(cg_height_m, front_weight, wheelbase_m, tyres.mu_long), "cg_height",
            stoppie_words(front_weight, wheelbase_m, tyres.mu_long))
      .part("powertrain", [&] { return powertrain.validate(); })
      .range("brakes.front_bias", brake_front_bias, open_unit(), Quantity::fraction)
      .part("balance_window",
            [&] { return balance_window ? balance_window->validate() : std::nullopt; })
      .range("aero.drag_height", drag_height_m, drag_height_range, Quantity::length)
      .result();
}

std::optional<Violation> Car::validate_config(std::size_t index) const {
  const AeroConfig& a = configs.at(index);
  const std::string at = "aero.configs." + a.name;
  FirstViolation f;
  f.rule(is_config_name(a.name), at,
         "config name '" + a.name + "' must use letters, digits, '_' or '-' only");
  for (std::size_t i = 0; i < index; ++i)
    f.rule(configs[i].name != a.name, at, "config name '" + a.name + "' is given twice");
  f.part(at, [&] { return a.validate(); });
  auto optional_range = [&](const char* key, const std::optional<double>& v, const Range& r,
                            Quantity q) {
    if (v) f.range(at + "." + key, *v, r, q);
  };
  optional_range("mass", a.mass_kg, mass_range, Quantity::mass);
  optional_range("inertia_factor", a.inertia_factor, inertia_range, Quantity::number);
  optional_range("cg_height", a.cg_height_m, positive(), Quantity::length);
  optional_range("front_weight", a.front_weight, open_unit(), Quantity::fraction);
  optional_range("drag_height", a.drag_height_m, drag_height_range, Quantity::length);
  f.rule(!a.cg_height_m || *a.cg_height_m < wheelbase_m, at + ".cg_height",
         "cg_height must be below the wheelbase");
  if (a.cg_height_m || a.front_weight) {
    const double fw = a.front_weight.value_or(front_weight);
    f.rule(below_stoppie(a.cg_height_m.value_or(cg_height_m), fw, wheelbase_m, tyres.mu_long),
           at + (a.cg_height_m ? ".cg_height" : ".front_weight"),
           stoppie_words(fw, wheelbase_m, tyres.mu_long));
  }
  if (roll && a.cg_height_m)
    f.rule(roll->roll_centre_front_m < *a.cg_height_m && roll->roll_centre_rear_m < *a.cg_height_m,
           at + ".cg_height", "cg_height must lie above the roll centres (roll_centre_height)");
  return f.result();
}

std::optional<Violation> Car::validate() const {
  if (auto v = validate_without_configs()) return v;
  for (std::size_t i = 0; i < configs.size(); ++i)
    if (auto v = validate_config(i)) return v;
  return FirstViolation()
      .rule(!configs.empty(), "aero.configs", "at least one aero config is needed")
      .result();
}

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

ConfiguredCar Car::configured(std::size_t index) const {
  return ConfiguredCar(*this, index);
}

ConfiguredCar::ConfiguredCar(const Car& car, std::size_t index) : car_(car) {
  const AeroConfig& a = car.configs.at(index);
  car_.mass_kg = a.mass_kg.value_or(car.mass_kg);
  car_.inertia_factor = a.inertia_factor.value_or(car.inertia_factor);
  car_.cg_height_m = a.cg_height_m.value_or(car.cg_height_m);
  car_.front_weight = a.front_weight.value_or(car.front_weight);
  car_.drag_height_m = a.drag_height_m.value_or(car.drag_height_m);
  car_.configs = {a};
}

}  // namespace lapwing
