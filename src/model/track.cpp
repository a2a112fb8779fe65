#include "lapwing/model/track.hpp"

namespace lapwing {

double Track::length_m() const {
  if (line_path) return line_path->s_m.back();
  if (profile) return profile->s_m.back();
  double l = 0.0;
  for (const auto& s : segments) l += s.length_m;
  return l;
}

bool Track::has_widths() const {
  if (profile) return !profile->width_left_m.empty();
  if (segments.empty()) return false;
  for (const auto& s : segments)
    if (s.width_m <= 0.0 && width_m <= 0.0) return false;
  return true;
}

}  // namespace lapwing
