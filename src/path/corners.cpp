#include "lapwing/path/corners.hpp"

#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

std::optional<Violation> CornerOptions::validate() const {
  return FirstViolation()
      .range("enter_curvature_1pm", enter_curvature_1pm, positive(), true)
      .range("exit_curvature_1pm", exit_curvature_1pm, positive(), true)
      .rule(exit_curvature_1pm <= enter_curvature_1pm, "exit_curvature_1pm",
            "exit_curvature_1pm must not exceed enter_curvature_1pm (a corner ends at a larger "
            "radius than it starts at)")
      .range("merge_gap_m", merge_gap_m, non_negative(), true)
      .range("min_length_m", min_length_m, non_negative(), true)
      .range("min_turn_deg", min_turn_deg, non_negative(), false)
      .range("sharp_turn_deg", sharp_turn_deg, non_negative(), false)
      .result();
}

std::vector<CornerSpan> find_corners(const Mesh& mesh, const CornerOptions& o) {
  require_valid(o.validate(), "corner options");
  std::vector<CornerSpan> raw;
  const std::size_t n = mesh.size();
  bool in = false;
  CornerSpan cur{0, 0, 0, 0};
  // The direction of a turn of curvature k: +1 left, -1 right, 0 none (read only where a corner
  // is in or about to be: most points are on neither).
  auto direction_of = [](double k) { return k > 0 ? 1 : (k < 0 ? -1 : 0); };
  for (std::size_t i = 0; i < n; ++i) {
    const double k = mesh.curvature_1pm[i];
    if (in) {
      // Hysteresis: stay in until |k| drops below the exit threshold or the direction changes.
      if (std::abs(k) < o.exit_curvature_1pm || direction_of(k) != cur.direction) {
        cur.end = i - 1;
        raw.push_back(cur);
        in = false;
      } else {
        continue;
      }
    }
    if (std::abs(k) >= o.enter_curvature_1pm) {
      in = true;
      cur = {0, i, i, direction_of(k)};
    }
  }
  if (in) {
    cur.end = n - 1;
    raw.push_back(cur);
  }
  // Merge same-direction corners separated by a short gap (a corner with a straighter middle).
  auto merge = [&](const std::vector<CornerSpan>& spans) {
    std::vector<CornerSpan> merged;
    for (const auto& c : spans) {
      if (!merged.empty() && merged.back().direction == c.direction &&
          mesh.s_m[c.start] - mesh.s_m[merged.back().end] < o.merge_gap_m) {
        merged.back().end = c.end;
        continue;
      }
      merged.push_back(c);
    }
    return merged;
  };
  // A run's length and turn as the curvature it samples: each point stands for the cell from
  // halfway to the point before it to halfway to the point after (half a step at the mesh's
  // ends), so a run of m points measures m steps, and its turn is the sum of curvature x cell
  // over them. Between the first and last points (m - 1 steps, as it was measured) a 5.76 m arc
  // sampled every 0.5 m read 5.0 m or 5.5 m by where the points fell; the cells are within half
  // a step of the arc at each end, and centred on it.
  auto cell = [&](std::size_t i) {
    const double lo = i > 0 ? 0.5 * (mesh.s_m[i - 1] + mesh.s_m[i]) : mesh.s_m[i];
    const double hi = i + 1 < n ? 0.5 * (mesh.s_m[i] + mesh.s_m[i + 1]) : mesh.s_m[i];
    return hi - lo;
  };
  // Drop kinks and wiggles: runs turning too little (wiggles, whatever their length), and runs
  // too short that do not turn sharply (kinks); a short run that turns sharply (a hairpin of a
  // few metres' radius) is a corner.
  auto keep_corners = [&](std::vector<CornerSpan> spans) {
    std::vector<CornerSpan> kept;
    for (auto& c : spans) {
      double length = 0.0, turn = 0.0;
      for (std::size_t i = c.start; i <= c.end; ++i) {
        length += cell(i);
        turn += mesh.curvature_1pm[i] * cell(i);
      }
      turn = std::abs(turn);
      if (turn < o.min_turn_deg * units::deg) continue;
      if (length < o.min_length_m && turn < o.sharp_turn_deg * units::deg) continue;
      if (c.end <= c.start) {
        if (c.start == 0) continue;
        c.start -= 1;  // a one-point run: give it its step
      }
      kept.push_back(c);
    }
    return kept;
  };
  // Merged first, so that a short same-direction kink still joins its neighbours; merged again
  // after the wiggles are gone, so that two same-direction runs split only by a short
  // opposite-direction wiggle (survey noise, a kerb-line kink) are one corner.
  std::vector<CornerSpan> out = merge(keep_corners(merge(raw)));
  for (std::size_t i = 0; i < out.size(); ++i) out[i].id = static_cast<int>(i) + 1;
  return out;
}

}  // namespace lapwing
