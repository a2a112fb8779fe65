// A line refined towards the minimum lap time (Kapania, Subosits & Gerdes, "A sequential two-step
// algorithm for fast generation of vehicle racing trajectories", J. Dyn. Sys. Meas. Control 138
// (2016) 091005): alternate (1) the speed profile on the current line (the lap solver) with (2) a
// path update that minimises curvature weighted by where that lap is grip-limited, starting
// from the minimum-curvature line and stopping when a pass gains less than 0.01 s.
//
// The weight of a point is how close the lap runs to the tyres' steady limit there:
//   w_i = 1/2 + 1/2 (v_i / v_steady_i)^8  where the steady limit is the tyres',
//   w_i = 1/2                             where it is the engine's (a straight),
// so the update straightens the line where speed is bought with grip (corners, and the braking
// and traction zones next to them, where the lap runs near the limit) and lets it bend more
// where curvature costs less time. Each update is taken whole, half or a quarter of the way
// from the line before (whichever laps fastest: the weights were read on the line before, and a
// whole step can overshoot), and only when it gains. The refined line depends on the car.
#pragma once

#include <vector>

#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"

namespace lapwing {

struct MinTimeLine {
  PathProfile line;                  // the best line found (source line)
  double min_curvature_lap_s = 0.0;  // the lap on the minimum-curvature line it started from
  double lap_s = 0.0;                // the lap on `line`
  std::vector<double> laps_s;        // the lap after each pass (the first: min-curvature)
  int passes = 0;                    // path updates made
};

/// Stops when a pass gains less than this (issue 13).
inline constexpr double min_time_gain_s = 0.01;
/// At most this many path updates.
inline constexpr int min_time_max_passes = 20;

/// The refined line over `track`'s described path, for `configured_car` (one config) in `air`,
/// with the vehicle width and margin of `spec`. InvalidInput as min_curvature_line and as run_lap
/// (an open track's start speed); CannotMove as run_lap.
MinTimeLine min_time_line(const Track& track, const Air& air, const ConfiguredCar& configured_car,
                          const LineSpec& spec);

}  // namespace lapwing
