// `lapwing track from-log`: a logged lap (CSV) read with its units, turned into curvature
// (path/log_curvature.hpp), checked for plausibility, and written as a track file and its
// curvature CSV.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/range.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/logged_speed.hpp"

namespace lapwing {

struct LogOptions {
  std::string log;                                         // CSV file
  std::string speed, lat_accel, yaw_rate, distance, time;  // column names (yaw_rate optional)
  std::string speed_unit = "km/h";                         // km/h | kph | m/s | mph
  std::string accel_unit = "g";                            // g | m/s2
  std::string yaw_unit = "deg/s";                          // deg/s | rad/s
  bool closed = false;
  std::optional<double> smoothing_m;  // filter on the curvature; none: auto (GCV)
  double min_speed_mps = 5.0;         // below it a_y / v^2 is too noisy: bridged over
  std::string name;                   // the track's name (default: the log's file name)
  AirSpec air;                        // written into the track: altitude, and ambient when given

  static constexpr Range smoothing_range{1.0, 1000.0};  // m
  /// The columns named (speed; distance or time; lateral acceleration or yaw rate), the unit of
  /// each channel used, the smoothing (when given) in range, a positive minimum speed, the air.
  /// Key paths are the member names.
  std::optional<Violation> validate() const;
};

/// Plausibility limits on a log (a unit read wrong scales every curvature by 9.81, 57.3 or 3.6^2).
inline constexpr double log_max_lateral_g = 8.0;          // no car corners harder
inline constexpr double log_max_closure_fraction = 0.02;  // of the lap's length
/// A row of the lateral acceleration further than this from the median of the two rows each
/// side is a spike in the channel (the project's own rule, 2 g: a car's lateral acceleration
/// does not jump that far from one row to the next and back; the bundled log's largest such
/// jump, at 20 Hz, is 1.15 g, where its invented track's curvature steps at an arc's entry).
inline constexpr double log_spike_mps2 = 2.0 * 9.80665;
inline constexpr double log_max_start_speed_mps = 150.0;  // a track's start_speed range
/// Rows further apart than this cannot draw a hairpin (the data-quality verdict's `poor`:
/// README, "Tracks from data"; study/track_quality.hpp's quality_usable_spacing_m).
inline constexpr double log_sparse_spacing_m = 10.0;
/// A closed lap whose curvature adds up to more than 0.3 % off a whole number of turns (1.1 deg
/// a turn) draws a warning: the project's own rule, above what clean logs show (from 5 Hz up,
/// the bundled car's own laps close within 0.3 deg, 0.08 %; 10 Hz with noise 0.37 deg) and
/// below a distance channel 0.6 % long (2.2 deg) and the bundled log whose distance reads long
/// (logs/brannock-park-survey-lap.csv: 1.4 deg).
inline constexpr double log_turns_warning_fraction = 0.003;

/// The track file (YAML text) and its curvature CSV. Curvature = a_y / v^2 (a_y positive to the
/// left), or yaw rate / v when a yaw-rate column is named; filtered; for a closed lap the
/// heading and position closure errors are spread evenly along it. An open log's first speed
/// is the track's start_speed.
///
/// InputError (naming the likely unit mistake and the option that fixes it) when the filtered
/// curvature times speed^2 exceeds 8 g anywhere, or when a closed lap's position gap, once its
/// heading is closed, exceeds 2 % of its length.
struct LogTrack {
  std::string yaml, csv;
  double length_m, closure_heading_deg, closure_gap_m;  // before spreading
  double smoothing_m;                                   // the filter's length
  SmoothingInfo smoothing;                              // how it was set
  double start_speed_mps;                               // open logs: the first logged speed
  double peak_lateral_g;  // the largest |curvature| v^2 / g0 along the filtered log
  double row_spacing_m;   // the log's median row spacing: the verdict's (source_spacing)
  double overlap_m;       // a closed lap's log past its start, cut off (0: none)
  double turns;           // a closed lap's curvature, added up, before its heading is closed
  std::vector<std::string> notes;     // rows left out (a standstill before or after the lap)
  std::vector<std::string> warnings;  // doubts about the data: its spacing, its distance
};
LogTrack track_from_log(const LogOptions& o, const std::string& csv_name);

/// What `correlate` and `fit` read of a log: its speed, and its distance or its time.
struct SpeedLogOptions {
  std::string log;                    // CSV file
  std::string speed, distance, time;  // column names: speed, and one of distance and time
  std::string speed_unit = "km/h";    // km/h | kph | m/s | mph
  /// The speed column, one of distance and time, a known speed unit (key paths: member names).
  std::optional<Violation> validate() const;
};

/// A logged speed trace and the table it was read from (whose row lines place later errors:
/// row_error).
struct SpeedLogFile {
  LoggedSpeed speed;
  CsvTable table;
  std::vector<std::string> notes;  // rows left out (a standstill before or after the lap)
};

/// Reads a log's speed against distance (given, or integrated from time). InputError at the
/// place: a missing column (naming those there are), fewer than 10 rows, a distance or time
/// that does not increase strictly, a speed below 0 or beyond 900 km/h in the unit given (with
/// the unit option that would make it plausible), a car that does not move between two rows, a
/// speed of 0 at two rows between which the distance moves on (a dropout), a log longer than
/// 200 km (a track's most). Rows at rest before the car first moves and after it last stops are
/// left out but the one next to the moving rows, with a note (track_from_log reads logs so too).
/// Other rows are the table's rows (fewer than the file's when rows at rest are left out).
SpeedLogFile read_speed_log(const SpeedLogOptions& o);

}  // namespace lapwing
