// The minimum-curvature racing line (Braghin, Cheli, Melzi, Sabbioni, Computers & Structures 86
// (2008) 1503; Heilmeier et al., Vehicle System Dynamics 58 (2020) 1497): lateral offsets alpha_i
// along the reference path's left normals n_i, p_i = r_i + alpha_i n_i, that minimise
//   sum_i w_i kappa_i^2        (w_i = 1 for the minimum-curvature line)
// within the track's edges less half the vehicle's width and a margin:
//   -(width_right_i - vehicle_width / 2 - margin) <= alpha_i <= width_left_i - vehicle_width / 2
//   - margin.
// kappa_i is the curvature of the discrete path through p_{i-1}, p_i, p_{i+1} (central
// differences over the reference's even spacing, a parametrisation of the path):
//   kappa_i = (x' y'' - y' x'') / (x'^2 + y'^2)^(3/2) = 4 (X1 Y2 - Y1 X2) / (X1^2 + Y1^2)^(3/2),
//   X1 = x_{i+1} - x_{i-1}, X2 = x_{i+1} - 2 x_i + x_{i-1} (Y likewise).
// It is linearised about the current line, kappa(alpha + d) ~ kappa(alpha) + J d (J tridiagonal,
// with the corners of a closed track), and the quadratic programme
//   minimise |W^(1/2) (kappa + J d)|^2 + mu |d|^2   subject to the bounds on alpha + d
// is solved (box_qp.hpp: projected Newton on Eigen's sparse LDLT of the banded J'WJ + mu I);
// then re-linearised about the new line, until max |d| < 1 cm. mu is a Levenberg-Marquardt
// damping (a step that does not lower the sum is taken again with mu x 4; an accepted one
// divides it by 10): the curvature is not linear in alpha, and on a straight any alpha linear in
// distance bends nothing (J'WJ alone is singular there).
//
// A line that minimises curvature is not the minimum-time line: it ignores the car, so it
// neither shortens the lap where the car is at full power nor spends curvature where grip is to
// spare (the gap can reach a few per cent; see study/min_time_line.hpp).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lapwing/model/track.hpp"
#include "lapwing/path/mesh.hpp"

namespace lapwing {

/// The path a line is laid over: points evenly spaced along it, their headings and the room to
/// each edge. A closed reference does not repeat its first point at the end.
struct LineReference {
  std::string subject;  // the track's (Track::subject), for errors
  bool closed = true;
  double spacing_m = 0.0;
  std::vector<double> s_m, x_m, y_m, heading_rad, width_left_m, width_right_m, elevation_m;
  // Where the track file gives the narrowest point's width (a key path: the segment's `width`,
  // the track's, or its `centerline` data), and what to add of it (a centerline's smoothing),
  // for the error of a track too narrow for the vehicle.
  std::string narrowest_key = "line", narrowest_detail;
  std::size_t size() const { return x_m.size(); }
  /// Edge to edge at point i (m).
  double width_m(std::size_t i) const { return width_left_m[i] + width_right_m[i]; }
  /// The narrowest point's index (the first of equals); the reference has points.
  std::size_t narrowest() const {
    std::size_t k = 0;
    for (std::size_t i = 1; i < size(); ++i)
      if (width_m(i) < width_m(k)) k = i;
    return k;
  }
};

/// The spacing of the line's points (m): a tenth of the tightest radius the bundled circuits
/// have (15 m), so that a hairpin is drawn by dozens of points.
inline constexpr double line_spacing_m = 1.0;

/// The reference of a track: its described path (segments or data; not an existing line) laid
/// out every `spacing_m` with its widths. InvalidInput (the track's subject, key path "line")
/// when the track has none.
LineReference line_reference(const Track& track, double spacing_m = line_spacing_m);

struct LineOptions {
  double vehicle_width_m = 2.0;
  double margin_m = 0.5;
  double tolerance_m = 0.01;  // re-linearise until max |d alpha| is below this
  int max_iterations = 200;
  std::vector<double> weights;  // w_i per reference point; empty: every w_i = 1
};

struct RacingLine {
  std::vector<double> offset_m;  // alpha_i, + left of the reference
  std::vector<double> x_m, y_m, curvature_1pm;
  std::vector<double> lower_m, upper_m;  // the bounds on alpha_i
  int iterations = 0;                    // linearisations
  bool converged = false;                // max |d alpha| fell below the tolerance
  double objective = 0.0;                // sum w_i kappa_i^2 (1/m^2)
};

/// Solves for the line from `start` offsets (empty: the reference itself, alpha = 0, moved into
/// the bounds). InvalidInput (the reference's subject, key path "line") when the bounds leave no
/// room somewhere: the track narrower than the vehicle plus a margin each side.
RacingLine min_curvature_line(const LineReference& ref, const LineOptions& options,
                              const std::vector<double>& start = {});

/// `line` with its points and curvature worked out again from its offset_m (after the offsets
/// were changed by hand: a blend of two lines).
RacingLine with_offsets(const LineReference& ref, RacingLine line);

/// kappa_i of the discrete path (the formula above) at every point; an open path's end points
/// take their neighbour's value.
std::vector<double> discrete_curvature(const std::vector<double>& x, const std::vector<double>& y,
                                       bool closed);

/// kappa at the middle of three points and its derivatives by their coordinates (the
/// linearisation's rows; exposed so that the tests check them against finite differences).
struct LocalCurvature {
  double kappa;
  double d_dx[3], d_dy[3];  // by x_{i-1}, x_i, x_{i+1} (y likewise)
};
LocalCurvature local_curvature(double x_prev, double x, double x_next, double y_prev, double y,
                               double y_next);

/// The line as a path profile (source line): distance along the line, its curvature, positions,
/// elevation from the reference (and grade as its slope along the line), widths measured from
/// the line (width_left - alpha, width_right + alpha: along the reference's normal), offsets,
/// and the reference's distance at each sample.
PathProfile line_profile(const LineReference& ref, const RacingLine& line);

/// Lays the track's `line` (its LineSpec, min-curvature) over its described path: sets
/// track.line_path, which every lap then follows. InvalidInput as line_reference and
/// min_curvature_line.
void lay_racing_line(Track& track);

}  // namespace lapwing
