// The trade between downforce, drag, mass and power at a set of circuits: lap-time
// sensitivities by central differences, a ClA x CdA grid, and the attribution of the lap-time
// differences between configs to their ClA and CdA.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/violation.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

/// What a trade varies. Each scales the configured car by `factor`: every ClA (or CdA) value of
/// the config's form, the mass, or the engine's torque (constant power) at every speed.
enum class Knob { cla, cda, mass, power };
ConfiguredCar scaled(const ConfiguredCar& car, Knob knob, double factor);
/// Adds `delta_m2` to every ClA (or CdA) value of the configured car's config.
ConfiguredCar shifted(const ConfiguredCar& car, Knob knob, double delta_m2);
/// The knob moved by the relative amount r: x (1 + r), or, for an aero area that is zero,
/// x + r m2 (so that a car without downforce still has a downforce sensitivity).
ConfiguredCar varied(const ConfiguredCar& car, Knob knob, double r);

/// Whether every ClA (or CdA) value of the config is zero, or at most negligible_area_m2 in
/// size: `varied` then shifts the area by r m2 instead of scaling it.
inline constexpr double negligible_area_m2 = 1e-6;  // a square millimetre
bool zero_area(const AeroConfig& a, Knob knob);

/// The ClA and CdA a trade's per-m2 figures and attributions refer to. A constant (or parts)
/// config: its coefficients. A speed table or a ride-height map: the coefficients at the lap's
/// time-weighted operating point, sum_i C(v_i) dt_i / lap time (each interval's time split half
/// to each end; C as the envelope reads it at the point's speed, without the straight-line
/// trim, which the knobs do not scale), so that a table whose first row lies far from the
/// lap's speeds does not stand for it.
struct AeroOperatingPoint {
  double cla_m2, cda_m2;
};
AeroOperatingPoint operating_point(const Envelope& env, const Lap& lap);

struct TradeOptions {
  double step = 0.02;       // relative step of the central differences
  int grid_points = 9;      // per axis of the ClA x CdA grid
  double grid_span = 0.15;  // at least +-15 % around the traded config

  // A step under 0.1 % measures the mesh and the solver's tolerances, not the car (sensitivities
  // on Brannock Park move by 10 % between steps of 2 %, 0.1 % and 0.01 %), and one so small that
  // x (1 + step) == x gives exactly 0 (issue 19, finding 12: --step 1e-300 did).
  static constexpr Range step_range{1e-3, 0.5};
  static constexpr int min_grid_points = 3, max_grid_points = 41;
  static constexpr Range grid_span_range{0.0, 0.9, true, false};
  /// A step in [0.1 %, 50 %], 3 to 41 grid points, a span in (0, 90 %] (key paths: member names).
  std::optional<Violation> validate() const;
};
/// The grid reaches this share of its range beyond the outermost config on each side.
inline constexpr double grid_margin = 0.1;

struct Sensitivity {
  std::size_t track, config;  // indices: circuit, car config
  double lap_time_s;
  double cla_m2, cda_m2;  // the values differentiated against: the operating point on the lap
  double mass_kg;
  double dt_dcla_s_per_m2, dt_dcda_s_per_m2, dt_dmass_s_per_kg, dt_dpower_s_per_percent;
  // -dt/dClA / dt/dCdA: CdA one m2 of ClA may cost; none where downforce does not help or drag
  // does not cost (dt/dClA >= 0 or dt/dCdA <= 0: no exchange, both help or both hurt).
  std::optional<double> breakeven_dcda_per_dcla;
};

/// Lap times of the first traded config with its ClA and CdA moved (scaled; a zero area
/// shifted) to each node. The axes span every config's operating point on the track and
/// +-grid_span around the traded config (a zero area: 0 to grid_span m2), widened by
/// grid_margin of the range on each side (no area below 0, a drag area no lower than half the
/// smallest config's), so that every config can be placed on the map.
struct TradeGrid {
  std::size_t track, config;
  std::vector<double> cla_m2, cda_m2;  // axes
  std::vector<double> lap_time_s;      // row-major: [i_cla * cda.size() + i_cda]
};

/// First-order attribution of the lap-time difference of configs a -> b on a track to their
/// ClA and CdA changes at their operating points on that track (operating_point):
/// total = from_cla + from_cda + residual, from_cla = dt/dClA (ClA_b - ClA_a), with the
/// sensitivities of `reference` (a when a is traded, else the first traded config).
struct Attribution {
  std::size_t track, a, b, reference;
  double total_s, from_cla_s, from_cda_s, residual_s;
  double delta_cla_m2, delta_cda_m2;  // ClA_b - ClA_a, CdA_b - CdA_a
  /// |residual| <= attribution_residual_limit |total|; otherwise the first-order split does not
  /// explain this pair of configs ("first-order split not reliable for this pair").
  bool first_order_reliable;
};
/// A residual above this share of the total marks the split as not reliable.
inline constexpr double attribution_residual_limit = 0.5;
/// Below this |total| (s) shares of the total are not printed: they would be ratios of noise.
inline constexpr double attribution_share_min_total_s = 0.05;

struct Trade {
  TradeOptions options;
  std::vector<Sensitivity> sensitivities;     // track-major, then config
  std::vector<TradeGrid> grids;               // one per track, over the first traded config
  std::vector<Attribution> attributions;      // every pair of the car's configs, per track
  std::vector<AeroOperatingPoint> operating;  // per track, every config of the car (track-major)
  std::vector<double> own_lap_time_s;         // the same configs' own lap times
  // The same configs' own laps' warnings (lap_warnings: what run prints for that lap, beyond
  // the track's): the sensitivities of a lap read beyond its data stand on that lap.
  std::vector<std::vector<std::string>> own_warnings;
};

/// The trade of `configs` (indices into car.configs, the first also the grid's). Bad options
/// ("trade options"), a car that breaks a rule, or no configs are an InvalidInput.
Trade trade(const Car& car, const std::vector<std::size_t>& configs,
            const std::vector<Circuit>& circuits, const TradeOptions& options, unsigned threads);

}  // namespace lapwing
