// A surveyed or GPS centerline fitted into a smooth path: resampled evenly along a curve through
// its points, smoothed (Whittaker, path/smoothing.hpp; periodic for a closed track) with a given
// length or one chosen by generalised cross-validation, then differentiated:
//   curvature = (x' y'' - y' x'') / (x'^2 + y'^2)^(3/2);  grade = dz/ds.
// Widths are smoothed over the same length with first differences, whose smoother has no
// negative weights ((I + lambda D1'D1) is an M-matrix: its inverse is non-negative; Varga,
// Matrix Iterative Analysis, 1962, from memory), so widths given positive stay positive.
#pragma once

#include <algorithm>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/range.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/model/track.hpp"

namespace lapwing {

/// The fewest points a centerline is fitted from (its file's rows).
inline constexpr std::size_t min_centerline_points = 10;

/// A gap between consecutive rows of data (a log's, a centerline's points) wider than
/// dropout_min_gap_m and dropout_spacings times their median spacing: a dropout, warned of by
/// its line (README, "Tracks from data"). 10 m is where rows can no longer draw a hairpin (the
/// verdict's poor spacing); 4 spacings keep the uneven steps of a survey or a logger's jitter
/// out of it.
inline constexpr double dropout_min_gap_m = 10.0;
inline constexpr double dropout_spacings = 4.0;
inline bool is_dropout(double gap_m, double median_spacing_m) {
  return gap_m > std::max(dropout_min_gap_m, dropout_spacings * median_spacing_m);
}

struct CenterlineOptions {
  std::optional<double> smoothing_m;     // wavelength the x/y fit halves; none: auto (GCV)
  double elevation_smoothing_m = 100.0;  // the same for elevation, before it becomes grade
  double spacing_m = 1.0;                // resampling step along the path (the finest)
  bool fixed_spacing = false;            // resample at spacing_m whatever the length

  // What a track file may give (README, "Tracks from data"); the fit itself takes any positive
  // length (`check` studies half and double the smoothing strength).
  static constexpr Range file_smoothing_range{1.0, 2000.0};            // m
  static constexpr Range file_elevation_smoothing_range{1.0, 5000.0};  // m
  /// Positive smoothing lengths, a spacing of 1 cm to 100 m (key paths: "smoothing",
  /// "elevation_smoothing", "spacing").
  std::optional<Violation> validate() const;
};

/// The fit's sample spacing for a smoothing length: the finest step, or L / 40 when coarser, so
/// that lambda stays below about 4e6 (a third-order smoother's system loses digits in proportion
/// to lambda: at 1e11 its fit is off by metres).
double centerline_fit_spacing(double smoothing_m, double finest_m);

/// GCV's search range, in point spacings: from 2 (the shortest wavelength evenly spaced points
/// hold) to 100 (lambda = 1e9 at the points' spacing).
inline constexpr double gcv_min_spacings = 2.0;
inline constexpr double gcv_max_spacings = 100.0;

/// WGS-84 latitude, longitude (deg) and altitude (m; empty for none) projected to the tangent
/// plane at the first point (geodesy.hpp). A latitude beyond +-90 deg or a longitude beyond
/// +-180 deg is an InvalidInput at "lat_deg[i]".
CenterlinePoints project_wgs84(std::string source, const std::vector<double>& lat_deg,
                               const std::vector<double>& lon_deg,
                               const std::vector<double>& alt_m);

/// The fit of `points` (at least 10; widths, when given, as many and every one > 0). A closed
/// centerline may repeat its first point at the end (dropped); its last point is joined to its
/// first by the curve. The profile records the data's median point spacing, its closure gap and
/// last point, the fit's residual and curvature noise, how the length was chosen, and keeps
/// `points` for refits. InvalidInput (subject: the source) for bad options, too few points, a
/// width not > 0 ("width_left_m[i]"), or a path over 200 km long ("x_m[i]": the point after the
/// widest gap).
PathProfile fit_centerline(std::shared_ptr<const CenterlinePoints> points, bool closed,
                           const CenterlineOptions& options);
PathProfile fit_centerline(const CenterlinePoints& points, bool closed,
                           const CenterlineOptions& options);

/// The same data fitted again with the smoothing length scaled by `factor` (the quality study's
/// half and double strengths), on the same samples. `profile` must come from fit_centerline.
PathProfile refit_centerline(const PathProfile& profile, bool closed, double factor);

}  // namespace lapwing
