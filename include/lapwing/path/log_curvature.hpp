// A logged lap turned into curvature: a_y / v^2 (or yaw rate / v) along the distance, bridged
// over rows too slow to read, resampled, filtered, and for a closed lap with its closure errors
// spread evenly along it.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/violation.hpp"
#include "lapwing/model/track.hpp"

namespace lapwing {

/// A log's channels, one value per row, in SI.
struct LogChannels {
  std::string source;                  // where the log comes from (a file), for messages
  std::vector<double> speed_mps;       // every row
  std::vector<double> distance_m;      // strictly increasing; or empty, and then ...
  std::vector<double> time_s;          // ... strictly increasing, the distance integrated
  std::vector<double> lat_accel_mps2;  // positive to the left; or empty, and then ...
  std::vector<double> yaw_rate_radps;  // ... positive to the left
};

/// What a log's row may hold (beyond these it is no measurement of a car but a unit read wrong
/// or a corrupt row, and the arithmetic that follows would overflow): a speed up to 900 km/h (the
/// envelope tables' ceiling), a lateral acceleration up to 50 g (the filter takes spikes of a few
/// g; no car's sensor logs 50), a yaw rate up to 10 rad/s (573 deg/s; a spinning car turns at
/// 2 to 3 rad/s).
inline constexpr double log_max_row_speed_mps = 250.0;
inline constexpr double log_max_row_lateral_mps2 = 50.0 * 9.80665;
inline constexpr double log_max_row_yaw_radps = 10.0;
/// Samples along the log (every 0.5 m or so) that a curvature profile from it needs at least: a
/// curvature file's minimum rows (csv.hpp), so that what the log becomes loads again.
inline constexpr std::size_t log_min_samples = 10;

struct LogCurvatureOptions {
  bool closed = false;                // the log is one whole lap
  std::optional<double> smoothing_m;  // filter on the curvature (smoothing.hpp); none: auto
  double min_speed_mps = 5.0;         // below it a_y / v^2 is too noisy: bridged over
  /// Positive lengths and speed (key paths: "smoothing", "min_speed").
  std::optional<Violation> validate() const;
};

struct LogCurvature {
  std::vector<double> s_m, curvature_1pm;  // every 0.5 m or so, filtered (closure spread)
  double length_m = 0.0;
  double row_spacing_m = 0.0;  // the log's median row spacing (along the distance)
  // The widest gap between consecutive rows (a dropout bridges the curvature across it) and the
  // row after it.
  double largest_gap_m = 0.0;
  std::size_t largest_gap_row = 0;
  // A closed lap's log that runs on past its start: the length cut off its end, where the path
  // crosses the line through its start again (0: none).
  double overlap_m = 0.0;
  // A closed lap's log whose path crosses the line through its start this far before its end,
  // too little to cut (within 0.5 % of the lap: a turning channel's closure error does as much),
  // left in (0: none).
  double crossing_before_end_m = 0.0;
  double smoothing_m = 0.0;  // the filter's length: given, or chosen by GCV
  SmoothingInfo smoothing;   // how it was set
  /// The largest |curvature| v^2 / g0 along the filtered log (before any closure is spread),
  /// and the log row nearest it.
  double peak_lateral_g = 0.0;
  std::size_t peak_row = 0;
  // A closed lap, before its closure errors are spread: the heading left over a whole number of
  // turns (deg), the turns the curvature adds up to, and with the heading closed the distance
  // from the end to the start (m).
  double closure_heading_deg = 0.0, turns = 0.0, closure_gap_m = 0.0;
  /// The curvature of largest magnitude in the result (NaN wins), and the log row nearest it: a
  /// track's is at most max_curvature_1pm (1/m), which a log does not promise.
  double tightest_1pm = 0.0;
  std::size_t tightest_row = 0;
};

/// Curvature from a log: kappa = a_y / v^2, or yaw rate / v; filtered (second differences;
/// periodic for a closed lap) over the given length, or one chosen by generalised
/// cross-validation on the curvature at the log's own median row spacing; for a closed lap the
/// heading closed by a constant curvature change and the position by heading changes
/// a sin(pi s / L) + b sin(2 pi s / L) that vanish at both ends; a closed lap's log that runs
/// on past its start (its rows' path crosses the line through its start again, within 2 % of the
/// length of it, more than 2 row spacings and 2 m before its end) cut there. InvalidInput (subject:
/// the source) for bad options, a row beyond the limits above ("speed_mps[i]", "lat_accel_mps2[i]",
/// "yaw_rate_radps[i]"), a car that does not move between two rows ("time_s[i]"), no row at
/// min_speed or faster, or a log over 200 km ("speed_mps[last row]") or too short for
/// log_min_samples.
LogCurvature log_curvature(const LogChannels& log, const LogCurvatureOptions& options);

}  // namespace lapwing
