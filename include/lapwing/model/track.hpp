// The track as described by its file (README, "Track"): fixed, in SI units, checked by
// validate().
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/range.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/model/air.hpp"

namespace lapwing {

/// The tightest turn a path may make: a radius of 1 m (|curvature| <= 1/m), for segments,
/// curvature files and fitted centerlines alike. A tighter one is no road but bad data (a cusp, a
/// point out of place, a unit read wrong), and the solver's speeds mean nothing there.
inline constexpr double max_curvature_1pm = 1.0;

/// A piece of the path whose curvature changes linearly with distance: a straight (0 -> 0), an
/// arc (k -> k) or a clothoid (k0 -> k1). Curvature is signed, positive for a left turn.
struct Segment {
  enum class Kind { straight, arc, clothoid };
  Kind kind;
  double length_m;
  double curvature_start_1pm;
  double curvature_end_1pm;
  double grade;                                  // rise over run, positive uphill
  std::optional<double> width_m = std::nullopt;  // edge to edge, the centerline in the middle;
                                                 // none: the track's
  // Bank angle (rad), positive where the outside of the segment's turn is raised (it helps the
  // turn), negative off-camber; a straight's positive bank raises its right side (the sign of a
  // left turn, as bank_deg in a CSV).
  double bank_rad = 0.0;

  // The ranges of a segment (README, "Track"): a piece up to 100 km, a radius of 1 m to
  // 100 km, an arc of up to two turns, a grade of +-50 % (steeper is no road), a width up to
  // 100 m.
  static constexpr Range length_range{0.0, 100e3, true, false};         // m
  static constexpr Range radius_range{1.0 / max_curvature_1pm, 100e3};  // m
  static constexpr Range angle_range{0.0, 4 * units::pi, true, false};  // rad
  static constexpr Range grade_range{-0.5, 0.5};
  static constexpr Range width_range{0.0, 100.0, true, false};  // m (also the track's `width`)
  // Banking up to 45 deg each way: the steepest oval banks are about 33 deg (common practice).
  static constexpr Range bank_range{-units::pi / 4, units::pi / 4};  // rad
  /// The bank in the curvature's sign convention (positive helps a left turn): the segment's
  /// bank times the sign of its turn (a straight's as given).
  double signed_bank_rad() const;
  /// The first value that breaks a rule, named as in a track file's segment ("arc.radius",
  /// "clothoid.grade"): an arc's radius and angle are 1 / |curvature| and length x |curvature|.
  std::optional<Violation> validate() const;
};

/// A centerline's points in order, as surveyed, in a plane (m), with the distance from the
/// centerline to each edge, left and right in the direction of travel (empty when not given).
/// z empty when there is no elevation. A closed centerline may repeat its first point at the
/// end. A fit keeps them (PathProfile::points) so that it can be fitted again at another
/// strength (the data-quality study).
struct CenterlinePoints {
  std::string source;  // where the points come from (a file), for messages
  std::vector<double> x_m, y_m, z_m;
  std::vector<double> width_left_m{}, width_right_m{};
  std::vector<double> bank_rad{};  // per point, + helping a left turn (empty: flat)
};

/// How a fit's smoothing length was set: given, or chosen from the data by generalised
/// cross-validation (path/smoothing.hpp).
struct SmoothingInfo {
  bool automatic = false;
  double noise_rms = 0.0;  // GCV's estimate of the data's noise (m for points, 1/m for curvature)
  double chosen_at_spacing_m = 0.0;  // the spacing GCV ran at: the data's mean point spacing
  bool at_lower_bound = false;       // GCV's minimum at the shortest length searched
  bool at_upper_bound = false;       // ... at the longest
  bool exact_trace = false;          // circulant trace (closed) or the stochastic estimate (open)
};

/// A racing line laid over the track (path/racing_line.hpp): what every command laps when the
/// track file asks for one.
struct LineSpec {
  enum class Method { min_curvature, min_time };
  Method method = Method::min_curvature;
  double vehicle_width_m = 2.0;
  double margin_m = 0.5;  // kept from each edge, beyond half the vehicle's width

