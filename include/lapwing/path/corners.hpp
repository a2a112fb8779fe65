// Corners found from the curvature profile alone: a run of |curvature| above a threshold, with
// hysteresis, in one direction; kinks and wiggles dropped; short gaps merged (also a gap that
// holds only a dropped opposite-direction wiggle).
#pragma once

#include <cstddef>
#include <optional>
#include <vector>

#include "lapwing/base/violation.hpp"
#include "lapwing/path/mesh.hpp"

namespace lapwing {

struct CornerOptions {
  double enter_curvature_1pm = 1.0 / 500.0;  // a corner starts where the radius falls below 500 m
  double exit_curvature_1pm = 1.0 / 800.0;   // ... and ends where it rises above 800 m
  double merge_gap_m = 20.0;                 // same-direction corners closer than this merge
  double min_length_m = 5.0;                 // shorter runs are kinks, not corners, ...
  double sharp_turn_deg = 30.0;              // ... unless they turn this much (a tight hairpin)
  double min_turn_deg = 5.0;                 // runs turning less are wiggles (survey noise)

  /// Positive curvatures, the exit one at most the entry one (hysteresis), lengths and the
  /// turn not negative; key paths are the member names.
  std::optional<Violation> validate() const;
};

struct CornerSpan {
  int id;             // 1-based in order of distance
  std::size_t start;  // first mesh index
  std::size_t end;    // last mesh index (inclusive), end > start
  int direction;      // +1 left, -1 right
};

/// Corners in order of distance (InvalidInput, subject "corner options", for bad options). On a
/// closed track a corner is not carried across the start line: one that spans it is counted as two
/// (the lap starts and ends inside it).
std::vector<CornerSpan> find_corners(const Mesh& mesh, const CornerOptions& options = {});

}  // namespace lapwing
