// A surveyed or GPS centerline fitted by a smoothing spline: points resampled by arc length,
// smoothed (periodically for a closed track) and differentiated into curvature and grade.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/range.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/model/track.hpp"

namespace lapwing {

struct CenterlineOptions {
  double smoothing_m = 20.0;             // wavelength the x/y fit halves (see smoothing.hpp)
  double elevation_smoothing_m = 100.0;  // the same for elevation, before it becomes grade
  double spacing_m = 1.0;                // resampling step along the path

  // What a track file may give (README, "Tracks from data"); the fit itself takes any positive
  // length (`check` studies half and double the file's).
  static constexpr Range file_smoothing_range{1.0, 2000.0};            // m
  static constexpr Range file_elevation_smoothing_range{1.0, 5000.0};  // m
  /// Positive smoothing lengths, a spacing of 1 cm to 100 m (key paths: "smoothing",
  /// "elevation_smoothing", "spacing").
  std::optional<Violation> validate() const;
};

/// A centerline's points in order, as surveyed, in a plane (m); z empty when there is no
/// elevation. A closed centerline may repeat its first point at the end.
struct CenterlinePoints {
  std::string source;  // where the points come from (a file), for messages
  std::vector<double> x_m, y_m, z_m;
};

/// WGS-84 latitude, longitude (deg) and altitude (m; empty for none) projected to the tangent
/// plane at the first point (geodesy.hpp). A latitude beyond +-90 deg or a longitude beyond
/// +-180 deg is an InvalidInput at "lat_deg[i]".
CenterlinePoints project_wgs84(std::string source, const std::vector<double>& lat_deg,
                               const std::vector<double>& lon_deg,
                               const std::vector<double>& alt_m);

/// Resampled by arc length, smoothed and differentiated:
///   curvature = (x' y'' - y' x'') / (x'^2 + y'^2)^(3/2),  grade = dz/ds.
/// For a closed track the profile keeps the data's closure gap, median point spacing and last
/// point (the mesh checks the gap). InvalidInput (subject: the source) for bad options, fewer than
/// 10 points, or a path over 200 km long ("x_m[i]": the point after the widest gap).
PathProfile fit_centerline(const CenterlinePoints& points, bool closed,
                           const CenterlineOptions& options);

}  // namespace lapwing
