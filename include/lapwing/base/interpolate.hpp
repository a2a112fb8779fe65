// Linear interpolation in a table given over increasing abscissae.
#pragma once

#include <vector>

namespace lapwing {

/// Interpolates a table given over increasing speeds (held at the end values outside).
/// ys holds one value per xs; with xs empty or of one point, ys.front() everywhere.
double interpolate(const std::vector<double>& xs, const std::vector<double>& ys, double x);

}  // namespace lapwing
