#include "lapwing/summary.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "lapwing/units.hpp"

namespace lapwing {

namespace {
constexpr double apex_tie = 5e-4;  // relative: 0.05 km/h at 100 km/h
}  // namespace

std::vector<std::string> aero_warnings(const Envelope& env, double top_speed_mps) {
  std::vector<std::string> w;
  auto kph_text = [](double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1f", v / units::kph);
    return std::string(buf);
  };
  const AeroConfig& a = env.car().configs.front();
  if (env.has_map()) {
    if (env.grounded_speed_mps() >= 0.0 && env.grounded_speed_mps() <= top_speed_mps)
      w.push_back("a ride height reaches zero at " + kph_text(env.grounded_speed_mps()) +
                  " km/h (top speed " + kph_text(top_speed_mps) + " km/h)");
    if (env.off_map_speed_mps() >= 0.0 && env.off_map_speed_mps() <= top_speed_mps)
      w.push_back("a ride height leaves the map at " + kph_text(env.off_map_speed_mps()) +
                  " km/h (top speed " + kph_text(top_speed_mps) +
                  " km/h); coefficients held at the map's edge beyond");
  }
  if (a.speed_mps.size() > 1 && top_speed_mps > a.speed_mps.back())
    w.push_back("speeds above the speed table's last row (" + kph_text(a.speed_mps.back()) +
                " km/h) use its values");
  return w;
}

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

  // Time shares: each interval's time is split half to each of its end points' phases. A lone
  // point on a steady limit between two other phases (braking into a limit that only touches
  // the speed there, drive out of it) is the car touching its limit: no time is spent there,
  // and its halves go to the phases on either side. Counted as its own, it took a step's time
  // per touch: 0.5 points of a noisy survey lap at 0.5 m, nothing on a fine mesh.
  const std::size_t n = mesh.size();
  auto touch = [&](std::size_t i) {
    const Phase p = lap.phase[i];
    if (p != Phase::corner && p != Phase::top_speed) return false;
    std::size_t before = i - 1, after = i + 1;
    if (i == 0 || i + 1 == n) {
      if (!mesh.closed) return false;
      before = n - 2;  // the seam: point n-1 is point 0
      after = 1;
    }
    return lap.phase[before] != p && lap.phase[after] != p;
  };
  double full = 0.0, brake = 0.0, trimmed = 0.0;
  auto is_full = [](Phase p) { return p == Phase::accelerate || p == Phase::top_speed; };
  for (std::size_t i = 0; i + 1 < n; ++i) {
    const double half = 0.5 * (lap.time_s[i + 1] - lap.time_s[i]);
    const Phase a = touch(i) ? lap.phase[i + 1] : lap.phase[i];
    const Phase b = touch(i + 1) ? lap.phase[i] : lap.phase[i + 1];
    full += half * (is_full(a) + is_full(b));
    brake += half * ((a == Phase::brake) + (b == Phase::brake));
    trimmed += half * (lap.trimmed[i] + lap.trimmed[i + 1]);
  }
  s.trimmed_fraction = trimmed / lap.lap_time_s;
  s.warnings = aero_warnings(env, s.top_speed_mps);
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
    auto axle = [&lap](std::size_t i) {
      return lap.front_usage[i] >= lap.rear_usage[i] ? std::string("front") : std::string("rear");
    };
    r.entry_axle = axle(c.start);
    r.apex_axle = axle(apex);
    r.exit_axle = axle(c.end);
    // On the steady grip limit at the apex speed: at the apex, or anywhere in the corner within
    // apex_tie of its speed. Speeds that close are a tie (tables show 0.1 km/h), and which of
    // them is lowest turns on the mesh: an upshift's cut on the exit, which starts within a step
    // of its speed, can dip 0.01 km/h under the speed of the arc the tyres limit.
    bool on_grip_limit = false;
    for (std::size_t i = c.start; i <= c.end && !on_grip_limit; ++i)
      on_grip_limit = lap.phase[i] == Phase::corner &&
                      lap.speed_mps[i] <= lap.speed_mps[apex] * (1.0 + apex_tie);
    switch (on_grip_limit ? Phase::corner : lap.phase[apex]) {
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

  // Balance.
  BalanceSummary& b = s.balance;
  const Car& car = env.car();
  b.static_front_share = car.front_weight;
  auto balance_at = [&](double kph_value, double& plain, double& eff) {
    const double v = kph_value * units::kph;
    const AeroPoint p = env.aero_point(v);
    const double q = 0.5 * env.air_density() * v * v;
    const double down = q * p.cla_m2, drag = q * p.cda_m2;
    plain = p.balance;
    eff = down > 0.0 ? (down * p.balance - drag * car.drag_height_m / car.wheelbase_m) / down
                     : p.balance;
  };
  balance_at(150.0, b.aero_balance_150, b.aero_balance_eff_150);
  balance_at(250.0, b.aero_balance_250, b.aero_balance_eff_250);
  b.has_fast_acceleration = false;
  b.lowest_front_share_fast = 0.0;
  b.lowest_front_share_at_m = 0.0;
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    const bool accelerating = lap.phase[i] == Phase::accelerate || lap.phase[i] == Phase::top_speed;
    if (!accelerating || lap.speed_mps[i] <= 200.0 * units::kph) continue;
    if (!b.has_fast_acceleration || lap.front_share[i] < b.lowest_front_share_fast) {
      b.lowest_front_share_fast = lap.front_share[i];
      b.lowest_front_share_at_m = mesh.s_m[i];
      b.has_fast_acceleration = true;
    }
  }
  for (const auto& c : s.corners)
    if (c.apex_axle == "front") b.front_limited_corners.push_back(c.id);
  b.threshold = balance_index_threshold;
  b.front_limited_length_m = 0.0;
  for (std::size_t i = 0; i + 1 < mesh.size(); ++i) {
    // Each interval counts half for each end above the threshold.
    const double over = 0.5 * ((lap.front_usage[i] - lap.rear_usage[i] > b.threshold) +
                               (lap.front_usage[i + 1] - lap.rear_usage[i + 1] > b.threshold));
    b.front_limited_length_m += over * mesh.step_m;
  }
  return s;
}

}  // namespace lapwing
