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
      .result();
}

std::vector<CornerSpan> find_corners(const Mesh& mesh, const CornerOptions& o) {
  require_valid(o.validate(), "corner options");
  std::vector<CornerSpan> raw;
  const std::size_t n = mesh.size();
  bool in = false;
  CornerSpan cur{0, 0, 0, 0};
  for (std::size_t i = 0; i < n; ++i) {
    const double k = mesh.curvature_1pm[i];
    const int dir = k > 0 ? 1 : (k < 0 ? -1 : 0);
    if (in) {
      // Hysteresis: stay in until |k| drops below the exit threshold or the direction changes.
      if (std::abs(k) < o.exit_curvature_1pm || dir != cur.direction) {
        cur.end = i - 1;
        raw.push_back(cur);
        in = false;
      } else {
        continue;
      }
    }
    if (std::abs(k) >= o.enter_curvature_1pm) {
      in = true;
      cur = {0, i, i, dir};
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
  // Drop kinks and wiggles: runs too short, or turning too little, to count as corners.
  auto keep_corners = [&](std::vector<CornerSpan> spans) {
    std::vector<CornerSpan> kept;
    for (auto& c : spans) {
      if (c.end <= c.start) {
        if (c.start == 0) continue;
        c.start -= 1;  // a one-point run: give it its step
      }
      if (mesh.s_m[c.end] - mesh.s_m[c.start] < o.min_length_m) continue;
      if (std::abs(mesh.heading_rad[c.end] - mesh.heading_rad[c.start]) <
          o.min_turn_deg * units::deg)
        continue;
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
