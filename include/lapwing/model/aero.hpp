// Aerodynamic data in the forms engineers receive it, reduced to coefficients over speed:
// constant coefficients, a table over speed, forces per part at one reference speed (reduced on
// load), or a map over front and rear ride height whose operating point follows from the springs'
// deflection under the aero load at each speed.
#pragma once

#include <Eigen/Core>

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/base/violation.hpp"

namespace lapwing {

/// CdA, ClA and balance over a grid of front x rear ride height (m), bilinear between nodes.
/// Matrices are indexed (front, rear).
struct RideHeightMap {
  std::vector<double> front_m, rear_m;  // strictly increasing, >= 2 points each
  Eigen::MatrixXd cda_m2, cla_m2, balance;
  double static_front_m, static_rear_m;            // ride heights at rest
  double stiffness_front_npm, stiffness_rear_npm;  // heave stiffness at the axle, N/m

  /// The first value that breaks a rule, in the order of a config's keys (key paths as there:
  /// "ride_height_map.front[1]", "static_ride_height.rear", "heave_stiffness.front").
  std::optional<Violation> validate() const;
  /// The part of validate() on the axes, which the grids' sizes follow.
  std::optional<Violation> validate_axes() const;
};

/// Changes to the coefficients where movable aero is trimmed for the straights: on points with
/// |curvature| below `below_curvature_1pm` while the car is under drive (solver.hpp, under_drive).
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
  std::optional<StraightTrim> trim;
  // Car-level values this configuration overrides (README, "Car"); a parts table sets
  // drag_height_m from its parts.
  std::optional<double> mass_kg, inertia_factor, cg_height_m, front_weight, drag_height_m;

  /// The first value of the aero data that breaks a rule, in the order of the config's keys in
  /// a car file (key paths relative to the config: "cda", "speed_table.cla[2]",
  /// "straight_trim"). The overrides are the car's values: Car::validate checks them.
  std::optional<Violation> validate() const;
};

std::string_view form_name(AeroConfig::Form f);

}  // namespace lapwing
