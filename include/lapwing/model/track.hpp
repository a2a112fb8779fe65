// The track as described by its file (SPEC section 3): fixed, validated, in SI units.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/model/air.hpp"

namespace lapwing {

/// A piece of the path whose curvature changes linearly with distance: a straight (0 -> 0), an
/// arc (k -> k) or a clothoid (k0 -> k1). Curvature is signed, positive for a left turn.
struct Segment {
  enum class Kind { straight, arc, clothoid };
  Kind kind;
  double length_m;
  double curvature_start_1pm;
  double curvature_end_1pm;
  double grade;  // rise over run, positive uphill
  Mark mark;
  double width_m = 0.0;  // edge to edge, the centerline in the middle; 0: the track's width
};

/// A centerline's data points as given (projected to the plane for lat/lon), kept with the fit so
/// that it can be fitted again at another strength (the data-quality study).
struct CenterlinePoints {
  std::vector<double> x_m, y_m, z_m;                // z empty when not given
  std::vector<double> width_left_m, width_right_m;  // centerline to each edge, left and right in
                                                    // the direction of travel; empty when not
                                                    // given, else every one > 0
  bool closed = true;
};

/// How a fit's smoothing length was set: given, or chosen from the data by generalised
/// cross-validation (path/smoothing.hpp).
struct SmoothingInfo {
  bool automatic = false;
  double noise_rms = 0.0;  // GCV's estimate of the data's noise (m for points, 1/m for curvature)
  double chosen_at_spacing_m = 0.0;  // the spacing GCV ran at: the data's median point spacing
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
};

/// A path given as data instead of segments: a fitted centerline or a curvature profile, as
/// samples along the distance (closed paths end where they start).
struct PathProfile {
  enum class Source { centerline, curvature, line };
  Source source = Source::centerline;
  std::string data_file;  // the CSV, as found from the track file's folder
  std::vector<double> s_m, curvature_1pm, grade, x_m, y_m, elevation_m;
  double smoothing_m = 0.0, elevation_smoothing_m = 0.0;  // centerline fits
  SmoothingInfo smoothing;
  double sample_spacing_m = 0.0;  // a centerline fit's resampling step
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
  bool has_bank = false;                 // a bank_deg column was read (not modelled)
  bool geodetic = false;                 // lat/lon points projected to a tangent plane
  // A closed centerline's data as given, before the fit bridges its end to its start: the
  // distance from the last point to the first, the median distance between consecutive points
  // and the file line of the last point (for the closure check and `check`).
  double data_closure_gap_m = 0.0;
  double point_spacing_m = 0.0;
  int last_point_line = 0;
  /// Things about the data the user should know that are no error (an unused column): printed
  /// by `check` and `run`.
  std::vector<std::string> notes;
};

struct Track {
  std::string name;
  std::string file;
  std::string id;  // file name without folder and extension, used in output file names
  bool closed = true;
  double start_speed_mps = 0.0;  // open tracks
  Mark start_speed_mark;
  AirSpec air;
  double mesh_m = 0.5;
  std::vector<Segment> segments;  // empty when the path is a profile
  Mark segments_mark;
  std::optional<PathProfile> profile;
  double width_m = 0.0;           // edge to edge for segments that give none; 0: not given
  std::vector<double> sectors_m;  // sector start distances along the described path; first is 0
  Mark sectors_mark;
  // The racing line the track file asks for (`line:`), and that line laid out over the path
  // above: when present it is what every command laps (build_mesh lays it out instead).
  std::optional<LineSpec> line;
  Mark line_mark;
  std::optional<PathProfile> line_path;

  /// The length of what is lapped: the line's when there is one.
  double length_m() const;
  /// Whether the path has widths (every segment, or the centerline's data).
  bool has_widths() const;
};

}  // namespace lapwing
