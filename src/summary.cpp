#include "lapwing/summary.hpp"

#include <algorithm>
#include <cmath>

namespace lapwing {

double time_at(const Lap& lap, const Mesh& mesh, double s) {
  const double f = std::clamp(s / mesh.step_m, 0.0, static_cast<double>(mesh.intervals()));
  const std::size_t i = std::min(static_cast<std::size_t>(f), mesh.intervals() - 1);
  const double w = f - static_cast<double>(i);
  return lap.time_s[i] + w * (lap.time_s[i + 1] - lap.time_s[i]);
}

LapSummary summarize(const Lap& lap, const Mesh& mesh, const Track& track,
                     const std::vector<CornerSpan>& spans, const Envelope& env) {
  LapSummary s;
  s.track_name = track.name;
  s.track_id = track.id;
  s.config = env.config_name();
  s.lap_time_s = lap.lap_time_s;
  s.length_m = mesh.length_m;
  s.air_density_kg_m3 = env.air_density();
  s.top_speed_mps = *std::max_element(lap.speed_mps.begin(), lap.speed_mps.end());
  s.min_speed_mps = *std::min_element(lap.speed_mps.begin(), lap.speed_mps.end());

  // Time shares: each interval's time is split half to each of its end points' phases.
  double full = 0.0, brake = 0.0;
  auto is_full = [](Phase p) { return p == Phase::accelerate || p == Phase::top_speed; };
  for (std::size_t i = 0; i + 1 < mesh.size(); ++i) {
    const double half = 0.5 * (lap.time_s[i + 1] - lap.time_s[i]);
    full += half * (is_full(lap.phase[i]) + is_full(lap.phase[i + 1]));
    brake += half * ((lap.phase[i] == Phase::brake) + (lap.phase[i + 1] == Phase::brake));
  }
  s.full_throttle_fraction = full / lap.lap_time_s;
  s.braking_fraction = brake / lap.lap_time_s;

  for (std::size_t k = 0; k < track.sectors_m.size(); ++k) {
    const double a = track.sectors_m[k];
    const double b = k + 1 < track.sectors_m.size() ? track.sectors_m[k + 1] : mesh.length_m;
    s.sectors_s.push_back(time_at(lap, mesh, b) - time_at(lap, mesh, a));
  }

  for (const auto& c : spans) {
    CornerResult r;
    r.id = c.id;
    r.direction = c.direction;
    std::size_t apex = c.start;
    for (std::size_t i = c.start; i <= c.end; ++i)
      if (lap.speed_mps[i] < lap.speed_mps[apex]) apex = i;
    r.start_m = mesh.s_m[c.start];
    r.apex_m = mesh.s_m[apex];
    r.end_m = mesh.s_m[c.end];
    r.entry_mps = lap.speed_mps[c.start];
    r.apex_mps = lap.speed_mps[apex];
    r.exit_mps = lap.speed_mps[c.end];
    r.time_s = lap.time_s[c.end] - lap.time_s[c.start];
    switch (lap.phase[apex]) {
      case Phase::corner:
        r.limit = "grip";
        break;
      case Phase::brake:
        r.limit = "braking";
        break;
      default:
        r.limit = "power";
        break;
    }
    s.corners.push_back(r);
  }
  return s;
}

}  // namespace lapwing
