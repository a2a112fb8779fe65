// What a solved lap comes to: lap and sector times, speeds, time shares, and the corners with
// their entry, apex and exit speeds and what limits them. One object feeds the terminal table,
// the JSON and the CSV alike (STYLE, habit 6).
#pragma once

#include <string>
#include <vector>

#include "lapwing/corners.hpp"
#include "lapwing/envelope.hpp"
#include "lapwing/mesh.hpp"
#include "lapwing/solver.hpp"
#include "lapwing/track.hpp"

namespace lapwing {

struct CornerResult {
  int id;
  int direction;  // +1 left, -1 right
  double start_m, apex_m, end_m;
  double entry_mps, apex_mps, exit_mps;
  double time_s;
  std::string limit;  // "grip" (apex on the tyres' steady limit, or a point of the corner on
                      // it within 0.05 % of the apex speed), "power" (taken under drive,
                      // never reaching the limit), "braking" (apex inside a braking zone)
  // The axle using more of its ellipse ("front" or "rear") at entry, apex and exit.
  std::string entry_axle, apex_axle, exit_axle;
};

/// The balance of one lap: where the front axle's share of the load goes, and where the front
/// saturates first (balance_index = front usage - rear usage > 0: an understeer tendency).
struct BalanceSummary {
  double static_front_share;
  // Aero balance (front share of downforce) at 150 and 250 km/h, alone and with the drag moment.
  double aero_balance_150, aero_balance_eff_150, aero_balance_250, aero_balance_eff_250;
  bool has_fast_acceleration;              // any point accelerating above 200 km/h
  double lowest_front_share_fast;          // lowest front share accelerating above 200 km/h
  double lowest_front_share_at_m;          // where
  std::vector<int> front_limited_corners;  // corners whose apex the front axle limits
  double threshold;                        // on balance_index
  double front_limited_length_m;           // lap length with balance_index above it
};

inline constexpr double balance_index_threshold = 0.05;

struct LapSummary {
  std::string track_name, track_id, config;
  double lap_time_s;
  double length_m;
  double air_density_kg_m3;
  double top_speed_mps, min_speed_mps;
  double full_throttle_fraction;      // share of lap time under full drive (accelerate, top_speed)
  double braking_fraction;            // share of lap time under braking
  double trimmed_fraction;            // share of lap time with the straight-line trim in use
  std::vector<std::string> warnings;  // e.g. a ride height off the map within the lap's speeds
  std::vector<double> sectors_s;
  std::vector<CornerResult> corners;
  BalanceSummary balance;
};

LapSummary summarize(const Lap& lap, const Mesh& mesh, const Track& track,
                     const std::vector<CornerSpan>& corners, const Envelope& env);

/// What the lap's speeds take the aero data beyond: ride heights off the map or at zero, speeds
/// past a speed table's last row (for speeds up to `top_speed_mps`).
std::vector<std::string> aero_warnings(const Envelope& env, double top_speed_mps);

/// Time at distance s along the lap, linear between mesh points.
double time_at(const Lap& lap, const Mesh& mesh, double s_m);

}  // namespace lapwing