  static constexpr Range vehicle_width_range{0.5, 5.0};  // m
  static constexpr Range margin_range{0.0, 5.0};         // m
  /// Ranges (key paths "vehicle_width", "margin"); a track file's line is min-curvature only
  /// ("method": the minimum-time line depends on the car).
  std::optional<Violation> validate() const;
};

/// A path given as data instead of segments: a fitted centerline or a curvature profile, as
/// samples along the distance (closed paths end where they start).
struct PathProfile {
  enum class Source { centerline, curvature, line };
  Source source = Source::centerline;
  std::string data_file;  // the CSV, as found from the track file's folder
  std::vector<double> s_m, curvature_1pm, grade, x_m, y_m, elevation_m;
  // Bank angle per sample (rad), positive helping a left turn (raising the right side); empty:
  // flat (no bank_deg column).
  std::vector<double> bank_rad;
  double smoothing_m = 0.0, elevation_smoothing_m = 0.0;  // centerline fits
  SmoothingInfo smoothing;
  double sample_spacing_m = 0.0;  // a centerline fit's resampling step
  // A curvature profile made from data further apart than its rows (a log's, resampled by
  // `track from-log`: `curvature: {source_spacing}`): the data's median spacing, which the
  // data-quality verdict judges instead of the rows'. 0: the rows are the data.
  double source_spacing_m = 0.0;
  // A centerline made from other data (a racing line `track line` wrote: `centerline:
  // {source_verdict}`): that data's data-quality verdict, `good`, `usable` or `poor`, which
  // the track's own verdict cannot better. Empty: the points are the data.
  std::string source_verdict;
  // Distance from the path to each edge, left and right in the direction of travel, per sample
  // (empty when the track has no widths).
  std::vector<double> width_left_m, width_right_m;
  std::shared_ptr<const CenterlinePoints> points;  // a centerline's data, for refits
  // A racing line's lateral offset from the path it was laid over (+ left), per sample, and the
  // iterations its solve took.
  std::vector<double> offset_m;
  std::vector<double> reference_s_m;  // a racing line's: the reference's distance per sample
  int line_iterations = 0;
  double fit_residual_rms_m = 0.0;       // raw points against the fitted path
  double curvature_noise_rms_1pm = 0.0;  // raw curvature against the fitted curvature
  bool geodetic = false;                 // lat/lon points projected to a tangent plane
  // A closed centerline's data as given, before the fit bridges its end to its start: the
  // distance from the last point to the first, the median distance between consecutive points
  // and the index of the last point among the data's (for the closure check and `check`).
  double data_closure_gap_m = 0.0;
  double point_spacing_m = 0.0;
  std::size_t last_point_index = 0;
  /// Things about the data the user should know that are no error (an unused column): printed
  /// by `check` and `run`.
  std::vector<std::string> notes;
  /// Doubts about the data that a lap on it must be read with (a centerline's dropout, named by
  /// its file's line): the lap's warnings (track_warnings, path/mesh.hpp).
  std::vector<std::string> warnings;

  /// A path longer than 200 km is no circuit: bad data (a stray point, a unit read wrong).
  static constexpr double max_length_m = 200e3;
  /// At least two samples, every column as long as s_m, s_m from 0 strictly increasing, every
  /// curvature finite and within +-max_curvature_1pm; widths, when given, as long and every one
  /// > 0.
  std::optional<Violation> validate() const;
};

/// The wind over the track: its speed and the bearing it blows from, in the track's x/y frame
/// (0 = from +y, clockwise: 90 deg = from +x). Only the head component along the path counts.
struct Wind {
  double speed_mps = 0.0;
  double from_rad = 0.0;

  static constexpr Range speed_range{0.0, 50.0};                     // m/s: a storm
  static constexpr Range from_range{-2 * units::pi, 2 * units::pi};  // rad
  /// The head component (m/s, + against the car) for a car heading `heading_rad` (from +x,
  /// counter-clockwise, as Mesh::heading_rad): w_head = speed sin(from + heading), the wind's
  /// velocity -speed (sin from, cos from) dotted with minus the direction (cos h, sin h).
  double head_mps(double heading_rad) const;
  /// Ranges (key paths "wind.speed", "wind.from").
  std::optional<Violation> validate() const;
};

/// A stretch where the straight-line trim may open (series rules name such zones), from
/// `start_m` to `end_m` along the described path.
struct TrimZone {
  double start_m = 0.0, end_m = 0.0;
};

struct Track {
  std::string name;
  std::string file;
  std::string id;  // file name without folder and extension, used in output file names
  bool closed = true;
  double start_speed_mps = 0.0;  // open tracks
  AirSpec air;
  double mesh_m = 0.5;
  std::vector<Segment> segments;  // empty when the path is a profile
  std::optional<PathProfile> profile;
  std::optional<double> width_m;       // edge to edge, for segments that give none
  std::vector<double> sectors_m{0.0};  // sector start distances along the described path; first 0
  // The racing line the track file asks for (`line:`), and that line laid out over the path
  // above: when present it is what every command laps (build_mesh lays it out instead).
  std::optional<LineSpec> line;
  std::optional<PathProfile> line_path;
  std::optional<Wind> wind;          // none: still air
  std::vector<TrimZone> trim_zones;  // empty: the trim opens wherever its rule allows

  /// The length of what is lapped: the line's when there is one.
  double length_m() const;
  /// Whether the path has widths (every segment, or the centerline's data).
  bool has_widths() const;
  /// What errors about this track name: its file, or "track 'NAME'" for a track built in code.
  std::string subject() const;
  /// The track file's key for its path: "segments", "centerline" or "curvature".
  const char* path_key() const;

  static constexpr Range start_speed_range{0.0, 150.0};  // m/s
  static constexpr Range mesh_range{0.01, 10.0};         // m
  /// A mesh of more than 20 million points is no circuit (and would exhaust the machine).
  static constexpr double max_mesh_points = 20e6;
  /// The first value that breaks a rule, in the order of a track file, named by its key path
  /// there ("start_speed", "ambient.pressure", "segments[2].arc.radius", "width", "line",
  /// "sectors").
  std::optional<Violation> validate() const;
};

}  // namespace lapwing
