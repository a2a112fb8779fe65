// The track laid out as points at a fixed spacing along the path: the solver's grid.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/model/track.hpp"

namespace lapwing {

/// Points 0..n at s_i = i * step_m. For a closed track point n is point 0 again (one lap); the
/// solver treats points 0..n-1 as periodic. Distance is measured along the path in plan view;
/// elevation integrates grade over that distance (small-slope layout).
struct Mesh {
  bool closed = true;
  double length_m = 0.0;
  double step_m = 0.0;
  // Positions and headings are laid out only where asked (MeshPositions, has_positions):
  // x_m and y_m empty otherwise, and heading_rad then laid out only where a wind needs it.
  std::vector<double> s_m, x_m, y_m, heading_rad, curvature_1pm;
  // Grade: tan of the slope angle (the solver works its cos and sin where the grade changes);
  // empty where it is zero at every point, as on a level segment track (read it by grade_at).
  std::vector<double> grade;
  // Elevation (m); empty where it is zero at every point, as on a flat segment track (read it
  // by elevation_at).
  std::vector<double> elevation_m;
  // Bank angle (rad), positive where it helps a left turn (raises the right side); empty on a
  // track with no bank anywhere (read it by bank_at).
  std::vector<double> bank_rad;
  // The wind's component against the direction of travel (m/s, + head wind); empty in still air
  // (read it by head_wind_at).
  std::vector<double> head_wind_mps;
  // 1 where the straight-line trim may open: everywhere on a track without trim zones, inside
  // its zones on one with them.
  std::vector<std::uint8_t> trim_zone;
  // Distance to each edge, left and right in the direction of travel (empty without widths).
  std::vector<double> width_left_m, width_right_m;

  std::size_t size() const { return s_m.size(); }
  /// Whether x_m, y_m and heading_rad are laid out (MeshPositions::laid_out).
  bool has_positions() const { return x_m.size() == s_m.size() && !s_m.empty(); }
  double grade_at(std::size_t i) const { return grade.empty() ? 0.0 : grade[i]; }
  double bank_at(std::size_t i) const { return bank_rad.empty() ? 0.0 : bank_rad[i]; }
  double elevation_at(std::size_t i) const { return elevation_m.empty() ? 0.0 : elevation_m[i]; }
  double head_wind_at(std::size_t i) const {
    return head_wind_mps.empty() ? 0.0 : head_wind_mps[i];
  }
  std::size_t intervals() const { return s_m.size() - 1; }
  /// No grade, bank or head wind at point i: where the axle model's straight-line and step
  /// tables apply on a straight.
  bool level_in_still_air(std::size_t i) const {
    return grade_at(i) == 0.0 && bank_at(i) == 0.0 && head_wind_at(i) == 0.0;
  }
};

/// The longest run of points whose |curvature| stays below `straight_below_1pm` (default 1/800 m,
/// where the corner finder ends a corner): first and last index; none when no two consecutive
/// points are that straight (a lone point is no straight).
/// (A closed lap's run does not wrap through the start.)
struct PointRun {
  std::size_t first = 0, last = 0;
};
std::optional<PointRun> longest_straight(const Mesh& mesh, double straight_below_1pm = 1.0 / 800.0);

/// How far the end of the path is from its start (what a closed track must bring to zero).
struct Closure {
  double position_gap_m;   // distance from the end point to the start point; for a closed
                           // centerline, from its last data point to its first (the gap the
                           // fit bridges), not the fitted loop's (which is zero)
  double heading_gap_rad;  // end heading minus start heading, wrapped to (-pi, pi]
  double elevation_gap_m;  // end elevation minus start elevation
  double turning_rad;      // total heading change along the path
};

Closure closure(const Track& track);

/// The profile a track's laps follow: its racing line when it has one, else its data profile;
/// nullptr for a segment track.
const PathProfile* lapped_profile(const Track& track);

/// The bank (rad, + helping a left turn) along a track's described path (its segments or its
/// data profile; 0 where it gives none), at a distance along that path: what a racing line over
/// the track reads where it passes (its reference distance), as build_mesh does.
class DescribedBank {
 public:
  explicit DescribedBank(const Track& track);
  double at(double s_m) const;

