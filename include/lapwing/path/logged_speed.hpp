// A logged lap's speed along its own distance: what `correlate` and `fit` hold the simulated lap
// against (README, "Correlating with your data").
#pragma once

#include <string>
#include <vector>

namespace lapwing {

/// Speed against the log's own distance, one value per row, in SI. The distance is as logged
/// (or integrated from time, from 0 at the first row) and strictly increasing; where the track's
/// start line lies on it is for the alignment to find (study/correlate.hpp).
struct LoggedSpeed {
  std::string source;  // where the log comes from (a file), for messages
  std::vector<double> distance_m, speed_mps;
};

/// Distance along a log from its time stamps and speeds, 0 at the first row: the trapezoid rule,
/// s_i = s_{i-1} + (v_i + v_{i-1}) / 2 (t_i - t_{i-1}). The one home of this integration (the
/// log's curvature and its speed trace both use it). Sizes must be equal.
std::vector<double> distance_from_time(const std::vector<double>& time_s,
                                       const std::vector<double>& speed_mps);

}  // namespace lapwing
