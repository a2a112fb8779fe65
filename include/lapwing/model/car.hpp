// The car as described by its file (README, "Car"): fixed, in SI units, checked by
// validate().
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/base/violation.hpp"
#include "lapwing/model/aero.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/model/tyre.hpp"

namespace lapwing {

/// Where the limits come from: the whole car's tyres as one (point mass), or the axle that
/// saturates first, with drive limited to what the driven axle's load can transmit.
enum class VehicleModel { point_mass, axle };

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

  /// What errors about this car name: its file, or "car 'NAME'" for a car built in code.
  std::string subject() const;

  /// The first value that breaks a rule, in the order of a car file, named by its key path
  /// there ("mass", "tyres.mu_lat", "aero.configs.high.cla"): the car-level values, the tyres,
  /// the powertrain, the brakes, then each config and its overrides; a car needs one config.
  std::optional<Violation> validate() const;
  /// The part of validate() before the configs (a loader checks it before it reads them: a
  /// parts table is reduced with the wheelbase).
  std::optional<Violation> validate_without_configs() const;
  /// Config `index`'s part of validate(): its name, its aero data, its overrides of the
  /// car-level values (a cg height below the wheelbase), under "aero.configs.NAME".
  std::optional<Violation> validate_config(std::size_t index) const;
};

/// Whether `name` can name a config: letters, digits, '_' and '-' (it becomes part of output
/// file names and key paths).
bool is_config_name(std::string_view name);

}  // namespace lapwing
