#include "lapwing/base/interpolate.hpp"

#include <algorithm>
#include <cassert>

namespace lapwing {

double interpolate(const std::vector<double>& xs, const std::vector<double>& ys, double x) {
  assert(!ys.empty() && (xs.empty() || xs.size() == ys.size()));
  if (xs.size() <= 1 || x <= xs.front()) return ys.front();
  if (x >= xs.back()) return ys.back();
  const auto it = std::upper_bound(xs.begin(), xs.end(), x);
  const std::size_t i = static_cast<std::size_t>(it - xs.begin());
  const double f = (x - xs[i - 1]) / (xs[i] - xs[i - 1]);
  return ys[i - 1] + f * (ys[i] - ys[i - 1]);
}

}  // namespace lapwing
