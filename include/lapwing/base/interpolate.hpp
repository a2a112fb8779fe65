// Linear interpolation, the one home of it: the blend of two values, where a point falls on an
// axis (searched, walked in order, or on an even grid), and a table read through both. Inline:
// the envelope reads tables through it once per row of its own tables, and the solver's table
// read (Envelope::Rows::at) blends four values per stage.
#pragma once

#include <algorithm>
#include <cassert>
#include <cstddef>
#include <vector>

namespace lapwing {

/// The value a share w of the way from a to b: a + w (b - a). w = 0 gives a exactly; w = 1 gives
/// b to rounding (callers that must give b exactly at the top of a table return it themselves).
/// Not std::lerp, which rounds differently (and so would move every output's last digits).
[[gnu::always_inline]] constexpr double lerp(double a, double b, double w) {
  return a + w * (b - a);
}

/// Where a point falls between the nodes of an axis: the interval [i, i + 1] and the share w of
/// the way across it.
struct Bracket {
  std::size_t i;
  double w;
};

/// The bracket of x on a strictly increasing axis of two or more nodes, held at the ends: below
/// the first node (0, 0), above the last (n - 2, 1). `outside` (if given) is set when x lies
/// beyond an end.
inline Bracket bracket(const std::vector<double>& axis, double x, bool* outside = nullptr) {
  assert(axis.size() >= 2);
  if (outside) *outside = x < axis.front() || x > axis.back();
  if (x <= axis.front()) return {0, 0.0};
  if (x >= axis.back()) return {axis.size() - 2, 1.0};
  const auto it = std::upper_bound(axis.begin(), axis.end(), x);
  const std::size_t i = static_cast<std::size_t>(it - axis.begin()) - 1;
  return {i, (x - axis[i]) / (axis[i + 1] - axis[i])};
}

/// The bracket on an even grid of nodes 0 .. last (last >= 1), from the position f = x / step
/// in node units, held at the ends: (0, 0) below, (last - 1, 1) above.
[[gnu::always_inline]] inline Bracket even_bracket(double f, std::size_t last) {
  assert(last >= 1);
  const double c = std::clamp(f, 0.0, static_cast<double>(last));
  const std::size_t i = std::min(static_cast<std::size_t>(c), last - 1);
  return {i, c - static_cast<double>(i)};
}

/// Brackets on an increasing axis of two or more nodes for points visited in increasing order:
/// each call walks on from the last interval. A point on a node belongs to the interval that
/// starts there (w = 0: the node's own value exactly); a zero-length interval gives w = 0;
/// points beyond the ends are held there.
class AxisWalk {
 public:
  explicit AxisWalk(const std::vector<double>& axis) : axis_(axis) { assert(axis.size() >= 2); }
  Bracket at(double x) {
    while (i_ + 2 < axis_.size() && axis_[i_ + 1] <= x) ++i_;
    const double a = axis_[i_], b = axis_[i_ + 1];
    return {i_, b > a ? std::clamp((x - a) / (b - a), 0.0, 1.0) : 0.0};
  }

 private:
  const std::vector<double>& axis_;
  std::size_t i_ = 0;
};

/// ys (one value per node) at a bracket.
[[gnu::always_inline]] inline double at(const std::vector<double>& ys, const Bracket& b) {
  return lerp(ys[b.i], ys[b.i + 1], b.w);
}

/// Interpolates a table given over increasing abscissae, held at the end values outside (exactly
/// them). ys holds one value per xs; with xs empty or of one point, ys.front() everywhere.
inline double interpolate(const std::vector<double>& xs, const std::vector<double>& ys, double x) {
  assert(!ys.empty() && (xs.empty() || xs.size() == ys.size()));
  if (xs.size() <= 1 || x <= xs.front()) return ys.front();
  if (x >= xs.back()) return ys.back();
  return at(ys, bracket(xs, x));
}

}  // namespace lapwing
