// A simulated lap held against a logged one (README, "Correlating with your data"): the log's
// distance aligned to the track's by cross-correlating the two speed traces, then lap, sector and
// corner errors and where the largest speed errors sit.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "lapwing/path/logged_speed.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

/// Where a log's rows lie on the track: a row logged at distance d is at track distance
/// s = scale (d - offset_m). offset_m is the log's distance at the start line (7 m for a log
/// that starts counting 7 m before it; on a closed track, the line of the lap compared,
/// log_on_mesh); scale corrects a distance channel that reads long or
/// short (a wheel-speed distance off by the tyre's rolling radius, a GPS path cut or widened).
struct Alignment {
  double offset_m = 0.0;
  double scale = 1.0;
  double correlation = 0.0;  // of the speed traces at this alignment (Pearson's r, -1 .. 1),
                             // over the lap compared on a closed track
};

/// Scales searched: a distance channel within 4 % of the track's (a tyre's rolling radius grows
/// a few % with speed and wear; a wrong wheel circumference is of that order). Common practice.
inline constexpr double alignment_max_scale_error = 0.04;
/// The share of the track a log must cover (the rest is not compared).
inline constexpr double correlate_min_coverage = 0.98;
/// A log whose median speed (by distance, as the lap's mesh points) is this factor away from
/// the simulated lap's is read in the wrong unit (km/h against m/s is 3.6, mph against km/h
/// 1.6), not a car off by that much.
inline constexpr double correlate_max_speed_ratio = 1.45;
/// Below this speed correlation at the best alignment the log and the lap hardly share a shape
/// (another track, a log of constant speed): the alignment, and every comparison made on it, is
/// warned of. A log of another car on the right track correlates above 0.9 (tested); one lap of
/// Cairnholt given as a lap of Brannock Park, scored on the lap compared, 0.50 to 0.53 (tested):
/// the bound lies between (it was 0.5 while the whole log was scored, which let that pair by).
inline constexpr double correlate_min_trusted_correlation = 0.8;
/// The warnings an alignment calls for: a correlation below correlate_min_trusted_correlation,
/// and a scale at the edge of its search (alignment_max_scale_error: the distance reads that much
/// off or more, and the search stopped there). Empty when neither.
std::vector<std::string> alignment_warnings(const Alignment& a);

/// A log's gaps (lapwing's own rule, README, "Correlating with your data"): two neighbouring rows
/// further apart in time than log_gap_min_s, and than log_gap_median_factor times the log's
/// median interval, leave the track between them unlogged: it is not compared, nor drawn, nor
/// counted as covered. A row's interval in time is the time column's, or from a distance column
/// 2 ds / (v_a + v_b) (the same figure: the time column's distance is integrated so). 0.5 s is
/// 5 rows of a 10 Hz logger (the least rate advised there) and 40 m at 290 km/h; the median factor
/// keeps a sparser logger's own spacing from reading as gaps (its rows are told apart by
/// the advice on rates, not by this rule).
inline constexpr double log_gap_min_s = 0.5;
inline constexpr double log_gap_median_factor = 4.0;
/// Per interval of the log (row i to row i + 1): 1 where it is a gap.
std::vector<std::uint8_t> log_gaps(const LoggedSpeed& log);

/// The log's median row spacing along the track (m): its rows' distances apart read at the
/// alignment's scale (rows at one place, a car standing, left out), 0 for none.
double log_row_spacing_m(const LoggedSpeed& log, double scale);
/// A warning when the log's rows are too far apart for the figures correlate and fit read from
/// it (braking points, apex speeds, the speed error between rows): by the data-quality
/// verdict's spacing rule (study/track_quality.hpp, README, "Tracks from data"), over
/// quality_good_spacing_m (5 m: usable, braking points off by up to a row's spacing) and over
/// quality_usable_spacing_m (10 m: poor, rows that cannot draw a hairpin), with the rate to log
/// at instead (rows 5 m apart at the log's median speed, 10 Hz at least). None when good. Not a
/// refusal: the figures are printed, with the warning.
std::optional<std::string> log_spacing_warning(const LoggedSpeed& log, const Alignment& a);

/// The alignment that maximises the correlation of the log's speed with `speed_mps` (the
/// simulated speed at each mesh point): a search over every offset (the whole lap for a closed
/// track, half the track either way for an open one) on a 2 m grid at scales 0.4 % apart, then
/// offset and scale refined on finer grids around the best (0.5 m and 0.05 %, then 0.05 m and
/// 0.01 %). On a closed track the correlation is of the lap compared (log_on_mesh) alone: the
/// first search, over the whole log, finds that lap, and a log holding more than it is searched
/// again over the lap (offsets within 10 m and 0.2 % of the log's length of the first), and
/// refined over the lap; its other laps, driven otherwise or drifting at a scale between the
/// first search's, do not pull the alignment.
/// InvalidInput (subject: the log's source) when the log is read in a wrong unit (its median
/// speed more than correlate_max_speed_ratio from the simulated lap's: "speed_mps[i]" at the
/// fastest row) or, aligned, covers less than correlate_min_coverage of the track (log_on_mesh:
/// "distance_m[i]" at the row after the longest gap, or at the last row when there is none).
Alignment align_log(const LoggedSpeed& log, const Mesh& mesh, const std::vector<double>& speed_mps);

