#include "lapwing/study/circuit.hpp"

#include <cstdio>
#include <string>
#include <thread>

#include "lapwing/base/error.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

std::optional<Violation> configs_violation(const Car& car,
                                           const std::vector<std::size_t>& configs) {
  FirstViolation f;
  f.rule(!configs.empty(), "configs", "at least one config is needed");
  for (std::size_t k = 0; k < configs.size(); ++k) {
    f.rule(configs[k] < car.configs.size(), "configs", [&] {
      return "config index " + std::to_string(configs[k]) + " is not one of the car's (it has " +
             std::to_string(car.configs.size()) + ")";
    });
    for (std::size_t j = 0; j < k; ++j)
      f.rule(configs[j] != configs[k], "configs",
             [&] { return "config index " + std::to_string(configs[k]) + " is given twice"; });
  }
  return f.result();
}

Circuit lay_out(const Track& track, const Air& air, MeshPositions positions) {
  Circuit c{track, build_mesh(track, track.mesh_m, 0, positions), air, {}};
  c.corners = find_corners(c.mesh);
  return c;
}

namespace {
// An open track's start speed above what the car can hold there is bad input (the track's):
// above the tyres' limit at the start (or an axle's lift, or the top of the car's tables). A
// start above the engine's steady limit alone is a flying start: the car slows to it
// (LapSolver::start_limit_mps).
void check_start_speed(const Circuit& c, const LapSolver& solver) {
  if (!c.track.closed && c.track.start_speed_mps > solver.start_limit_mps() * (1 + 1e-9)) {
    char buf[160];
    std::snprintf(buf, sizeof buf,
                  "start_speed %.1f km/h is more than the car can hold at the start (%.1f km/h)",
                  c.track.start_speed_mps / units::kph, solver.start_limit_mps() / units::kph);
    throw InvalidInput(c.track.subject(), broken_rule("start_speed", buf));
  }
}
}  // namespace

LapRun run_lap(const ConfiguredCar& car, const Circuit& c, LapSolver& solver) {
  const Envelope env(car, c.air);
  const Lap& lap = solver.solve(env, c.mesh, c.track.start_speed_mps);
  check_start_speed(c, solver);
  LapRun r{lap, summarize(lap, c.mesh, c.track, c.corners, env)};
  return r;
}

const Lap& solve_speed_only(const Envelope& env, const Circuit& c, LapSolver& solver) {
  const Lap& lap = solver.solve_speed(env, c.mesh, c.track.start_speed_mps);
  check_start_speed(c, solver);
  return lap;
}

double lap_time(const ConfiguredCar& car, const Circuit& c, LapSolver& solver) {
  const Envelope env(car, c.air);
  return solve_speed_only(env, c, solver).lap_time_s;
}

LapRun run_lap(const ConfiguredCar& car, const Circuit& c) {
  // The lap moved out of a solver of its own, not copied: one lap in memory, not two, and the
  // solver's steady limits and sweeps freed before its channels are made (the start speed is
  // checked against the steady limits first).
  const Envelope env(car, c.air);
  Lap lap;
  {
    LapSolver solver;
    solver.set_threads(lone_lap_threads());
    solve_speed_only(env, c, solver);
    lap = solver.take_with_channels(env, c.mesh);
  }
  LapSummary summary = summarize(lap, c.mesh, c.track, c.corners, env);
  return LapRun{std::move(lap), std::move(summary)};
}

unsigned lone_lap_threads() {
  return usable_processors() >= 2 ? 2 : 1;
}

}  // namespace lapwing
