// What `correlate` and `fit` print and write (README, "Correlating with your data"): the terminal
// text, correlate.json and correlate-TRACK.csv, fit.json. One result object feeds each.
#pragma once

#include <string>
#include <vector>

#include "lapwing/solve/solver.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/correlate.hpp"
#include "lapwing/study/fit.hpp"

namespace lapwing {

/// The terminal's text of a correlation: alignment, lap times, RMS error, the sectors' time
/// errors, the corners' speed and braking-point errors, and where the largest errors sit.
std::string correlate_text(const Circuit& circuit, const Correlation& c);
/// correlate.json (README, "Correlating with your data").
std::string correlate_json(const std::string& car_name, const std::string& config,
                           const std::string& log_file, const Circuit& circuit,
                           const Correlation& c);
/// correlate-TRACK.csv: per mesh point the log covers, distance_m, sim_speed_kph, log_speed_kph,
/// speed_error_kph (sim - log), time_delta_s (running t_sim - t_log).
std::string correlate_csv(const Mesh& mesh, const Lap& lap, const Correlation& c);

/// A fitted parameter's value as printed: a factor ("x1.0123") or the balance's shift.
std::string fit_value_text(FitParameter p, double value);
/// The terminal's text of a fit: each parameter with its standard error, the correlation matrix,
/// RMS before and after per log, and the pairs the logs cannot separate with what would.
std::string fit_text(const FitResult& r, const std::vector<std::string>& log_names);
/// fit.json: parameters {NAME: {scale | shift, std_error}}, rms_before_kph, rms_after_kph,
/// correlation (rows in the order of "free"), and per log its track, the air its laps were
/// solved in (`airs`, one per log: air_density_kg_m3, and air as run prints it), its alignment
/// and RMS.
std::string fit_json(const std::string& car_name, const std::string& config,
                     const std::vector<std::string>& log_names,
                     const std::vector<std::string>& track_names, const std::vector<Air>& airs,
                     const FitResult& r);

}  // namespace lapwing
