// The car as described by its file (SPEC section 2): fixed, validated, in SI units.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/aero.hpp"

namespace lapwing {

struct Tyres {
  double mu_long;           // peak longitudinal friction coefficient at nominal load
  double mu_lat;            // peak lateral friction coefficient at nominal load
  double nominal_load_n;    // per tyre
  double load_sensitivity;  // fractional fall of mu per +100 % load over nominal
  double ellipse_exponent;  // n in (Fx/Fx_max)^n + (Fy/Fy_max)^n <= 1
  double rolling_radius_m;
  double rolling_resistance;  // coefficient of the vertical load
};

enum class DrivenAxle { rear, front, all };

/// Where the limits come from: the whole car's tyres as one (point mass), or the axle that
/// saturates first, with drive limited to what the driven axle's load can transmit.
enum class VehicleModel { point_mass, axle };

struct Powertrain {
  bool ideal = false;                // constant power through an ideal transmission (no gears)
  double constant_power_w = 0.0;     // when ideal
  std::vector<double> engine_radps;  // torque curve abscissae, strictly increasing (rad/s)
  std::vector<double> torque_nm;     // engine torque at engine_radps
  double rev_limit_radps = 0.0;
  std::vector<double> gears;  // overall = gear * final_drive; strictly decreasing
  double final_drive = 1.0;
  double efficiency = 1.0;    // drivetrain, engine to wheels
  double shift_time_s = 0.0;  // drive cut after each upshift
  DrivenAxle driven = DrivenAxle::rear;
};

/// One aero configuration (SPEC section 2). Whatever form it was given in, it is coefficients
/// over speed: a constant configuration has one row (speed_mps empty); a speed table many; a
/// parts table is reduced to one row on load; a ride-height map is solved per air and speed by
/// the Envelope (see aero.hpp).
struct AeroConfig {
  enum class Form { constant, speed_table, forces, ride_height_map };
  std::string name;
  std::string file;  // the car file, for errors found later (a map that does not converge)
  Mark mark;
  Form form = Form::constant;
  std::vector<double> speed_mps;  // empty: constant coefficients
  std::vector<double> cda_m2;
  std::vector<double> cla_m2;
  std::vector<double> balance;  // front share of downforce, without the drag moment
  std::optional<RideHeightMap> map;
  std::optional<StraightTrim> trim;
  // Car-level values this configuration overrides (SPEC section 2); a parts table sets
  // drag_height_m from its parts.
  std::optional<double> mass_kg, inertia_factor, cg_height_m, front_weight, drag_height_m;
};

std::string_view form_name(AeroConfig::Form f);

struct Car {
  std::string name;
  std::string file;
  double mass_kg;
  double inertia_factor;
  double cg_height_m;
  double wheelbase_m;
  double front_weight;  // static share of weight on the front axle
  Tyres tyres;
  Powertrain powertrain;
  double brake_front_bias;
  double drag_height_m;
  VehicleModel model = VehicleModel::point_mass;
  std::vector<AeroConfig> configs;

  /// Index of the config named `name`, or -1.
  int config_index(const std::string& name) const;
  /// This car with config `index` applied: its overrides replace the car-level values and it is
  /// the only config left.
  Car configured(std::size_t index) const;
  std::vector<std::string> config_names() const;
};

/// Loads and validates a car file. Throws InputError.
Car load_car(const std::string& file);

}  // namespace lapwing
