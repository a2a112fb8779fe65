#include "lapwing/model/track.hpp"

namespace lapwing {

double Track::length_m() const {
  if (profile) return profile->s_m.back();
  double l = 0.0;
  for (const auto& s : segments) l += s.length_m;
  return l;
}

}  // namespace lapwing
