// A centerline's points fitted into a smooth path: resampled evenly along their chords, smoothed
// (Whittaker, path/smoothing.hpp; periodic for a closed track) with a given length or one chosen
// by generalised cross-validation, then differentiated:
//   curvature = (x' y'' - y' x'') / (x'^2 + y'^2)^(3/2);  grade = dz/ds.
// Widths are smoothed over the same length with first differences, whose smoother has no
// negative weights ((I + lambda D1'D1) is an M-matrix: its inverse is non-negative; Varga,
// Matrix Iterative Analysis, 1962, from memory), so widths given positive stay positive.
#pragma once

#include <memory>
#include <optional>

#include "lapwing/model/track.hpp"

namespace lapwing {

struct CenterlineFitOptions {
  std::optional<double> smoothing_m;     // wavelength the x/y fit halves; none: auto (GCV)
  double elevation_smoothing_m = 100.0;  // the same for elevation, before it becomes grade
  double spacing_m = 1.0;                // resampling step along the path (finest)
  bool fixed_spacing = false;            // resample at spacing_m whatever the length
};

/// The fit's sample spacing for a smoothing length: the finest step, or L / 40 when coarser, so
/// that lambda stays below about 4e6 (a third-order smoother's system loses digits in proportion
/// to lambda: at 1e11 its fit is off by metres).
double centerline_fit_spacing(double smoothing_m, double finest_m);

/// GCV's search range, in the data's point spacings: from 2 (the shortest wavelength evenly
/// spaced points hold) to 100 (lambda = 1e9 at the data's spacing).
inline constexpr double gcv_min_spacings = 2.0;
inline constexpr double gcv_max_spacings = 100.0;

/// The fit of `points` (at least 10, no two consecutive equal). A closed centerline's last point
/// is joined to its first by a chord. The profile records the data's median point spacing, its
/// closure gap, the fit's residual and curvature noise, how the length was chosen, and keeps
/// `points` for refits. Its data_file, notes, geodetic and last_point_line are the caller's.
PathProfile fit_centerline(std::shared_ptr<const CenterlinePoints> points,
                           const CenterlineFitOptions& options);

/// The same data fitted again with the smoothing length scaled by `factor` (the quality study's
/// half and double strengths). `profile` must come from fit_centerline.
PathProfile refit_centerline(const PathProfile& profile, double factor);

}  // namespace lapwing
