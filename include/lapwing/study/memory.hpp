// The memory a study will need, estimated before it solves (issue 19, finding 11): a study of a
// long mesh at a fine step holds every mesh point several times over (the mesh, each lap kept,
// each solver's working state), and should be refused at once, not die of std::bad_alloc after
// minutes. README, "Memory" gives the model; tests/study/memory_test.cpp checks it against the
// sizes of the structures it counts.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

namespace lapwing {

/// What a study holds at its peak.
struct MemoryPlan {
  std::vector<std::size_t> mesh_points;  // per circuit, all laid out at once
  std::size_t laps_kept = 0;       // laps per circuit held whole to the end (compare: its configs)
  bool channels = true;            // the solver fills every channel (false: speed and time only)
  unsigned solvers = 1;            // solvers at work at once (threads), each at the largest mesh
  std::size_t variant_meshes = 0;  // meshes laid out beside the circuits, at the largest mesh:
                                   // the data-quality verdict's smoothing variants of a fitted
                                   // centerline (study/track_quality.hpp), two for one track at
                                   // a time
};

/// Bytes per mesh point of each part (8-byte doubles, 4-byte ints, 1-byte enums and flags),
/// counted member by member from the structures (path/mesh.hpp, solve/solver.hpp):
/// - Mesh: s, x, y, heading, curvature, elevation, grade, bank, head wind (9 doubles) and the
///   trim-zone flag: the most it holds without widths (a flat track keeps no bank and no
///   elevation, still air no head wind, a mesh laid out without positions no x, y or heading:
///   MeshPositions; the two edges' widths, where a track has them, are not counted);
/// - Lap with every channel: speed, time, two accelerations, engine speed, drag, downforce, two
///   axle loads, effective aero balance, two axle usages (12 doubles), gear (int), phase, trim
///   flag (the front share is worked from the axle loads where it is read);
/// - Lap of speed and time only: speed, time, phase;
/// - a solver's own state: its steady limits (SteadyProfile: a double and a limit) and its two
///   sweeps: speed (double) each, the forward one's cut (flag) and gear (int); and each sweep's
///   second part on a closed lap (forward_split, backward_split): the same again; and on a lap
///   whose engine limit drops where the car comes to it faster (LapSolver::sweep_limits), the
///   sweeps' own limits (a second SteadyProfile) and a forward sweep within the tyres' limits
///   while it runs;
/// - while a delta file is written, its trace: one double.
inline constexpr std::size_t mesh_bytes_per_point = 9 * 8 + 1;
inline constexpr std::size_t lap_bytes_per_point = 12 * 8 + 4 + 1 + 1;
inline constexpr std::size_t speed_lap_bytes_per_point = 2 * 8 + 1;
inline constexpr std::size_t solver_bytes_per_point =
    (8 + 1) + 2 * (2 * 8 + 1 + 4) + (8 + 1) + (8 + 1 + 4);
inline constexpr std::size_t delta_bytes_per_point = 8;
/// What does not grow with the mesh: the program, its libraries, the car's tables, the
/// summaries and the small output files (a 64 KB piece of a streamed trace among them). 16 MiB:
/// a run of the bundled tracks peaks at about 6 MB (/usr/bin/time -v), with room for larger
/// cars' tables.
inline constexpr std::size_t fixed_bytes = std::size_t{16} << 20;

/// The estimated peak in bytes: fixed_bytes + the meshes + the laps kept + every solver's lap
/// and own state at the largest mesh + one delta trace at the largest mesh + the variant meshes at
/// the largest mesh.
double estimate_peak_bytes(const MemoryPlan& plan);

struct Track;

/// A study's estimate against a memory limit, for the command line's --memory-limit and the
/// Python module's calls alike: `laps_kept` per track, `channels`, `threads` (0: all) over
/// `jobs`, `verdict` (a fitted centerline's data-quality variants laid out). `need` and the
/// largest mesh (its index and points) name a refusal; `over` where need > limit.
struct MemoryVerdict {
  double need = 0.0;
  bool over = false;
  std::size_t largest = 0, largest_points = 0;
  unsigned solvers = 1;
  /// "the mesh of T has N points (L m at a step of S m)[, with K laps kept per track], J laps
  /// solved at once": what the need is made of, for the refusal's text.
  std::string what;
};
MemoryVerdict check_memory(const std::vector<const Track*>& tracks, std::size_t laps_kept,
                           bool channels, unsigned threads, std::size_t jobs, bool verdict,
                           double limit);

/// The machine's memory in bytes: the physical memory (sysconf), or the control group's limit
/// (cgroup v2 memory.max) where that is lower. 0 when neither can be read.
double machine_memory_bytes();

/// "6.5 GB", "480 MB": bytes in decimal units, three significant figures.
std::string describe_bytes(double bytes);

}  // namespace lapwing
