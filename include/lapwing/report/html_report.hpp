// report.html: one self-contained page (inline SVG and CSS, nothing fetched) with the plots and
// tables engineers read a lap simulation by. Plots appear when their data exists.
#pragma once

#include <string>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/compare.hpp"
#include "lapwing/study/correlate.hpp"
#include "lapwing/study/track_quality.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing {

struct ReportInput {
  const Car* car = nullptr;
  const std::vector<Circuit>* circuits = nullptr;
  const Comparison* comparison = nullptr;  // laps: traces, delta, map, balance, g-g, bars
  const Trade* trade = nullptr;            // sensitivities and the trade maps
  std::string command;                     // what produced it, for the header
  const std::vector<TrackQuality>* qualities = nullptr;  // data-quality verdicts (run, compare)
  // correlate: the simulated lap round circuits->front() against the log (speeds overlaid, the
  // time delta, the sectors' and corners' errors).
  const Correlation* correlation = nullptr;
  const Lap* correlated_lap = nullptr;
};

std::string html_report(const ReportInput& in);

/// A comparison of one lap, so that `run` reports through the same page.
Comparison single_lap_comparison(std::size_t config, LapRun run, const Circuit& circuit);

}  // namespace lapwing
