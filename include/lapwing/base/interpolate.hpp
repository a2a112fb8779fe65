// Linear interpolation in a table given over increasing abscissae. Inline: the envelope reads
// tables through it once per row of its own tables.
#pragma once

#include <algorithm>
#include <cassert>
#include <vector>

namespace lapwing {

/// Interpolates a table given over increasing speeds (held at the end values outside).
/// ys holds one value per xs; with xs empty or of one point, ys.front() everywhere.
inline double interpolate(const std::vector<double>& xs, const std::vector<double>& ys, double x) {
  assert(!ys.empty() && (xs.empty() || xs.size() == ys.size()));
  if (xs.size() <= 1 || x <= xs.front()) return ys.front();
  if (x >= xs.back()) return ys.back();
  const auto it = std::upper_bound(xs.begin(), xs.end(), x);
  const std::size_t i = static_cast<std::size_t>(it - xs.begin());
  const double f = (x - xs[i - 1]) / (xs[i] - xs[i - 1]);
  return ys[i - 1] + f * (ys[i] - ys[i - 1]);
}

}  // namespace lapwing
