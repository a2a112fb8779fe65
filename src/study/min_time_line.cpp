#include "lapwing/study/min_time_line.hpp"

#include <algorithm>
#include <cmath>

#include "lapwing/path/racing_line.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

namespace {

// The weight where the lap is not grip-limited, and how sharply it rises towards the limit
// (at 90 % of the steady speed: 0.72; at 95 %: 0.83). Measured on the bundled circuits 12 m wide
// with both cars (first configs): a floor of 0.05 lets the update put curvature on the
// straights, which then become corners (every lap slower by 3 to 15 %); 0.5 with the power 8
// gained 0.4 to 1.1 %, more than 0.3 to 0.8 with the power 4 or the floor 0.8 with the power 2.
constexpr double weight_floor = 0.5;
constexpr double weight_power = 8.0;

// Per reference point: how close the lap on the line runs to the tyres' steady limit.
std::vector<double> grip_weights(const PathProfile& line, const Mesh& mesh, const Lap& lap,
                                 const SteadyProfile& steady, std::size_t points) {
  std::vector<double> w(points);
  for (std::size_t i = 0; i < points; ++i) {
    const auto j =
        std::min(mesh.size() - 1, static_cast<std::size_t>(std::lround(line.s_m[i] / mesh.step_m)));
    if (steady.limit[j] != SteadyLimit::grip) {
      w[i] = weight_floor;
      continue;
    }
    const double r = std::min(1.0, lap.speed_mps[j] / steady.speed_mps[j]);
    w[i] = weight_floor + (1.0 - weight_floor) * std::pow(r, weight_power);
  }
  return w;
}

}  // namespace

MinTimeLine min_time_line(const Track& track, const Air& air, const ConfiguredCar& car,
                          const LineSpec& spec) {
  const LineReference ref = line_reference(track);
  LineOptions o;
  o.vehicle_width_m = spec.vehicle_width_m;
  o.margin_m = spec.margin_m;
  RacingLine line = min_curvature_line(ref, o);
  Track t = track;
  t.line_path = line_profile(ref, line);
  LapSolver solver;
  solver.set_threads(lone_lap_threads());
  const Envelope env(car, air);
  Circuit c = lay_out(t, air);
  const Lap* current = &solve_speed_only(env, c, solver);
  double lap = current->lap_time_s;
  MinTimeLine out;
  out.min_curvature_lap_s = lap;
  out.laps_s.push_back(lap);
  out.line = *t.line_path;
  out.lap_s = lap;
  for (int pass = 0; pass < min_time_max_passes; ++pass) {
    o.weights = grip_weights(*t.line_path, c.mesh, *current, solver.steady(), ref.size());
    const RacingLine candidate = min_curvature_line(ref, o, line.offset_m);
    // The update's step: the whole way to the weighted line, or half or a quarter of it (the
    // weights were read on the line before; a full step can overshoot where the lap becomes
    // grip-limited on the new line). The step with the fastest lap is taken.
    double best_lap = lap;
    RacingLine best_line = line;
    for (double step : {1.0, 0.5, 0.25}) {
      RacingLine trial = candidate;
      for (std::size_t i = 0; i < ref.size(); ++i)
        trial.offset_m[i] = line.offset_m[i] + step * (candidate.offset_m[i] - line.offset_m[i]);
      trial = with_offsets(ref, trial);
      t.line_path = line_profile(ref, trial);
      const Circuit trial_circuit = lay_out(t, air);
      const double trial_lap = solve_speed_only(env, trial_circuit, solver).lap_time_s;
      if (trial_lap < best_lap) best_lap = trial_lap, best_line = trial;
    }
    ++out.passes;
    out.laps_s.push_back(best_lap);
    const double gain = lap - best_lap;
    if (gain <= 0.0) break;
    line = best_line;
    lap = best_lap;
    t.line_path = line_profile(ref, line);
    c = lay_out(t, air);
    current = &solve_speed_only(env, c, solver);
    out.line = *t.line_path;
    out.lap_s = lap;
    if (gain < min_time_gain_s) break;
  }
  return out;
}

}  // namespace lapwing
