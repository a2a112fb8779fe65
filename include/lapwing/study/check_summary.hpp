// What `lapwing check` reports of a car and its tracks, as numbers: per aero config, its
// coefficients, top speed and aero figures at a few speeds in one air; per track, its closure,
// corners, each config's top speed in the track's air and the data's smoothing study (the lap at
// half and double the smoothing strength, track_quality.hpp). The terminal text and check's JSON
// (report/check_report.hpp) both render this one summary, so they cannot disagree.
//
// To add a figure: a field in ConfigCheck (the car's config in the reference air),
// TrackConfigCheck (one config on one track, in that track's air) or TrackCheck (the track),
// filled in check_summary() and written by both renderers (DEVELOPERS.md, "Where a change goes").
#pragma once

#include <array>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/model/aero.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/loads.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/track_quality.hpp"

namespace lapwing {

/// The speeds, km/h, at which check gives each config's aero figures.
inline constexpr std::array<double, 3> check_speeds_kph{100.0, 200.0, 300.0};

/// A ride-height map's operating point at one speed (aero.hpp, solve_ride_heights).
struct RideHeights {
  double front_m = 0.0, rear_m = 0.0;
  bool off_map = false;   // beyond the map's range (coefficients held at its edge)
  bool grounded = false;  // at or below zero
};

/// A config's aero at one speed v, q = rho v^2 / 2 (rho the summary's reference air):
///   downforce = q ClA(v),  drag = q CdA(v),
///   front aero load = DF bal - D z_D / L (model/loads.hpp, aero_axle_loads),
///   front share with the drag moment = front aero load / DF (aero_balance_with_drag_moment).
/// Both shares are undefined without downforce (ClA <= 0): nullopt; the front aero load is
/// defined either way.
struct AeroAtSpeed {
  double speed_kph = 0.0;
  double downforce_n = 0.0, drag_n = 0.0;
  std::optional<double> front_share;                   // the balance alone
  std::optional<double> front_share_with_drag_moment;  // balance less D z_D / (L DF)
  double front_aero_load_n = 0.0;
  std::optional<RideHeights> ride_heights;  // configs with a ride-height map only
};

/// One aero config of the car in the reference air.
struct ConfigCheck {
  std::string name;
  AeroConfig::Form form = AeroConfig::Form::constant;
  // The coefficients at rest (v = 0): a map's at its static ride heights, a speed table's first
  // row, a constant config's one row.
  double cda_m2 = 0.0, cla_m2 = 0.0, aero_balance = 0.0;
  std::optional<double> lift_to_drag;  // ClA / CdA; none when CdA <= 0
  bool has_map = false;                // a ride-height map (figures at rest, ride heights)
  bool speed_table = false;            // coefficients over speed (figures of the first row)
  double drag_height_m = 0.0;          // the config's (an override, or the car's)
  // Level road, the car's model: the engine's (Envelope::top_speed_level_mps) or, where lower,
  // the tyres' (level_traction_speed_mps; limit `traction`).
  double top_speed_mps = 0.0;
  TopSpeedLimit top_speed_limit = TopSpeedLimit::drag;
  // The per-tyre load where a tyre's force mu(Fz) Fz peaks under the load sensitivity
  // (TyreModel::force_peak_load_n; none without it), and the lowest speed at which the
  // heaviest tyre reaches it on a level straight at steady speed in this air (the model's
  // loads: a quarter of the normal load, or half the heavier axle's); none where no speed up to
  // the tables' top does.
  std::optional<double> tyre_peak_load_n, tyre_peak_speed_mps;
  std::vector<AeroAtSpeed> at_speeds;    // at check_speeds_kph, in that order
  std::vector<std::string> range_notes;  // where the data is used beyond its range (summary.hpp)
  bool no_downforce = false;             // some speed has no downforce: shares undefined there
  std::optional<StraightTrim> trim;      // the config's straight-line trim
};

/// One config on one track, in the track's air.
struct TrackConfigCheck {
  std::string config;
  double top_speed_mps = 0.0;  // level road
  TopSpeedLimit top_speed_limit = TopSpeedLimit::drag;
};

/// A config that could not lap the track (no verdict from it). Exactly one of `input` (bad
/// input the lap found: a start speed above what the car holds, say; kept whole so that a
/// caller that read the files can place it) and `cannot_move` (CannotMove's words) is set.
struct LapFailure {
  std::string config;
  std::optional<InvalidInput> input;
  std::string cannot_move;
};

/// A fitted centerline's smoothing and its study: the lengths of the half- and double-strength
/// variants (track_quality.hpp) and the notes of the variants and of their laps, each once.
/// The laps themselves are the TrackCheck's qualities.
struct SmoothingStudy {
  double smoothing_m = 0.0;
  bool automatic = false;
  double half_length_m = 0.0, double_length_m = 0.0;
  std::vector<std::string> notes;
};

struct TrackCheck {
  Closure closure{};  // path/mesh.hpp: closure()
  std::vector<std::string> warnings;  // path/mesh.hpp: track_warnings(), as every lap has them
  std::size_t corner_count = 0;
  std::vector<TrackConfigCheck> configs;    // every config of the car, in the car's order
  std::vector<TrackQuality> qualities;      // every config that lapped, in the car's order
  std::vector<LapFailure> failures;         // every config that did not
  std::optional<SmoothingStudy> smoothing;  // a fitted centerline only
  /// The track's verdict: the index in `qualities` of the worst config's (highest verdict, then
  /// largest spread; the first of equals); none when no config lapped.
  std::optional<std::size_t> shown;
  // The engine in the track's air: the share of its rated curve it gives (engine_power_ratio,
  // SAE J1349 for natural and turbo engines; 1 for fixed).
  double engine_power_ratio = 1.0;
  // The wind's head component (m/s, negative: tail) averaged over the longest straight, from
  // straight_start_m to straight_end_m (0 without wind); none when the track has no straight
  // (path/mesh.hpp: longest_straight).
  std::optional<double> head_wind_longest_straight_mps;
  double straight_start_m = 0.0, straight_end_m = 0.0;
  // The share of the lap's steps inside trim zones (1 without zones: the trim may open anywhere).
  double trim_zone_share = 1.0;
};

struct CheckSummary {
  Air reference_air;                 // the air of the configs' figures
  // Lateral load transfer at 1 g to each axle's outer tyre (N; model/loads.hpp,
  // lateral_transfer_per_n); none without roll geometry (the car file's default).
  std::optional<TransferPerNewton> transfer_at_1g_n;
  double rated_power_w = 0.0;  // a constant power, or the curve's peak of torque x speed
  std::vector<ConfigCheck> configs;  // every config of the car, in the car's order
  std::vector<TrackCheck> tracks;    // one per circuit, in the given order
};

/// Everything check reports of `car` (every config) in `reference_air` and on each circuit (in
/// its own air). A config that cannot lap a circuit is a LapFailure there, not an exception; a
/// car or air that breaks a rule throws InvalidInput (the Envelope's), as any study.
CheckSummary check_summary(const Car& car, const std::vector<Circuit>& circuits,
                           const Air& reference_air);

/// The figures of one config (index into car.configs) in `air`: the car part of check_summary.
ConfigCheck check_config(const Car& car, std::size_t config, const Air& air);

/// The track part of check_summary for one circuit.
TrackCheck check_track(const Car& car, const Circuit& circuit);

}  // namespace lapwing