 private:
  const Track& track_;
  std::vector<double> segment_end_m_;
};

/// The sector starts along what is lapped: the track's own, or where the racing line passes them
/// (sectors are given along the described path).
std::vector<double> lapped_sectors_m(const Track& track);

/// Lays the track out at spacing close to `step_m` (adjusted so that it divides the length).
/// A track that breaks a rule (Track::validate) or a step outside Track::mesh_range is an
/// InvalidInput.
/// For a closed track, a heading gap over 2 deg is an InvalidInput too, and so is a position gap
/// over closure_position_tolerance_m(track). The error names the track's path key (`segments`,
/// `centerline` or `curvature`); a centerline's, its last data point ("centerline.points[i]").
/// A track of segments is laid out in two halves of its points, on two threads where the mesh
/// has 20 000 points or more and the machine two cores (`threads` 0), or as `threads` says (1
/// or 2): the mesh is the same bit for bit either way.
/// `positions`: left_out lays out no positions (x_m, y_m empty) and no headings unless the
/// track's wind needs them: what a lap's solve and summary read is the same bit for bit, at a
/// fraction of the layout's work (an arc's point takes a sine and cosine, a clothoid's a
/// quadrature). Maps, traces and racing lines need them laid out.
enum class MeshPositions { laid_out, left_out };
Mesh build_mesh(const Track& track, double step_m, unsigned threads = 0,
                MeshPositions positions = MeshPositions::laid_out);

/// Throws std::logic_error, naming `reader`, where `mesh` was laid out without positions
/// (MeshPositions::left_out): a map, a trace or a line read them, and reading an empty array
/// would be out of bounds. A caller's defect, not bad input.
void require_positions(const Mesh& mesh, const char* reader);

/// The number of points build_mesh lays `track` out on at `step_m`: n + 1 for n = the nearest
/// whole number of steps in the length (at least 2). Known before the mesh is built, so that a
/// study can be sized first (study/memory.hpp).
std::size_t mesh_point_count(const Track& track, double step_m);

/// Tolerances on closure: lapwing's rule for a closed track (README, "Track"): within 0.5 % of
/// the length in position and 2 deg in heading, loose enough for a survey's rounding.
inline constexpr double closure_position_fraction = 0.005;
inline constexpr double closure_heading_deg = 2.0;
/// A closed centerline's last point may be this many point spacings from its first (the fit
/// bridges one ordinary spacing; three leaves room for uneven survey steps).
inline constexpr double closure_spacings = 3.0;

/// The position gap a closed track may have: 0.5 % of the length for segments;
/// max(3 x the median point spacing, 0.5 % of the length) for a centerline; none (infinity) for
/// a curvature profile, whose positions are integrated and whose drift is not refused (beyond
/// 0.5 % of the length it is a warning: track_warnings).
double closure_position_tolerance_m(const Track& track);

/// A closed lap's end above or below its start by more than
/// max(closure_elevation_floor_m, closure_elevation_fraction x the length) is warned of (not
/// refused: a survey's heights may not add up to zero). Each lap then climbs that much net,
/// as if the whole lap rose at a mean grade of gap / length: 0.1 % is twice what rounding
/// every grade to 0.1 % can leave at worst (0.05 % of the length, every rounding one way), and
/// 1 m is room for a survey's heights on a short track. (README, "Track".)
inline constexpr double closure_elevation_fraction = 0.001;
inline constexpr double closure_elevation_floor_m = 1.0;
double closure_elevation_tolerance_m(const Track& track);

/// What a lap on `track` is to be read with although it is no error (the lap's warnings, in
/// run, compare and trade; check prints them too): a closed track whose elevation gap exceeds
/// closure_elevation_tolerance_m; a closed curvature profile whose position gap exceeds
/// closure_position_fraction of the length (the tolerance a segment track is held to); and the
/// data's own (PathProfile::warnings: a centerline's dropouts, by line); a mesh step coarser
/// than coarsest_checked_mesh_m. Each names the gap and its likely cause.
std::vector<std::string> track_warnings(const Track& track);
/// The coarsest mesh step of the convergence tables (README, "Performance"), above which a lap
/// carries a warning.
inline constexpr double coarsest_checked_mesh_m = 2.0;

}  // namespace lapwing
