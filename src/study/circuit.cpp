#include "lapwing/study/circuit.hpp"

#include <cstdio>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

Circuit lay_out(const Track& track, const Air& air) {
  Circuit c{track, build_mesh(track, track.mesh_m), air, {}};
  c.corners = find_corners(c.mesh);
  return c;
}

namespace {
// An open track's start speed above what the car can hold there is bad input (the track's).
void check_start_speed(const Circuit& c, const Lap& lap) {
  if (!c.track.closed && c.track.start_speed_mps > lap.steady.speed_mps.front() * (1 + 1e-9)) {
    char buf[160];
    std::snprintf(buf, sizeof buf,
                  "start_speed %.1f km/h is more than the car can hold at the start (%.1f km/h)",
                  c.track.start_speed_mps / units::kph, lap.steady.speed_mps.front() / units::kph);
    throw InputError(c.track.file, c.track.start_speed_mark, buf, "start_speed");
  }
}
}  // namespace

LapRun run_lap(const Car& car, const Circuit& c, LapSolver& solver) {
  const Envelope env(car, c.air);
  const Lap& lap = solver.solve(env, c.mesh, c.track.start_speed_mps);
  check_start_speed(c, lap);
  LapRun r{lap, summarize(lap, c.mesh, c.track, c.corners, env)};
  return r;
}

const Lap& solve_speed_only(const Envelope& env, const Circuit& c, LapSolver& solver) {
  const Lap& lap = solver.solve(env, c.mesh, c.track.start_speed_mps, false);
  check_start_speed(c, lap);
  return lap;
}

double lap_time(const Car& car, const Circuit& c, LapSolver& solver) {
  const Envelope env(car, c.air);
  return solve_speed_only(env, c, solver).lap_time_s;
}

LapRun run_lap(const Car& car, const Circuit& c) {
  LapSolver solver;
  return run_lap(car, c, solver);
}

}  // namespace lapwing
