#include "lapwing/solve/summary.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <optional>
#include <string>

#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/solve/axle.hpp"

namespace lapwing {

namespace {
std::string kph_text(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f", v / units::kph);
  return std::string(buf);
}

// Speeds at or above this share of the tables' top are "at the top": the sweeps and the steady
// limit hold the speed exactly at the top there, round-off aside.
constexpr double at_top_rel = 1e-12;
constexpr double apex_tie = 5e-4;  // relative: 0.05 km/h at 100 km/h
// Speeds within this share of a corner's lowest are one plateau: an arc taken on its steady
// limit holds the same speed from point to point, and where that limit is worked again (the
// two halves of the steady limits start afresh, LapSolver) it can come out an ulp or two apart.
// The apex is the plateau's first point, whichever of its points rounding makes the lowest. Far
// above rounding (1e-16) and the root searches' tolerance (2^-36, 1.5e-11), far below anything
// a table shows (1e-9 of 100 km/h is 1e-7 km/h).
constexpr double apex_plateau = 1e-9;

// An interval's length counted half for each of its ends where something holds (`ends`: 0, 1
// or 2), as the shares of the lap distance below add it up: 0.5 (s_{i+1} - s_i) ends. None
// at neither end: the sum is left as it is, as adding the product (+0) leaves it.
inline double half_interval_share(const Mesh& mesh, std::size_t i, int ends) {
  return ends == 0 ? 0.0 : 0.5 * (mesh.s_m[i + 1] - mesh.s_m[i]) * ends;
}

// An axle's usage above this reads as asking more of its tyres than they hold. The axle model
// holds each axle within it (README, "Physics and assumptions": its traces stay within 1 + 0.02
// where braking meets a rear axle's steady limit); the point mass limits the car as a whole,
// four equally loaded tyres, and its axle readings can go far beyond.
constexpr double usage_over = 1.02;

// The warning for a lap whose axle usage goes beyond usage_over somewhere (nothing if nowhere):
// the highest reading, its axle and place, and the share of the lap distance above it.
std::optional<std::string> over_usage_warning(const Envelope& env, const Lap& lap,
                                              const Mesh& mesh) {
  const std::size_t n = mesh.size();
  if (lap.front_usage.size() != n || lap.rear_usage.size() != n) return std::nullopt;
  auto over_at = [&](std::size_t i) {
    return std::max(lap.front_usage[i], lap.rear_usage[i]) > usage_over;
  };
  // The usual lap has no reading over: nothing to warn of, and no more to work out.
  std::size_t first = 0;
  while (first < n && !over_at(first)) ++first;
  if (first == n) return std::nullopt;
  std::size_t worst = 0;
  bool front = true;
  double highest = 0.0, length = 0.0;
  // Each point's reading once: this point's `over` is the last one's `over_next`.
  bool over = over_at(0);
  for (std::size_t i = 0; i < n; ++i) {
    const double u = std::max(lap.front_usage[i], lap.rear_usage[i]);
    if (u > highest) {
      highest = u;
      worst = i;
      front = lap.front_usage[i] >= lap.rear_usage[i];
    }
    if (i + 1 < n) {
      const bool over_next = over_at(i + 1);
      length += half_interval_share(mesh, i, over + over_next);
      over = over_next;
    }
  }
  if (!(highest > usage_over)) return std::nullopt;
  char buf[200];
  const char* axle = front ? "front" : "rear";
  // axle_usage's lifted_axle_usage: an axle asked for force with no load left on it.
  if (highest >= lifted_axle_usage)
    std::snprintf(buf, sizeof buf,
                  "the %s axle is asked for force with no load on it (it would lift; its usage "
                  "reads 1e9) at %.0f m; usage above %.2f on %.1f %% of the lap distance",
                  axle, mesh.s_m[worst], usage_over, 100.0 * length / mesh.length_m);
  else
    std::snprintf(buf, sizeof buf,
                  "the %s axle's usage reaches %.2f at %.0f m, above %.2f on %.1f %% of the lap "
                  "distance",
                  axle, highest, mesh.s_m[worst], usage_over, 100.0 * length / mesh.length_m);
  std::string text = buf;
  if (env.car().model == VehicleModel::point_mass)
    text +=
        " (the point mass shares drive and braking over four equally loaded tyres and does "
        "not limit each axle; --model axle does)";
  return text;
}

// The warning for a lap on which a tyre's load passes the load where its force peaks under the
// linear load sensitivity (TyreModel::force_peak_load_n; nothing if nowhere): beyond it more
// downforce or load transfer gives that tyre less force, the car slows with more downforce at
// the same drag, and the law is used where it no longer describes a tyre (README, "Physics and
// assumptions", tyres). The heaviest tyre as the model loads it: the point mass shares the
// normal load by four; the axle model gives each axle's two tyres half its load, -+ the lateral
// transfer (Envelope::transfer: F_y = m |a_y| per newton, the outer tyre at most the axle's).
std::optional<std::string> tyre_peak_warning(const Envelope& env, const Lap& lap,
                                             const Mesh& mesh) {
  const std::size_t n = mesh.size();
  const double peak = env.tyres().force_peak_load_n();
  if (!std::isfinite(peak) || lap.front_load_n.size() != n || lap.rear_load_n.size() != n ||
      lap.lat_accel_mps2.size() != n)
    return std::nullopt;
  const bool axle = env.car().model == VehicleModel::axle;
  const TransferPerNewton& d = env.transfer();
  const double m = env.mass_kg();
  auto heaviest = [&](std::size_t i) {
    const double front = lap.front_load_n[i], rear = lap.rear_load_n[i];
    if (!axle) return 0.25 * (front + rear);
    const double fy = m * std::abs(lap.lat_accel_mps2[i]);
    return std::max(std::min(front, 0.5 * front + d.front * fy),
                    std::min(rear, 0.5 * rear + d.rear * fy));
  };
  // Before the first point past the peak nothing counts (no highest, no length): the walk
  // starts there, as it stood there (the usual lap has none, and nothing to warn of).
  std::size_t first = 0;
  while (first < n && !(heaviest(first) > peak)) ++first;
  std::size_t worst = 0;
  double highest = 0.0, length = 0.0;
  bool past_before = false;
  for (std::size_t i = first; i < n; ++i) {
    const double load = heaviest(i);  // NaN below the loads' floor: never past
    const bool past = load > peak;
    if (past && load > highest) {
      highest = load;
      worst = i;
    }
    if (i > 0) length += half_interval_share(mesh, i - 1, past + past_before);
    past_before = past;
  }
  if (!(highest > peak)) return std::nullopt;
  char buf[400];
  std::snprintf(buf, sizeof buf,
                "a tyre's load reaches %.0f N at %.0f m (%s km/h), past %.0f N where its force "
                "mu(Fz) Fz peaks under the load sensitivity (Fn (1 + s) / (2 s), s = %.3g): "
                "beyond it more load gives that tyre less force; past it on %.1f %% of the lap "
                "distance",
                highest, mesh.s_m[worst], kph_text(lap.speed_mps[worst]).c_str(), peak,
                env.tyres().load_sensitivity(), 100.0 * length / mesh.length_m);
  return std::string(buf);
}

// The warning for a lap held on an axle's lift limit somewhere (Lap::lift_hold; nothing if
// nowhere): at a steady speed the drag moment (and the aero balance) leave that axle no load,
// so the car holds that speed at 0 g under drive (phase top_speed), however much power is left.
std::optional<std::string> lift_hold_warning(const Lap& lap, const Mesh& mesh) {
  const Lap::LiftHold& h = lap.lift_hold;
  if (!h.held) return std::nullopt;
  char buf[400];
  std::snprintf(buf, sizeof buf,
                "the %s axle has no load left at %s km/h at a steady speed (from %.0f m): the "
                "drag moment and the aero balance take it all, and faster the car would pitch "
                "over, so it is held there at 0 g (phase top_speed) on %.1f %% of the lap "
                "distance; check gives this as the top speed's limit",
                h.front ? "front" : "rear", kph_text(lap.speed_mps[h.first]).c_str(),
                mesh.s_m[h.first], 100.0 * h.length_m / mesh.length_m);
  return std::string(buf);
}
}  // namespace

std::vector<std::string> lap_warnings(const Envelope& env, const Lap& lap, const Mesh& mesh) {
  std::vector<std::string> out = lap_range_warnings(env, lap, mesh);
  if (std::optional<std::string> w = over_usage_warning(env, lap, mesh)) out.push_back(*w);
  if (std::optional<std::string> w = tyre_peak_warning(env, lap, mesh)) out.push_back(*w);
  if (std::optional<std::string> w = lift_hold_warning(lap, mesh)) out.push_back(*w);
  return out;
}

std::vector<std::string> lap_speed_warnings(const Envelope& env, const Lap& lap, const Mesh& mesh,
                                            std::optional<SpeedRange> speeds) {
  std::vector<std::string> out = lap_range_warnings(env, lap, mesh, speeds);
  if (std::optional<std::string> w = lift_hold_warning(lap, mesh)) out.push_back(*w);
  return out;
}

std::vector<RangeNote> range_notes(const Envelope& env) {
  std::vector<RangeNote> notes;
  const AeroConfig& a = env.aero();
  if (a.speed_mps.size() > 1) {
    if (a.speed_mps.front() > 0.0)
      notes.push_back({RangeNote::Kind::below_speed_table, "below the speed table's first row (" +
                                                               kph_text(a.speed_mps.front()) +
                                                               " km/h) its values are held"});
    notes.push_back({RangeNote::Kind::above_speed_table, "above the speed table's last row (" +
                                                             kph_text(a.speed_mps.back()) +
                                                             " km/h) its values are held"});
  }
  if (env.has_map()) {
    // The speeds a span covers: "below 246.1 km/h", "from 162.4 km/h", "from A to B km/h".
    const auto speeds = [](const std::vector<Envelope::SpeedSpan>& spans) {
      std::string out;
      for (const Envelope::SpeedSpan& sp : spans) {
        out += out.empty() ? "" : ", ";
        if (sp.lo_mps <= 0.0 && std::isfinite(sp.hi_mps))
          out += "below " + kph_text(sp.hi_mps) + " km/h";
        else if (!std::isfinite(sp.hi_mps))
          out += "from " + kph_text(sp.lo_mps) + " km/h";
        else
          out += "from " + kph_text(sp.lo_mps) + " to " + kph_text(sp.hi_mps) + " km/h";
      }
      return out;
    };
    if (!env.off_map_spans().empty())
      notes.push_back({RangeNote::Kind::off_map, "a ride height is off the map (" +
                                                     speeds(env.off_map_spans()) +
                                                     "): the map's edge values are held there"});
    if (!env.grounded_spans().empty())
      notes.push_back({RangeNote::Kind::grounded,
                       "a ride height is at or below zero (" + speeds(env.grounded_spans()) + ")"});
  }
  const double top = env.max_speed_mps();
  std::string why;
  switch (env.table_top_reason()) {
    case TopSpeedLimit::rev_limit:
      why = "the rev limit in top gear";
      break;
    case TopSpeedLimit::drag: {
      char buf[32];
      std::snprintf(buf, sizeof buf, "%.2f", env.table_margin());
      // The top speed found on a 0.5 m/s grid (the first grid speed the drive falls short
      // at: Envelope): above the top speed itself, by up to a step.
      why = std::string(buf) + " x the level-road top speed, taken up to a 0.5 m/s step";
      break;
    }
    case TopSpeedLimit::ceiling:
    case TopSpeedLimit::traction:  // not a table's top (check's alone)
    case TopSpeedLimit::front_lift:
    case TopSpeedLimit::rear_lift:
      why = "the ceiling of the tables";
      break;
  }
  notes.push_back({RangeNote::Kind::table_top, "the car's tables end at " + kph_text(top) +
                                                   " km/h (" + why +
                                                   "): no speed goes beyond, it is held there"});
  return notes;
}

namespace {
// Whether speed v lies in one of the spans (an off-map or grounded note's speeds, their ends
// found between the map's solved speeds).
bool in_spans(const std::vector<Envelope::SpeedSpan>& spans, double v) {
  for (const Envelope::SpeedSpan& sp : spans)
    if (v >= sp.lo_mps && v < sp.hi_mps) return true;
  return false;
}

// Calls `f` with the note's test of a speed (m/s), a callable bool(double): the one place that
// says where each note applies. The kind is read once, not at every speed tested.
template <typename F>
decltype(auto) with_note_test(const Envelope& env, const RangeNote& note, F&& f) {
  const AeroConfig& a = env.aero();
  switch (note.kind) {
    case RangeNote::Kind::below_speed_table:
      return f([first = a.speed_mps.front()](double v) { return v < first; });
    case RangeNote::Kind::above_speed_table:
      return f([last = a.speed_mps.back()](double v) { return v > last; });
    case RangeNote::Kind::off_map:
      return f([&env](double v) { return in_spans(env.off_map_spans(), v); });
    case RangeNote::Kind::grounded:
      return f([&env](double v) { return in_spans(env.grounded_spans(), v); });
    case RangeNote::Kind::table_top:
      break;
  }
  return f([top = env.max_speed_mps() * (1.0 - at_top_rel)](double v) { return v >= top; });
}
}  // namespace

bool range_note_applies(const Envelope& env, const RangeNote& note, double v) {
  return with_note_test(env, note, [v](const auto& applies) { return applies(v); });
}

double range_note_share(const Envelope& env, const RangeNote& note, const Lap& lap,
                        const Mesh& mesh) {
  // Share of distance: each interval counts half for each end point the note applies at.
  const double length = with_note_test(env, note, [&](const auto& applies) {
    double sum = 0.0;
    bool here = applies(lap.speed_mps[0]);
    for (std::size_t i = 0; i + 1 < mesh.size(); ++i) {
      const bool next = applies(lap.speed_mps[i + 1]);
      sum += half_interval_share(mesh, i, here + next);
      here = next;
    }
    return sum;
  });
  return length / mesh.length_m;
}

std::vector<std::string> lap_range_warnings(const Envelope& env, const Lap& lap, const Mesh& mesh,
                                            std::optional<SpeedRange> speeds) {
  std::vector<std::string> out;
  for (const RangeNote& n : range_notes(env)) {
    // A note that applies nowhere has no share (0): most notes on most laps. A note set by a
    // speed alone applies somewhere exactly where it applies at the lowest or the highest.
    const bool by_speed = n.kind != RangeNote::Kind::off_map && n.kind != RangeNote::Kind::grounded;
    const bool anywhere = speeds && by_speed ? range_note_applies(env, n, speeds->lowest_mps) ||
                                                   range_note_applies(env, n, speeds->highest_mps)
                                             : with_note_test(env, n, [&](const auto& applies) {
                                                 return std::any_of(lap.speed_mps.begin(),
                                                                    lap.speed_mps.end(), applies);
                                               });
    if (!anywhere) continue;
    const double share = range_note_share(env, n, lap, mesh);
    if (!(share > 0.0)) continue;
    char buf[48];
    if (share < 0.001)
      std::snprintf(buf, sizeof buf, "under 0.1 %%");
    else
      std::snprintf(buf, sizeof buf, "%.1f %%", 100.0 * share);
    out.push_back(n.text + ": " + buf + " of the lap distance");
  }
  return out;
}

Axle limiting_axle(double balance_index) {
  if (balance_index > axle_neutral_band) return Axle::front;
  if (balance_index < -axle_neutral_band) return Axle::rear;
  return Axle::both;
}

double time_at(const Lap& lap, const Mesh& mesh, double s) {
  return at(lap.time_s, even_bracket(s / mesh.step_m, mesh.intervals()));
}

double summary_loads_above_mps(const Car& car) {
  const double fast = fast_acceleration_kph * units::kph;
  return car.balance_window ? std::min(fast, car.balance_window->above_mps) : fast;
}

RowLoads summary_row_loads(const Car& car) {
  return {
      fast_acceleration_kph * units::kph,
      car.balance_window ? car.balance_window->above_mps : std::numeric_limits<double>::infinity(),
      balance_window_lateral_g * units::g0};
}

namespace {
// The balance window's rules, read by check_balance_window and window_verdict alike.
// A point of the window: above its speed, cornering harder than balance_window_lateral_g.
bool in_window(const BalanceWindow& w, const Lap& lap, std::size_t i) {
  return lap.speed_mps[i] > w.above_mps &&
         std::abs(lap.lat_accel_mps2[i]) > balance_window_lateral_g * units::g0;
}
// Signed excursion beyond the nearer edge (0 inside).
double excursion(const BalanceWindow& w, double share) {
  return share < w.front_share_min   ? share - w.front_share_min
         : share > w.front_share_max ? share - w.front_share_max
                                     : 0.0;
}
// Point i's time: half of each interval it ends (an open track's ends have one).
double point_time(const Lap& lap, std::size_t i, std::size_t n) {
  return 0.5 * ((i > 0 ? lap.time_s[i] - lap.time_s[i - 1] : 0.0) +
                (i + 1 < n ? lap.time_s[i + 1] - lap.time_s[i] : 0.0));
}
}  // namespace

WindowResult window_verdict(const BalanceWindow& w, const Lap& lap, const Mesh& mesh) {
  const std::size_t n = mesh.size();
  double time_s = 0.0;
  bool outside = false;
  for (std::size_t i = 0; i < n; ++i) {
    if (!in_window(w, lap, i)) continue;
    time_s += point_time(lap, i, n);
    outside = outside || excursion(w, front_share(lap, i)) != 0.0;
  }
  return !(time_s > 0.0) ? WindowResult::not_reached
         : outside       ? WindowResult::fail
                         : WindowResult::pass;
}

BalanceWindowResult check_balance_window(const BalanceWindow& w, const Lap& lap, const Mesh& mesh,
                                         const std::vector<CornerSpan>& corners) {
  BalanceWindowResult r;
  r.window = w;
  const std::size_t n = mesh.size();
  auto in_window = [&](std::size_t i) { return lapwing::in_window(w, lap, i); };
  auto excursion = [&](double share) { return lapwing::excursion(w, share); };
  // The distance to the nearer edge inside.
  auto margin = [&](double share) {
    return std::min(share - w.front_share_min, w.front_share_max - share);
  };
  double outside_s = 0.0, brake_s = 0.0, brake_sum = 0.0, drive_s = 0.0, drive_sum = 0.0;
  std::optional<std::size_t> worst;
  double worst_share = 0.0;  // front_share(lap, *worst)
  for (std::size_t i = 0; i < n; ++i) {
    // Only points above the window's speed count, here and in the window (in_window).
    if (!(lap.speed_mps[i] > w.above_mps)) continue;
    const double dt = point_time(lap, i, n);
    const double share = front_share(lap, i);
    if (lap.phase[i] == Phase::brake) {
      brake_s += dt;
      brake_sum += dt * share;
    } else if (lap.phase[i] == Phase::accelerate || lap.phase[i] == Phase::top_speed) {
      drive_s += dt;
      drive_sum += dt * share;
    }
    if (!in_window(i)) continue;
    r.time_s += dt;
    const double e = excursion(share);
    if (e != 0.0) outside_s += dt;
    if (!worst) {
      worst = i;
      worst_share = share;
      r.lowest_share = r.highest_share = share;
    }
    r.lowest_share = std::min(r.lowest_share, share);
    r.highest_share = std::max(r.highest_share, share);
    const double we = excursion(worst_share);
    if (std::abs(e) > std::abs(we) ||
        (e == 0.0 && we == 0.0 && margin(share) < margin(worst_share))) {
      worst = i;
      worst_share = share;
    }
  }
  if (brake_s > 0.0) r.braking_share = brake_sum / brake_s;
  if (drive_s > 0.0) r.accelerating_share = drive_sum / drive_s;
  if (!worst) return r;
  const std::size_t i = *worst;
  r.outside_fraction = r.time_s > 0.0 ? outside_s / r.time_s : 0.0;
  r.worst_excursion = excursion(front_share(lap, i));
  r.pass = outside_s == 0.0 && r.worst_excursion == 0.0;
  r.margin = r.pass ? margin(front_share(lap, i)) : 0.0;
  r.worst_at_m = mesh.s_m[i];
  r.worst_speed_mps = lap.speed_mps[i];
  r.worst_phase = lap.phase[i];
  for (const auto& c : corners) {
    if (i >= c.start && i <= c.end) {
      r.worst_corner = c.id;
      break;
    }
    if (c.start > i) {
      r.next_corner = c.id;
      break;
    }
  }
  return r;
}

WindowResult window_result(const BalanceWindowResult& r) {
  return !(r.time_s > 0.0) ? WindowResult::not_reached
         : r.pass          ? WindowResult::pass
                           : WindowResult::fail;
}

LapSummary summarize(const Lap& lap, const Mesh& mesh, const Track& track,
                     const std::vector<CornerSpan>& spans, const Envelope& env,
                     SummaryDetail detail) {
  const bool full_detail = detail == SummaryDetail::full;
  LapSummary s;
  s.track_name = track.name;
  s.track_id = track.id;
  s.config = env.config_name();
  s.lap_time_s = lap.lap_time_s;
  s.length_m = mesh.length_m;
  s.air_density_kg_m3 = env.air_density();
  s.top_speed_mps = *std::max_element(lap.speed_mps.begin(), lap.speed_mps.end());
  // The corners' and the balance's usage readings need the usage channels (ChannelSet::all).
  const bool usage = lap.front_usage.size() == mesh.size();
  s.min_speed_mps = *std::min_element(lap.speed_mps.begin(), lap.speed_mps.end());

  // Time shares: each interval's time is split half to each of its end points' phases. A lone
  // point on a steady limit between two other phases (braking into a limit that only touches
  // the speed there, drive out of it) is the car touching its limit: no time is spent there,
  // and its halves go to the phases on either side. Counted as its own, it took a step's time
  // per touch: 0.5 points of a noisy survey lap at 0.5 m, nothing on a fine mesh.
  const std::size_t n = mesh.size();
  auto touch = [&](std::size_t i) {
    const Phase p = lap.phase[i];
    if (!on_steady_limit(p)) return false;
    std::size_t before = i - 1, after = i + 1;
    if (i == 0 || i + 1 == n) {
      if (!mesh.closed) return false;
      before = n - 2;  // the seam: point n-1 is point 0
      after = 1;
    }
    return lap.phase[before] != p && lap.phase[after] != p;
  };
  double full = 0.0, brake = 0.0;
  // Each point's touch once: this interval's start is the last one's end.
  bool touch_a = n > 1 && touch(0);
  for (std::size_t i = 0; i + 1 < n; ++i) {
    const double half = 0.5 * (lap.time_s[i + 1] - lap.time_s[i]);
    const bool touch_b = touch(i + 1);
    const Phase a = touch_a ? lap.phase[i + 1] : lap.phase[i];
    const Phase b = touch_b ? lap.phase[i] : lap.phase[i + 1];
    touch_a = touch_b;
    full += half * (full_drive(a) + full_drive(b));
    brake += half * ((a == Phase::brake) + (b == Phase::brake));
  }
  // The trim's share (a sweep's row keeps none: 8 instructions a point of its summary).
  if (full_detail) {
    double trimmed = 0.0;
    for (std::size_t i = 0; i + 1 < n; ++i)
      trimmed += 0.5 * (lap.time_s[i + 1] - lap.time_s[i]) * (lap.trimmed[i] + lap.trimmed[i + 1]);
    s.trimmed_fraction = trimmed / lap.lap_time_s;
  }
  s.full_throttle_fraction = full / lap.lap_time_s;
  s.braking_fraction = brake / lap.lap_time_s;
  if (full_detail) {
    // The track's own doubts first (a closure gap, a dropout), then the lap's.
    s.warnings = track_warnings(track);
    for (std::string& w : lap_warnings(env, lap, mesh)) s.warnings.push_back(std::move(w));
  }

  const std::vector<double> sectors = full_detail ? lapped_sectors_m(track) : std::vector<double>{};
  for (std::size_t k = 0; k < sectors.size(); ++k) {
    const double a = sectors[k];
    const double b = k + 1 < sectors.size() ? sectors[k + 1] : mesh.length_m;
    s.sectors_s.push_back(time_at(lap, mesh, b) - time_at(lap, mesh, a));
  }

  const std::vector<CornerSpan> no_corners;
  for (const auto& c : full_detail ? spans : no_corners) {
    CornerResult r;
    r.id = c.id;
    r.direction = c.direction;
    double lowest = lap.speed_mps[c.start];
    for (std::size_t i = c.start; i <= c.end; ++i) lowest = std::min(lowest, lap.speed_mps[i]);
    std::size_t apex = c.start;
    while (lap.speed_mps[apex] > lowest * (1.0 + apex_plateau)) ++apex;
    // On a plateau, the first point at steady cornering: the least longitudinal acceleration in
    // size over the plateau's points from its first on (the first of equals). The plateau's first
    // point is where the braking before it ends, and its acceleration (the speeds' central
    // difference across that kink) is half the braking's, which its axle reading took in (a
    // helper's review: an arc at 0 g read `rear` at the apex where all 376 points after it read
    // `front`). A single lowest point is the apex itself.
    if (lap.long_accel_mps2.size() == lap.speed_mps.size())
      for (std::size_t i = apex + 1, steadiest = apex;
           i <= c.end && lap.speed_mps[i] <= lowest * (1.0 + apex_plateau); ++i)
        if (std::abs(lap.long_accel_mps2[i]) < std::abs(lap.long_accel_mps2[steadiest]))
          apex = steadiest = i;
    r.start_m = mesh.s_m[c.start];
    r.apex_m = mesh.s_m[apex];
    r.end_m = mesh.s_m[c.end];
    r.entry_mps = lap.speed_mps[c.start];
    r.apex_mps = lap.speed_mps[apex];
    r.exit_mps = lap.speed_mps[c.end];
    r.time_s = lap.time_s[c.end] - lap.time_s[c.start];
    // NaN (axle `both`) for a lap without the usage channels (ChannelSet::loads).
    auto index = [&lap, usage](std::size_t i) {
      return usage ? lap.front_usage[i] - lap.rear_usage[i]
                   : std::numeric_limits<double>::quiet_NaN();
    };
    r.entry_balance_index = index(c.start);
    r.apex_balance_index = index(apex);
    r.exit_balance_index = index(c.end);
    r.entry_axle = limiting_axle(r.entry_balance_index);
    r.apex_axle = limiting_axle(r.apex_balance_index);
    r.exit_axle = limiting_axle(r.exit_balance_index);
    // On the steady grip limit at the apex speed: at the apex, or anywhere in the corner within
    // apex_tie of its speed. Speeds that close are a tie (tables show 0.1 km/h), and which of
    // them is lowest turns on the mesh: an upshift's cut on the exit, which starts within a step
    // of its speed, can dip 0.01 km/h under the speed of the arc the tyres limit.
    bool on_grip_limit = false;
    for (std::size_t i = c.start; i <= c.end && !on_grip_limit; ++i)
      on_grip_limit = lap.phase[i] == Phase::corner &&
                      lap.speed_mps[i] <= lap.speed_mps[apex] * (1.0 + apex_tie);
    r.limit = on_grip_limit                     ? CornerLimit::grip
              : lap.phase[apex] == Phase::brake ? CornerLimit::braking
                                                : CornerLimit::power;
    s.corners.push_back(r);
  }

  // Balance.
  BalanceSummary& b = s.balance;
  const Car& car = env.car();
  b.static_front_share = car.front_weight;
  auto balance_at = [&](double kph_value, std::optional<double>& plain,
                        std::optional<double>& eff) {
    const AeroPoint p = env.aero_point(kph_value * units::kph);
    if (p.cla_m2 > 0.0) plain = p.balance;  // the share of no downforce is no number
    eff = aero_balance_with_drag_moment(p.cla_m2, p.cda_m2, p.balance, car.drag_height_m,
                                        car.wheelbase_m);
  };
  balance_at(150.0, b.aero_balance_150, b.aero_balance_eff_150);
  balance_at(250.0, b.aero_balance_250, b.aero_balance_eff_250);
  b.has_fast_acceleration = false;
  b.lowest_front_share_fast = 0.0;
  b.lowest_front_share_at_m = 0.0;
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    if (!full_drive(lap.phase[i]) || lap.speed_mps[i] <= fast_acceleration_kph * units::kph)
      continue;
    if (!b.has_fast_acceleration || front_share(lap, i) < b.lowest_front_share_fast) {
      b.lowest_front_share_fast = front_share(lap, i);
      b.lowest_front_share_at_m = mesh.s_m[i];
      b.has_fast_acceleration = true;
    }
  }
  for (const auto& c : s.corners)
    if (c.apex_axle == Axle::front) b.front_limited_corners.push_back(c.id);
  b.threshold = balance_index_threshold;
  b.front_limited_length_m = 0.0;
  if (usage) {
    // Each interval counts half for each end above the threshold (each point read once; none
    // at neither end: the sum is left as adding 0 leaves it).
    auto above = [&](std::size_t i) {
      return lap.front_usage[i] - lap.rear_usage[i] > b.threshold;
    };
    bool here = above(0);
    for (std::size_t i = 0; i + 1 < mesh.size(); ++i) {
      const bool next = above(i + 1);
      if (here || next) b.front_limited_length_m += 0.5 * (here + next) * mesh.step_m;
      here = next;
    }
  }
  if (car.balance_window && full_detail)
    b.window = check_balance_window(*car.balance_window, lap, mesh, spans);
  return s;
}

}  // namespace lapwing
