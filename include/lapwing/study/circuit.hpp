// A track laid out for study (its mesh, air and corners) and one lap round it: the unit of work
// every study repeats.
#pragma once

#include <optional>
#include <vector>

#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/corners.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"

namespace lapwing {

/// The first problem of a list of config indices into `car`: none, one out of range, or one
/// given twice (key path "configs").
std::optional<Violation> configs_violation(const Car& car, const std::vector<std::size_t>& configs);

/// A track laid out for study: its mesh, the air it is run in, its corners. Its mesh's
/// positions as `positions` says (build_mesh): a study that writes no map, trace or line
/// leaves them out.
struct Circuit {
  Track track;
  Mesh mesh;
  Air air;
  std::vector<CornerSpan> corners;
};
Circuit lay_out(const Track& track, const Air& air,
                MeshPositions positions = MeshPositions::laid_out);

/// One solved lap and what it comes to.
struct LapRun {
  Lap lap;
  LapSummary summary;
};

/// Solves `car` (one config applied) round `circuit`. An open track's start speed above what
/// the car can hold there is an InvalidInput of the track ("start_speed"); a car that breaks a
/// rule, of the car (the Envelope checks it).
LapRun run_lap(const ConfiguredCar& car, const Circuit& circuit, LapSolver& solver);
/// The lap time alone (speed profile and time, no channels or summary).
double lap_time(const ConfiguredCar& car, const Circuit& circuit, LapSolver& solver);
/// The speed profile and time alone of the car `env` tabulates, round `circuit` in `solver`
/// (valid until its next solve); the start speed checked as run_lap does.
const Lap& solve_speed_only(const Envelope& env, const Circuit& circuit, LapSolver& solver);
/// The same in a solver of its own, on lone_lap_threads() threads.
LapRun run_lap(const ConfiguredCar& car, const Circuit& circuit);
/// Threads a lap solved alone, outside a pool of threads, may use (LapSolver::set_threads): 2
/// where the process may run on two processors or more (usable_processors), else 1. The lap is
/// the same either way.
unsigned lone_lap_threads();

}  // namespace lapwing
