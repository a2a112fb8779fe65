// What a solved lap comes to: lap and sector times, speeds, time shares, and the corners with
// their entry, apex and exit speeds and what limits them. One object feeds the terminal table,
// the JSON and the CSV alike (STYLE, habit 6).
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/corners.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"

namespace lapwing {

/// What limits a corner: `grip` (apex on the tyres' steady limit, or a point of the corner on it
/// within 0.05 % of the apex speed), `power` (taken under drive, never reaching the limit),
/// `braking` (apex inside a braking zone). The outputs' words: report/labels.hpp.
enum class CornerLimit : std::uint8_t { grip, power, braking };

/// The axle using more of its ellipse (by balance_index), or `both` within the neutral band.
/// The outputs' words: report/labels.hpp.
enum class Axle : std::uint8_t { front, rear, both };

struct CornerResult {
  int id;
  int direction;  // +1 left, -1 right
  double start_m, apex_m, end_m;
  double entry_mps, apex_mps, exit_mps;
  double time_s;
  CornerLimit limit;
  // The axle using more of its ellipse at entry, apex and exit (limiting_axle), and the
  // difference it is read from: front usage - rear usage (the trace's balance_index; > 0: the
  // front saturates first).
  Axle entry_axle, apex_axle, exit_axle;
  double entry_balance_index, apex_balance_index, exit_balance_index;
};

/// Neutral band on balance_index (front usage - rear usage, each 0..1 of its ellipse): within
/// +-0.02 neither axle is named as the limit, since the model's usages carry about that much
/// error (the axle loads ignore lateral load transfer, README, "Limitations") and two axles at 0.95
/// and 0.96 are, for a set-up decision, both at the limit.
inline constexpr double axle_neutral_band = 0.02;

/// front when balance_index > axle_neutral_band, rear when < -axle_neutral_band, else both.
Axle limiting_axle(double balance_index);

/// The car's balance window (Car::balance_window) checked along one lap. The window's points
/// are those above its speed with |lateral acceleration| > balance_window_lateral_g; times are
/// time-weighted, each interval's time split half to each end point (as the lap's shares).
struct BalanceWindowResult {
  BalanceWindow window;
  double time_s = 0.0;            // lap time spent in the window's conditions; 0: never tested
  bool pass = true;               // the front share never left the window there
  double outside_fraction = 0.0;  // of time_s, spent outside the window
  double lowest_share = 0.0, highest_share = 0.0;  // front share seen in the window's points
  // The worst point: the largest excursion beyond an edge (signed, share - edge: < 0 below the
  // min, > 0 above the max), or, when the lap passes, the point closest to an edge (excursion
  // 0, margin > 0 the distance to that edge).
  double worst_excursion = 0.0, margin = 0.0;
  double worst_at_m = 0.0, worst_speed_mps = 0.0;
  Phase worst_phase = Phase::corner;
  int worst_corner = 0;  // the corner it lies in (0: none) ...
  int next_corner = 0;   // ... else the corner the straight leads to (0: the line)
  // How the share moves between braking and drive at speed: time-weighted mean front share
  // above the window's speed under braking, and under drive (accelerate, top_speed), whether
  // cornering or not; none where the lap has no such point.
  std::optional<double> braking_share, accelerating_share;
};

/// A lap against its balance window: the front share stayed inside it wherever it applies,
/// left it, or the lap never met the window's conditions (above its speed, cornering harder
/// than balance_window_lateral_g), so nothing was tested. The one place that decides it.
enum class WindowResult { pass, fail, not_reached };
WindowResult window_result(const BalanceWindowResult& r);
/// window_result(check_balance_window(w, lap, ...)) without the rest of the check: the verdict
/// alone, from the window's points' front shares (a sweep's row: the loads of
/// LapSolver::add_row_loads hold them).
WindowResult window_verdict(const BalanceWindow& w, const Lap& lap, const Mesh& mesh);

/// The balance of one lap: where the front axle's share of the load goes, and where the front
/// saturates first (balance_index = front usage - rear usage > 0: an understeer tendency).
struct BalanceSummary {
  double static_front_share = 0.0;
  // Aero balance (front share of downforce) at 150 and 250 km/h, alone and with the drag moment
  // (aero_balance_with_drag_moment): none of either without downforce (ClA <= 0 at that speed),
  // where the share of no load is undefined.
  std::optional<double> aero_balance_150, aero_balance_250;
  std::optional<double> aero_balance_eff_150, aero_balance_eff_250;
  bool has_fast_acceleration = false;         // any point accelerating above 200 km/h
  double lowest_front_share_fast = 0.0;       // lowest front share accelerating above 200 km/h
  double lowest_front_share_at_m = 0.0;       // where
  std::vector<int> front_limited_corners;     // corners whose apex the front axle limits
  double threshold = 0.0;                     // on balance_index
  double front_limited_length_m = 0.0;        // lap length with balance_index above it
  std::optional<BalanceWindowResult> window;  // when the car has a balance window
};

/// The balance window checked along a lap (corners: the lap's, for where the worst point lies).
BalanceWindowResult check_balance_window(const BalanceWindow& w, const Lap& lap, const Mesh& mesh,
                                         const std::vector<CornerSpan>& corners);

inline constexpr double balance_index_threshold = 0.05;

struct LapSummary {
  std::string track_name, track_id, config;
  double lap_time_s;
  double length_m;
  double air_density_kg_m3;
  double top_speed_mps, min_speed_mps;
  double full_throttle_fraction;      // share of lap time under full drive (accelerate, top_speed)
  double braking_fraction;            // share of lap time under braking
  double trimmed_fraction = 0.0;      // share of lap time with the straight-line trim in use
  std::vector<std::string> warnings;  // the track's (track_warnings), then the range notes
                                      // the lap reaches (lap_range_warnings) and the others
  std::vector<double> sectors_s;
  std::vector<CornerResult> corners;
  BalanceSummary balance;
};

/// How much of a lap summarize reads: everything, or the figures a sweep's row keeps (lap time,
/// top and lowest speed, the full-drive and braking shares, the balance; no warnings, sectors or
/// corners, whose lists stay empty, no trim's share (0), no corner the front limits, and no
/// balance window: its verdict is window_verdict's).
enum class SummaryDetail { full, row_figures };

LapSummary summarize(const Lap& lap, const Mesh& mesh, const Track& track,
                     const std::vector<CornerSpan>& corners, const Envelope& env,
                     SummaryDetail detail = SummaryDetail::full);

/// Speed above which the balance summary's lowest front share under drive is read (200 km/h).
inline constexpr double fast_acceleration_kph = 200.0;
/// The lowest speed at which summarize reads the axle loads of a lap without the usage
/// channels (ChannelSet::loads): the lowest front share under drive above
/// fast_acceleration_kph, and the balance window above its `above` speed. A lap whose loads
/// are filled from there up (LapSolver::add_channels' `loads_above_mps`) summarises to the same
/// figures, to the model's rounding.
double summary_loads_above_mps(const Car& car);
/// The points whose loads a sweep's row reads (LapSolver::add_row_loads): under full drive above
/// fast_acceleration_kph (the lowest front share at speed) and the balance window's points
/// (window_verdict), where the car has one.
RowLoads summary_row_loads(const Car& car);

/// A place where the car's data is used beyond its range, as a set of speeds: below or above
/// a speed table's rows (the end rows' values are held), a ride height off the map (its edge
/// values are held) or at or below zero, or the top of the envelope's tables (the speed is
/// held there). `check` prints the notes; a lap that reaches one gets it as a warning.
struct RangeNote {
  enum class Kind { below_speed_table, above_speed_table, off_map, grounded, table_top };
  Kind kind;
  std::string text;  // e.g. "above the speed table's last row (300.0 km/h) its values are held"
};
/// Every note of a configured car's data in one air (the Envelope's), in a fixed order.
std::vector<RangeNote> range_notes(const Envelope& env);
/// Whether the note concerns a point of the lap at speed v (m/s).
bool range_note_applies(const Envelope& env, const RangeNote& note, double speed_mps);
/// Share of the lap's distance on which the note applies: each interval counts half for each
/// end point it applies at (as the lap summary's shares), over the lap's length.
double range_note_share(const Envelope& env, const RangeNote& note, const Lap& lap,
                        const Mesh& mesh);
/// The notes that apply anywhere on the lap, each as a warning with the share of the lap
/// distance it applies on ("...: 12.3 % of the lap distance"). One producer for check and run.
/// `speeds`: the lap's lowest and highest speed where known (LapSummary's), so that a note set by
/// a speed alone (a speed table's ends, the tables' top) is found to apply nowhere without a pass
/// over the lap.
struct SpeedRange {
  double lowest_mps, highest_mps;
};
std::vector<std::string> lap_range_warnings(const Envelope& env, const Lap& lap, const Mesh& mesh,
                                            std::optional<SpeedRange> speeds = std::nullopt);

/// The lap's own warnings, as summarize lists them after the track's: the range notes it
/// reaches (lap_range_warnings), an axle asked beyond its grip, the tyres past their peak, an
/// axle held at its lift limit. The middle two read the lap's channels (ChannelSet::all).
std::vector<std::string> lap_warnings(const Envelope& env, const Lap& lap, const Mesh& mesh);
/// Of those, the ones a lap's speeds tell (the range notes, a lift hold), in the same order: a
/// lap without its channels (a sweep's row) gets them whole.
std::vector<std::string> lap_speed_warnings(const Envelope& env, const Lap& lap, const Mesh& mesh,
                                            std::optional<SpeedRange> speeds = std::nullopt);

/// Time at distance s along the lap, linear between mesh points.
double time_at(const Lap& lap, const Mesh& mesh, double s_m);

}  // namespace lapwing
