// The car as described by its file (README, "Car"): fixed, in SI units, checked by
// validate().
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "lapwing/base/range.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/model/aero.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/model/tyre.hpp"

namespace lapwing {

/// A car's mass (kg): at least 1 kg, no car is lighter (a unit slip), and a subnormal mass made
/// 1 / m infinite (a trade's non-finite output: a robustness campaign's finding); at most 100 t.
inline constexpr Range mass_range{1.0, 1e5, false, false};

/// Where the limits come from: the whole car's tyres as one (point mass), or the axle that
/// saturates first, with drive limited to what the driven axle's load can transmit (the
/// default: README, "Physics and assumptions").
enum class VehicleModel { point_mass, axle };

/// What sets the lateral load transfer of each axle (Milliken & Milliken, Race Car Vehicle
/// Dynamics, ch. 18): the track widths, the front axle's share of the total roll stiffness and
/// the roll-centre heights above the ground (0: roll axis on the ground). All mass is taken as
/// sprung. A car without it has no lateral load transfer (both tyres of an axle equally
/// loaded, as before these keys).
struct RollGeometry {
  double track_front_m = 0.0, track_rear_m = 0.0;
  double roll_stiffness_front = 0.5;  // K_f / (K_f + K_r), 0..1
  double roll_centre_front_m = 0.0, roll_centre_rear_m = 0.0;

  static constexpr Range track_range{0.3, 5.0};         // m
  static constexpr Range roll_centre_range{-0.5, 2.0};  // m (below the ground: a few cars)
  /// Ranges (key paths "track_width.front", "track_width.rear", "roll_stiffness_front",
  /// "roll_centre_height.front", ".rear"), and each roll centre below `cg_height_m` (the roll
  /// axis under the centre of gravity, RCVD ch. 18's layout).
  std::optional<Violation> validate(double cg_height_m) const;
};
class ConfiguredCar;

/// The front axle's share of the load (weight, downforce by the aero balance, the drag moment and
/// load transfer) the team accepts in fast corners: from `front_share_min` to `front_share_max`
/// (0..1), at speeds above `above_mps`, wherever the lateral acceleration exceeds
/// balance_window_lateral_g. Keeping the balance inside such a window at speed is what aero
/// set-up aims for (common practice: the balance moves with braking, drive and aero load, and a
/// driver commits to fast corners only when it stays within a known range).
struct BalanceWindow {
  double front_share_min = 0.0, front_share_max = 1.0;
  double above_mps = 0.0;

  /// Shares in [0, 1], the max above the min, `above` in [0, 200] m/s (key paths as in the car
  /// file: "front_share[0]", "front_share[1]", "above").
  std::optional<Violation> validate() const;
};
/// "While cornering": lateral acceleration above this many g (issue 17's definition).
inline constexpr double balance_window_lateral_g = 0.5;

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
  VehicleModel model = VehicleModel::axle;
  std::optional<RollGeometry> roll;  // none: no lateral load transfer
  std::vector<AeroConfig> configs;
  std::optional<BalanceWindow> balance_window;  // none: no window is checked

  /// Index of the config named `name`, or -1.
  int config_index(const std::string& name) const;
  /// This car with config `index` applied (ConfiguredCar). Throws std::out_of_range for an
  /// index past its configs.
  ConfiguredCar configured(std::size_t index) const;
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

/// A car with one aero config applied: the config's overrides (mass, inertia_factor,
/// cg_height, front_weight, drag_height) in the car-level values, and the config the only one
/// left. What the solver, the studies and the envelope take: a Car with several configs, or
/// none, cannot reach them, and none of them picks a config by position.
class ConfiguredCar {
 public:
  /// `car` with config `index` applied. Throws std::out_of_range for an index past its configs.
  ConfiguredCar(const Car& car, std::size_t index);
  /// The car-level values with the overrides in place; `configs` holds aero() alone.
  const Car& car() const { return car_; }
  /// The applied config.
  const AeroConfig& aero() const { return car_.configs.front(); }
  /// A copy with the car-level values and the config changed by change(Car& values,
  /// AeroConfig& aero) (a study's variations: a scaled ClA, a heavier car). The config passed
  /// stays the only one: `values.configs` is not read.
  template <class Change>
  ConfiguredCar changed(Change&& change) const {
    ConfiguredCar c = *this;
    AeroConfig a = std::move(c.car_.configs.front());
    c.car_.configs.clear();
    change(c.car_, a);
    c.car_.configs.assign(1, std::move(a));
    return c;
  }

 private:
  Car car_;
};

/// A change to one value of a car file, named by its key path there ("tyres.mu_lat",
/// "aero.configs.high.speed_table.cla": a path to a list, or a list of lists, changes every
/// number in it): multiplied by `scale`, then `add` added (in the value's own unit; a share
/// written with % gets 100 add %). What a fitted car's file is written with (io/car_file.hpp).
struct CarValueEdit {
  std::string key_path;
  double scale = 1.0, add = 0.0;
};

/// Whether `name` can name a config: letters, digits, '_' and '-' (it becomes part of output
/// file names and key paths).
bool is_config_name(std::string_view name);

}  // namespace lapwing
