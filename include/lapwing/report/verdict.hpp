// The answer of a comparison in a sentence per track, for the top of compare's terminal output
// and of its report: who wins, by how much over whom, where the margin is made, and whether the
// configs keep to the car's balance window.
#pragma once

#include <string>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/study/compare.hpp"

namespace lapwing {

/// "high_trim wins by 0.297 s over high: -0.014 s in corners, -0.005 s under braking,
/// +0.316 s on straights" (+: time the winner gains there; the three add up to the margin).
/// One config: "low: 65.539 s (the only config)". `names`: the configs' names, in entry order.
std::string verdict_sentence(const Comparison::PerTrack& pt, const std::vector<std::string>& names);

/// "balance window 34.0-57.0 % front above 150 km/h, > 0.5 g lateral: high_trim passes (1.0
/// points to spare); low fails (1.7 points below at 2374 m, corner 8); medium ..." Empty when the
/// car has no window.
std::string balance_verdict(const Comparison::PerTrack& pt, const std::vector<std::string>& names);

/// What the sign of the verdict's parts means, for a note beside it.
inline constexpr const char* verdict_sign_note = "+: time the winner gains there";

}  // namespace lapwing
