// Aerodynamic data in the forms engineers receive it, reduced to coefficients over speed:
// constant coefficients, a table over speed, forces per part at one reference speed (reduced on
// load), or a map over front and rear ride height whose operating point follows from the springs'
// deflection under the aero load at each speed.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/base/violation.hpp"

namespace lapwing {

/// A config's coefficients: drag and downforce areas (m2) and the front share of downforce
/// (README, "Car").
inline constexpr Range cda_range{0.0, 20.0}, cla_range{0.0, 30.0}, balance_range{0.0, 1.0};

/// Values over a grid of front x rear ride height: rows() front heights x cols() rear ones,
/// read (front, rear). A plain grid (no linear algebra is done on it), so that the headers that
/// carry a car need no matrix library.
class MapGrid {
 public:
  MapGrid() = default;
  MapGrid(std::size_t rows, std::size_t cols, double value = 0.0)
      : rows_(rows), cols_(cols), values_(rows * cols, value) {}
  std::size_t rows() const { return rows_; }
  std::size_t cols() const { return cols_; }
  double& operator()(std::size_t i, std::size_t j) { return values_[i * cols_ + j]; }
  double operator()(std::size_t i, std::size_t j) const { return values_[i * cols_ + j]; }
  /// Every node, row by row (to scale or shift the whole grid).
  std::vector<double>& values() { return values_; }
  const std::vector<double>& values() const { return values_; }

 private:
  std::size_t rows_ = 0, cols_ = 0;
  std::vector<double> values_;
};

/// CdA, ClA and balance over a grid of front x rear ride height (m), bilinear between nodes.
/// Grids are indexed (front, rear).
struct RideHeightMap {
  std::vector<double> front_m, rear_m;  // strictly increasing, >= 2 points each
  MapGrid cda_m2, cla_m2, balance;
  double static_front_m, static_rear_m;            // ride heights at rest
  double stiffness_front_npm, stiffness_rear_npm;  // heave stiffness at the axle, N/m

  /// The first value that breaks a rule, in the order of a config's keys (key paths as there:
  /// "ride_height_map.front[1]", "static_ride_height.rear", "heave_stiffness.front").
  std::optional<Violation> validate() const;
  /// The part of validate() on the axes, which the grids' sizes follow.
  std::optional<Violation> validate_axes() const;
};

/// Changes to the coefficients where movable aero is trimmed for the straights: on points with
/// |curvature| below `below_curvature_1pm` while the car is under drive (solver.hpp, under_drive),
/// and inside a trim zone where the track has them (Track::trim_zones).
struct StraightTrim {
  double dcda_m2 = 0.0, dcla_m2 = 0.0, dbalance = 0.0;
  double below_curvature_1pm = 0.0;
};

/// Coefficients and, for a map, the operating point at one speed.
struct AeroPoint {
  double cda_m2, cla_m2, balance;
  double front_ride_m, rear_ride_m;  // the static heights for configs without a map
  bool off_map = false;   // a ride height beyond the map's range (coefficients held at its edge)
  bool grounded = false;  // a ride height at or below zero
};

/// A ride-height map's coefficients at (front, rear), bilinear; outside the grid, held at the
/// nearest edge (and `off` set).
struct MapCoefficients {
  double cda_m2, cla_m2, balance;
  bool off;
};
MapCoefficients map_coefficients(const RideHeightMap& map, double front_m, double rear_m);

/// Solves the ride heights at speed v where each axle's deflection equals its aero load over its
/// stiffness:  h_f = h_f0 - F_f / k_f,  h_r = h_r0 - F_r / k_r, with
///   F_f = q ClA(h) bal(h) - q CdA(h) z_D / L,   F_r = q ClA(h) (1 - bal(h)) + q CdA(h) z_D / L,
/// q = rho v^2 / 2 (the drag moment loads the rear and unloads the front: aero_axle_loads,
/// loads.hpp). Newton's method with a
/// finite-difference Jacobian, damped, from `guess`. Throws std::runtime_error when it does not
/// converge (the caller names the config).
AeroPoint solve_ride_heights(const RideHeightMap& map, double speed_mps, double density_kg_m3,
                             double drag_height_m, double wheelbase_m, double guess_front_m,
                             double guess_rear_m);

/// Forces measured or computed per part at one reference speed and density.
struct AeroPart {
  std::string name;
  double drag_n, downforce_n;  // downforce may be negative (lift)
  double x_m;                  // downforce position rearward of the front axle
  double z_m;                  // height of the part's drag
};

/// A parts table as a car file gives it (`forces:`): the parts at one reference speed and
/// density.
struct PartsTable {
  double speed_mps, density_kg_m3;
  std::vector<AeroPart> parts;
  /// The first value that breaks a rule (key paths as under `forces:`: "speed",
  /// "parts[2].drag"), then net lift, which is not modelled.
  std::optional<Violation> validate() const;
};

/// The constant coefficients a parts table stands for:
///   CdA = sum(drag) / q,  ClA = sum(downforce) / q,  q = rho_ref V_ref^2 / 2;
///   balance (front share, lever rule about the axles) = sum(downforce (L - x) / L) /
///   sum(downforce); drag height = sum(drag z) / sum(drag).
struct PartsReduction {
  double cda_m2, cla_m2, balance, drag_height_m;
};
PartsReduction reduce_parts(const std::vector<AeroPart>& parts, double speed_mps,
                            double density_kg_m3, double wheelbase_m);

/// One aero configuration (README, "Car", its four forms). Whatever form it was given in, it is
/// coefficients over speed: a constant configuration has one row (speed_mps empty); a speed table
/// many; a parts table is reduced to one row on load; a ride-height map is solved per air and speed
/// by the Envelope (see aero.hpp).
struct AeroConfig {
  enum class Form { constant, speed_table, forces, ride_height_map };
  std::string name;
  Form form = Form::constant;
  std::vector<double> speed_mps;  // empty: constant coefficients
  std::vector<double> cda_m2;
  std::vector<double> cla_m2;
  std::vector<double> balance;  // front share of downforce, without the drag moment
  std::optional<RideHeightMap> map;
  std::optional<PartsTable> parts;  // the forces form's table as given (a family blends it)
  std::optional<StraightTrim> trim;
  // Car-level values this configuration overrides (README, "Car"); a parts table sets
  // drag_height_m from its parts.
  std::optional<double> mass_kg, inertia_factor, cg_height_m, front_weight, drag_height_m;

