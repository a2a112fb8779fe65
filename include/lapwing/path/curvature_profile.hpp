// A path given as curvature over distance (a curvature profile, or a logged lap turned into
// one): positions and heading by integrating it.
#pragma once

#include <string>
#include <vector>

#include "lapwing/model/track.hpp"

namespace lapwing {

/// Heading and positions from curvature along s, from (0, 0) heading 0: the heading by the
/// trapezoid rule, the positions at each step's mean heading (midpoint). `heading` may be null.
void integrate_path(const std::vector<double>& s, const std::vector<double>& k,
                    std::vector<double>& x, std::vector<double>& y, std::vector<double>* heading);

/// A curvature profile taken as given: distance (m, strictly increasing; shifted to start at 0),
/// curvature (1/m, + left) and grade (rise over run; empty for level), with positions integrated
/// and elevation the grade's integral. InvalidInput (subject: `source`) for a profile over 200 km
/// ("distance_m[last]"), a curvature beyond 1/m ("curvature_1pm[i]") or a grade beyond +-50 %
/// ("grade[i]").
PathProfile profile_from_curvature(std::string source, const std::vector<double>& distance_m,
                                   std::vector<double> curvature_1pm, std::vector<double> grade);

}  // namespace lapwing