/// align_log's refinement alone, around `start` (offsets within 4.6 m, scales within 0.46 %),
/// over the lap compared under `start` (again over the lap compared under the result when that
/// is another, at most twice), with align_log's checks: for a car whose speed trace has moved
/// little (a fit's next round).
Alignment refine_alignment(const LoggedSpeed& log, const Mesh& mesh,
                           const std::vector<double>& speed_mps, const Alignment& start);

/// The log's speed at each mesh point under an alignment, and whether the log covers the point:
/// a point is covered where it lies between two neighbouring rows that are not a gap (log_gaps).
/// A closed track's lap is one lap of the log from a line crossing to the next (the crossings
/// at d = offset + k L / scale): the one of them that covers the most points, the first on a
/// tie. Points the log misses in that lap are not filled from another lap (a log that stops
/// short of the line covers less than the whole lap).
struct LogOnMesh {
  std::vector<double> speed_mps;  // 0 where not covered
  std::vector<std::uint8_t> covered;
  std::size_t covered_points = 0;
  double lap_start_d = 0.0;  // the log's distance at the start of the lap compared
  int full_laps = 0;         // laps of the log (line to line) covering correlate_min_coverage
  /// The gaps inside the lap, as track distances [from, to] (m), and the rows around the
  /// longest (its first row's index; none when there is no gap).
  std::vector<std::pair<double, double>> gaps_m;
  std::optional<std::size_t> longest_gap_row;
  double longest_gap_s = 0.0;
};
LogOnMesh log_on_mesh(const LoggedSpeed& log, const Mesh& mesh, const Alignment& a);

struct SectorError {
  double start_m, end_m;
  double sim_s, log_s, error_s;  // error = sim - log, over the length the log covers
  double covered_m = 0.0;        // of the sector's length, what the log covers
};

/// A corner's speeds, simulated and logged (the logged speed smoothed over 5 m, so that the
/// noise of one sample does not set an apex), and its braking points: where the speed (both
/// traces smoothed over 5 m alike) peaks between the previous corner's apex and this one's, when it
/// falls at least braking_min_drop_mps from there to the apex (none otherwise: the corner is taken
/// without braking).
struct CornerError {
  int id;
  double apex_m;
  double sim_entry_mps, sim_apex_mps, sim_exit_mps;
  double log_entry_mps, log_apex_mps, log_exit_mps;
  /// Along the lap, except a closed track's first corner braked before the line (the search
  /// runs from the last corner's apex round the line): negative then, metres before the line,
  /// so that the difference of two points is their distance apart.
  std::optional<double> sim_braking_m, log_braking_m;
  /// sim - log, of the braking points when both brake (> 0: the simulated car brakes later).
  std::optional<double> braking_error_m() const {
    if (sim_braking_m && log_braking_m) return *sim_braking_m - *log_braking_m;
    return std::nullopt;
  }
};
inline constexpr double braking_min_drop_mps = 5.0 / 3.6;
inline constexpr double corner_smoothing_m = 5.0;

/// A place of large speed error: the point, its error (sim - log), and the corner it lies in
/// (0: none), else the corner the straight leads to (0: to the line).
struct ErrorPeak {
  double at_m, error_mps;
  int corner, next_corner;
};
/// The largest errors listed, at least this far apart.
inline constexpr std::size_t correlate_peaks = 3;
inline constexpr double correlate_peak_separation_m = 100.0;

struct Correlation {
  Alignment alignment;
  double coverage = 0.0;          // share of the mesh's points the log covers
  double covered_length_m = 0.0;  // the intervals covered at both ends (the lap times')
  double lap_time_sim_s = 0.0;    // over the intervals the log covers (the whole lap when it does)
  double lap_time_log_s = 0.0;
  double rms_speed_error_mps = 0.0;   // over the covered points
  std::vector<double> log_speed_mps;  // per mesh point (0 where not covered)
  std::vector<std::uint8_t> covered;
  std::vector<double> time_delta_s;  // running t_sim - t_log from the first covered point
  std::vector<SectorError> sectors;
  std::vector<CornerError> corners;  // the corners the log covers
  std::vector<ErrorPeak> peaks;      // largest |error| first
  /// What the figures above must be read with (alignment_warnings, rows too far apart:
  /// log_spacing_warning, the log's gaps, a log of more than one lap): the text,
  /// correlate.json and the report print them.
  std::vector<std::string> warnings;
};

/// `lap` (solved round `circuit`) against the log, aligned by align_log, or as given.
Correlation correlate(const Lap& lap, const Circuit& circuit, const LoggedSpeed& log);
Correlation correlate(const Lap& lap, const Circuit& circuit, const LoggedSpeed& log,
                      const Alignment& alignment);

}  // namespace lapwing