  /// Whether the coefficients are the same at every speed: one row (a constant config, a parts
  /// table reduced on load), no ride-height map.
  bool one_row() const { return !map && speed_mps.size() <= 1; }

  /// The first value of the aero data that breaks a rule, in the order of the config's keys in
  /// a car file (key paths relative to the config: "cda", "speed_table.cla[2]",
  /// "straight_trim"). The overrides are the car's values: Car::validate checks them.
  std::optional<Violation> validate() const;
};

std::string_view form_name(AeroConfig::Form f);

/// Why configs `a` and `b` cannot be blended, or nothing: they must have the same form, the same
/// speed rows (speed table), the same parts in the same order (forces), the same map axes (ride
/// height map), both or neither a straight trim and each override.
std::optional<std::string> blend_mismatch(const AeroConfig& a, const AeroConfig& b);

/// The config a fraction t in [0, 1] of the way from `a` to `b`, every value linear:
///   x = (1 - t) x_a + t x_b
/// for the coefficients (each speed row), a map's cells, static heights and stiffnesses, the
/// trim and the overrides. A parts table blends each part's force coefficients F / q and its
/// positions, then is reduced at `wheelbase_m` (reduce_parts), so the balance follows the
/// parts' positions rather than blending the two balances. `a` and `b` must blend
/// (blend_mismatch); the result keeps a's name.
AeroConfig blend(const AeroConfig& a, const AeroConfig& b, double t, double wheelbase_m);

/// A wing family (README, "Wing families"): configs measured at settings of one device (a flap
/// angle), and the config it stands for at the setting `at`, linear between the two measured
/// settings around it.
struct AeroFamily {
  std::string name;
  std::vector<double> setting_rad;   // strictly increasing, 2 or more
  std::vector<std::size_t> configs;  // indices into the car's configs, one per setting
  double at_rad;                     // in [setting.front(), setting.back()]
  /// Key paths relative to the family: "setting", "configs", "at".
  std::optional<Violation> validate() const;
};

/// The family's config at its setting `at` (named after the family): blend of the measured
/// configs around it. The family must be valid and its neighbours blend.
AeroConfig family_config(const AeroFamily& family, const std::vector<AeroConfig>& configs,
                         double wheelbase_m);

}  // namespace lapwing
