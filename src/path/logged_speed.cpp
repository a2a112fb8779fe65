#include "lapwing/path/logged_speed.hpp"

#include <cassert>

namespace lapwing {

std::vector<double> distance_from_time(const std::vector<double>& time_s,
                                       const std::vector<double>& speed_mps) {
  assert(time_s.size() == speed_mps.size());
  std::vector<double> s(time_s.size(), 0.0);
  for (std::size_t i = 1; i < s.size(); ++i)
    s[i] = s[i - 1] + 0.5 * (speed_mps[i] + speed_mps[i - 1]) * (time_s[i] - time_s[i - 1]);
  return s;
}

}  // namespace lapwing
