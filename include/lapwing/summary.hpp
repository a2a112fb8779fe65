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
  std::string limit;  // "grip" (apex on the tyres' steady limit), "power" (taken under drive,
                      // never reaching the limit), "braking" (apex inside a braking zone)
};

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
};

LapSummary summarize(const Lap& lap, const Mesh& mesh, const Track& track,
                     const std::vector<CornerSpan>& corners, const Envelope& env);

/// What the lap's speeds take the aero data beyond: ride heights off the map or at zero, speeds
/// past a speed table's last row (for speeds up to `top_speed_mps`).
std::vector<std::string> aero_warnings(const Envelope& env, double top_speed_mps);

/// Time at distance s along the lap, linear between mesh points.
double time_at(const Lap& lap, const Mesh& mesh, double s_m);

}  // namespace lapwing
