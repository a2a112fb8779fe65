// The car fitted to logged laps (README, "Correlating with your data"): scale factors on its grip,
// power, drag, downforce and mass, and a shift of its aero balance, chosen by nonlinear least
// squares (Ceres Solver) so that the simulated speed traces match the logs.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/path/logged_speed.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/correlate.hpp"

namespace lapwing {

/// Rounds of fit then alignment at most (the alignment found again with the fitted car, until
/// it settles: fit_alignment_settled_m and fit_alignment_settled_scale). Each later round's
/// search moves an offset 4.6 m at most (refine_alignment), so that ten rounds reach an offset
/// 40 m off the starting car's; a fit that ends here with the alignment still moving is warned
/// of.
inline constexpr int fit_alignment_rounds = 10;
inline constexpr double fit_alignment_settled_m = 0.05;      // the finest offset step
inline constexpr double fit_alignment_settled_scale = 1e-4;  // the finest scale step

/// What a fit may free. Each but `balance` scales the car's values by a factor (start 1):
/// `grip` mu_long and mu_lat together, `grip_lat` mu_lat, `grip_long` mu_long, `power` the
/// engine's torque at every speed (constant power), `cda` and `cla` every drag and downforce area
/// of the config's form, `mass` the running mass. `balance` is added to the aero balance (front
/// share of downforce, start 0).
enum class FitParameter { grip, grip_lat, grip_long, power, cda, cla, balance, mass };
std::string_view fit_parameter_name(FitParameter p);
/// The parameter named, or none.
std::optional<FitParameter> fit_parameter(std::string_view name);
/// Every name, in the enum's order ("grip, grip_lat, ...").
std::string fit_parameter_names();

/// The car with the parameters at `values` (one per parameter, in order). Unchecked: a
/// factor may move a value past a car file's range (the Envelope's Unchecked).
ConfiguredCar fitted_car(const ConfiguredCar& car, const std::vector<FitParameter>& params,
                         const std::vector<double>& values);

/// The range a parameter may take in a fit: where the fitted car stays one the car file's rules
/// allow (README, "Car"): mu at most 3 (friction_range) and above 1 % of its own; CdA and ClA
/// at least 0 and at most 20 and 30 m2 (cda_range, cla_range) at every row or cell of the
/// config; the mass 1 kg to 100 t (mass_range); the balance within [0, 1] at every row or cell;
/// the power above 1 % of its own (no rule above). A fit ending at a bound is warned of
/// (FitResult::warnings): the logs ask for more than the factor can give there.
struct FitBounds {
  double lo, hi;
};
FitBounds fit_bounds(const ConfiguredCar& car, FitParameter p);

/// One logged lap of one circuit.
struct FitLog {
  const Circuit* circuit;
  const LoggedSpeed* log;
};

/// What a fit's result is read with: an RMS speed error after the fit beyond fit_poor_rms_kph
/// (the bundled log's fits leave 0.5 km/h; a logged speed's noise is some 0.5 km/h, common
/// practice, from memory), or a factor moved by more than fit_far_factor of the file's value
/// (more than a set-up change or a car's spread: another car, track or unit is likelier), is a
/// warning. The project's own limits.
inline constexpr double fit_poor_rms_kph = 3.0;
inline constexpr double fit_far_factor = 0.3;

struct FitOptions {
  /// Relative step of the central differences, df/dp = (f(p + h) - f(p - h)) / 2h at h = 1 %
  /// of the factor (0.01 added to the balance): the speed trace moves in steps where the
  /// limiting point of a corner switches or a shift falls elsewhere, and a step much smaller
  /// than 1 % differentiates those steps rather than the trend (lap time moved ~1 % by a 2 %
  /// step is the trade's measured minimum; README, "Commands", trade --step).
  double step = 0.01;
  /// Huber loss on each residual (km/h): quadratic up to it, linear beyond, so that a few
  /// points off the model (a lock-up, traffic, a missed apex) do not pull the fit. 1.5 km/h is
  /// three times a logged speed's typical noise of 0.5 km/h (common practice, from memory).
  double huber_kph = 1.5;
  /// Residuals every this many metres of track (the mesh's points nearest): neighbouring mesh
  /// points carry the same information.
  double residual_spacing_m = 5.0;
  int max_iterations = 30;
  /// Rounds of fit and alignment at most (fit_alignment_rounds).
  int alignment_rounds = fit_alignment_rounds;
  unsigned threads = 0;  // laps solved at once (0: all cores); the result does not depend on it
  /// |correlation| above it: the two parameters are not separable by these logs.
  double separable_limit = 0.9;
  /// Step, loss and spacing positive, iterations 1 to 200, rounds 1 to 50, limit in (0, 1) (key
  /// paths: members).
  std::optional<Violation> validate() const;
};

struct FitResult {
  std::vector<FitParameter> params;
  std::vector<double> values;      // factors (balance: the shift added)
  std::vector<double> std_errors;  // from the covariance at the optimum; NaN when not found
  std::vector<std::vector<double>> correlation;  // params x params; NaN when not found
  bool covariance_found = false;      // false: the Jacobian is rank-deficient (not separable)
  std::vector<Alignment> alignments;  // per log, with the starting car
  /// Per log, found with the fitted car after the last round (RMS after uses them); their
  /// `correlation` is the check correlate makes (alignment_warnings).
  std::vector<Alignment> final_alignments;
  int rounds = 0;        // of fit, then alignment
  bool settled = false;  // the last round moved no alignment (false: fit_alignment_rounds hit)
  std::vector<double> rms_before_mps, rms_after_mps;         // per log
  double rms_before_mps_all = 0.0, rms_after_mps_all = 0.0;  // over every log's points
  int iterations = 0;
  int laps_solved = 0;
  std::string termination;     // Ceres' reason in words
  bool iteration_cap = false;  // the last round stopped at options.max_iterations
  /// Pairs not separable by these logs: |correlation| > separable_limit, or every pair when the
  /// covariance could not be found.
  struct Pair {
    std::size_t a, b;
    double correlation;  // NaN when the covariance could not be found
    std::string advice;  // what extra data would separate them
  };
  std::vector<Pair> inseparable;
  /// What the figures must be read with: per log (named by its source) the alignment's warnings
  /// (alignment_warnings, with the starting car as correlate makes them, and with the fitted
  /// one), its gaps and laps (log_on_mesh, as correlate says them); the alignment not settled
  /// within fit_alignment_rounds; an RMS after above the RMS before.
  std::vector<std::string> warnings;
};

/// Fits `params` (each once, at least one) of `car` to the logs, jointly. Each log is aligned
/// to its circuit with the starting car (align_log), the parameters fitted, the logs aligned
/// again with the fitted car, and so on until the alignment stays (fit_alignment_rounds at
/// most); residuals are sim - log speed in km/h
/// at points residual_spacing_m apart. Ceres' Levenberg-Marquardt with the Huber loss; the
/// Jacobian by central differences (FitOptions::step); standard errors from Ceres' covariance
/// of the parameters scaled by the residuals' variance s^2 = 2 cost / (N - P). InvalidInput for
/// bad options or parameters ("fit"), or a log that cannot be aligned (its source).
FitResult fit(const ConfiguredCar& car, const std::vector<FitLog>& logs,
              const std::vector<FitParameter>& params, const FitOptions& options = {});

/// What extra data would separate two parameters a fit could not tell apart.
std::string separation_advice(FitParameter a, FitParameter b);

/// The car file's values the fit changes, as edits of its key paths (CarValueEdit): the tyres'
/// mu, the mass (and the config's own mass), the power (`powertrain.torque_curve.torque`, which
/// the file writer reads as `power_curve.power` in a file that gives power; `constant_power`),
/// the config's areas and balance in its form (`cla`, `speed_table.cla`, `ride_height_map.cla`,
/// each part's `downforce` and `drag` under `forces`). InvalidInput ("fit") for a change the
/// file cannot hold: a config made by a wing family, the balance of a config given by forces.
std::vector<CarValueEdit> fitted_edits(const Car& car, std::size_t config, const FitResult& result);

}  // namespace lapwing
