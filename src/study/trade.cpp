#include "lapwing/study/trade.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/summary.hpp"
#include "lapwing/study/fit.hpp"
#include "lapwing/study/thread_pool.hpp"

namespace lapwing {

ConfiguredCar scaled(const ConfiguredCar& car, Knob knob, double f) {
  return car.changed([&](Car& c, AeroConfig& a) {
    switch (knob) {
      case Knob::cla:
        for (double& v : a.cla_m2) v *= f;
        if (a.map)
          for (double& v : a.map->cla_m2.values()) v *= f;
        break;
      case Knob::cda:
        for (double& v : a.cda_m2) v *= f;
        if (a.map)
          for (double& v : a.map->cda_m2.values()) v *= f;
        break;
      case Knob::mass:
        c.mass_kg *= f;
        break;
      case Knob::power:
        if (c.powertrain.ideal) c.powertrain.constant_power_w *= f;
        for (double& t : c.powertrain.torque_nm) t *= f;
        break;
    }
  });
}

bool zero_area(const AeroConfig& a, Knob knob) {
  assert(knob == Knob::cla || knob == Knob::cda);
  // An area of a square millimetre or less is none: scaled to the grid's other configs (by
  // their area over it) a subnormal one overflowed to infinity, and the trade stopped inside
  // the solver (a robustness campaign's finding).
  const auto nil = [](double v) { return std::abs(v) <= negligible_area_m2; };
  const auto& rows = knob == Knob::cla ? a.cla_m2 : a.cda_m2;
  const bool rows_zero = std::all_of(rows.begin(), rows.end(), nil);
  if (!a.map) return rows_zero;
  const std::vector<double>& m = (knob == Knob::cla ? a.map->cla_m2 : a.map->cda_m2).values();
  return std::all_of(m.begin(), m.end(), nil);
}

AeroOperatingPoint operating_point(const Envelope& env, const Lap& lap) {
  const AeroConfig& a = env.aero();
  if (a.speed_mps.empty() && !a.map) return {a.cla_m2.front(), a.cda_m2.front()};
  // Time-weighted mean of the coefficients the envelope reads at the lap's speeds: interval i
  // gives half its time to each end, C_mean = sum_i dt_i (C_i + C_{i+1}) / 2 / T.
  const double to_area = 2.0 / env.air_density();  // coefficient 0.5 rho C -> C
  auto coefs = [&](std::size_t i) { return env.sample(lap.speed_mps[i]); };
  double cla = 0.0, cda = 0.0;
  Envelope::Sample here = coefs(0);
  for (std::size_t i = 0; i + 1 < lap.speed_mps.size(); ++i) {
    const Envelope::Sample next = coefs(i + 1);
    const double half = 0.5 * (lap.time_s[i + 1] - lap.time_s[i]);
    cla += half * (here.lift_coef + next.lift_coef);
    cda += half * (here.drag_coef + next.drag_coef);
    here = next;
  }
  return {cla * to_area / lap.lap_time_s, cda * to_area / lap.lap_time_s};
}

ConfiguredCar shifted(const ConfiguredCar& car, Knob knob, double delta_m2) {
  assert(knob == Knob::cla || knob == Knob::cda);
  return car.changed([&](Car&, AeroConfig& a) {
    auto& rows = knob == Knob::cla ? a.cla_m2 : a.cda_m2;
    for (double& v : rows) v += delta_m2;
    if (a.map)
      for (double& v : (knob == Knob::cla ? a.map->cla_m2 : a.map->cda_m2).values()) v += delta_m2;
  });
}

ConfiguredCar varied(const ConfiguredCar& car, Knob knob, double r) {
  const AeroConfig& a = car.aero();
  if ((knob == Knob::cla || knob == Knob::cda) && zero_area(a, knob)) return shifted(car, knob, r);
  return scaled(car, knob, 1.0 + r);
}

namespace {
// How `varied` moves a config, in words: "ClA +2.0 %" (or "+0.020 m2" for a zero area).
std::string perturbation_text(const AeroConfig& a, Knob knob, double r) {
  const char* name = knob == Knob::cla    ? "ClA"
                     : knob == Knob::cda  ? "CdA"
                     : knob == Knob::mass ? "mass"
                                          : "power";
  const std::string sign = r >= 0.0 ? "+" : "-";
  if ((knob == Knob::cla || knob == Knob::cda) && zero_area(a, knob))
    return std::string(name) + " " + sign + fixed(std::abs(r), 3) + " m2";
  return std::string(name) + " " + sign + fixed(100.0 * std::abs(r), 1) + " %";
}
}  // namespace

std::optional<Violation> TradeOptions::validate() const {
  return FirstViolation()
      .range("step", step, step_range, Quantity::fraction)
      .range("grid_points", grid_points, Range{min_grid_points, max_grid_points}, false)
      .range("grid_span", grid_span, grid_span_range, Quantity::fraction)
      .result();
}

namespace {

// The least value of a grid axis the traded config can take and stay a car: its rows scaled
// (moved_to) so that a straight-line trim's change keeps them within the car file's rules
// (fit_bounds' factors: a trim of -0.9 m2 ClA once met an axis down to 0 and the trade failed
// with the car file's error at 0 km/h, naming no grid: a helper's finding); a zero area, moved
// in m2, at least the trim's change.
double axis_floor(const ConfiguredCar& base, Knob knob, double at, bool zero) {
  const FitParameter p = knob == Knob::cla ? FitParameter::cla : FitParameter::cda;
  if (zero) {
    const StraightTrim trim = base.aero().trim.value_or(StraightTrim{});
    return std::max(0.0, -(knob == Knob::cla ? trim.dcla_m2 : trim.dcda_m2));
  }
  return at * fit_bounds(base, p).lo;
}

// The grid's axis for one coefficient on one track: every config's operating point and +-span
// around the traded config's, widened by grid_margin of that range on each side. A zero area
// (a car without downforce) is moved in m2 as `varied` moves it: up to span m2 above zero. No
// axis goes below zero (a negative ClA or CdA is no car), and drag areas stay above half the
// smallest config's (a car with no drag has no top speed).
std::vector<double> grid_axis(double base, bool zero, const std::vector<double>& configs,
                              const TradeOptions& o, bool is_drag, double floor) {
  double lo = zero ? 0.0 : base * (1.0 - o.grid_span);
  double hi = zero ? o.grid_span : base * (1.0 + o.grid_span);
  for (double v : configs) {
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  const double pad = grid_margin * (hi - lo);
  lo -= pad;
  hi += pad;
  const double smallest = *std::min_element(configs.begin(), configs.end());
  lo = std::max({lo, is_drag ? std::max(0.0, 0.5 * smallest) : 0.0, floor});
  std::vector<double> axis;
  const int g = o.grid_points;
  for (int i = 0; i < g; ++i) axis.push_back(lo + (hi - lo) * i / (g - 1));
  return axis;
}

// The traded config with its ClA (or CdA) moved to `target`: scaled by target / base, or, for a
// zero area, shifted by target m2 (as `varied`).
ConfiguredCar moved_to(const ConfiguredCar& c, Knob knob, double base, bool zero, double target) {
  return zero ? shifted(c, knob, target) : scaled(c, knob, target / base);
}

}  // namespace

Trade trade(const Car& car, const std::vector<std::size_t>& configs,
            const std::vector<Circuit>& circuits, const TradeOptions& o, unsigned threads) {
  require_valid(o.validate(), "trade options");
  require_valid(car.validate(), car.subject());
  require_valid(configs_violation(car, configs), "trade");
  const std::size_t nt = circuits.size(), ncfg = car.configs.size();
  // Jobs: per track, every config's own lap (for attributions and operating points), then per
  // traded config the eight perturbed laps. The grids come second: their axes span the
  // operating points the first laps give.
  struct Job {
    std::size_t track;
    ConfiguredCar car;
    bool own;  // a config's own lap: its operating point is wanted too
    // What the lap is, for a message where it cannot be completed: a config's own lap (every
    // config's is needed: the grids span their operating points), a perturbed one, a grid node.
    std::string what;
  };
  std::vector<Job> jobs;
  const Knob knobs[] = {Knob::cla, Knob::cda, Knob::mass, Knob::power};
  const int g = o.grid_points;
  for (std::size_t t = 0; t < nt; ++t) {
    for (std::size_t c = 0; c < ncfg; ++c)
      jobs.push_back({t, car.configured(c), true,
                      "its own lap, which the study needs for every config (the grids span "
                      "their operating points)"});
    for (std::size_t c : configs) {
      const ConfiguredCar base = car.configured(c);
      for (Knob k : knobs)
        for (double sign : {1.0, -1.0})
          jobs.push_back({t, varied(base, k, sign * o.step), false,
                          "the study's lap with " +
                              perturbation_text(base.aero(), k, sign * o.step) +
                              " (run laps the config as given)"});
    }
  }
  // Per job: a config's own lap's warnings.
  using Warnings = std::vector<std::vector<std::string>>;
  auto solve = [&](std::vector<double>& times, std::vector<AeroOperatingPoint>& ops,
                   Warnings& warnings) {
    times.assign(jobs.size(), 0.0);
    ops.assign(jobs.size(), AeroOperatingPoint{0.0, 0.0});
    warnings.assign(jobs.size(), {});
    parallel_for(jobs.size(), threads, [&](std::size_t k, LapSolver& solver) {
      // The lap time alone (no channels), and for a config's own lap its operating point and
      // its warnings (with its channels: an axle beyond its grip reads them), as run gives them.
      // The base car is valid (checked above); its variations may leave the files' ranges.
      try {
        const Circuit& circuit = circuits[jobs[k].track];
        const Envelope env(Envelope::Unchecked{}, jobs[k].car, circuit.air);
        const Lap& lap = solve_speed_only(env, circuit, solver);
        times[k] = lap.lap_time_s;
        if (jobs[k].own) {
          ops[k] = operating_point(env, lap);
          warnings[k] = lap_warnings(env, solver.add_channels(env, circuit.mesh), circuit.mesh);
        }
      } catch (const CannotMove& e) {
        const Track& track = circuits[jobs[k].track].track;
        throw cannot_move_in(e, track.name, track.file,
                             jobs[k].car.aero().name + ", " + jobs[k].what);
      }
    });
  };
  std::vector<double> times;
  std::vector<AeroOperatingPoint> ops;
  Warnings warnings;
  solve(times, ops, warnings);
  const std::size_t per_track = ncfg + 8 * configs.size();

  // The grids: per track, the first traded config moved over ClA x CdA.
  std::vector<TradeGrid> grids;
  {
    std::vector<Job> grid_jobs;
    const std::size_t c0 = configs.front();
    const ConfiguredCar base = car.configured(c0);
    const AeroConfig& a0 = car.configs[c0];
    const bool zero_cla = zero_area(a0, Knob::cla), zero_cda = zero_area(a0, Knob::cda);
    for (std::size_t t = 0; t < nt; ++t) {
      std::vector<double> clas, cdas;
      for (std::size_t c = 0; c < ncfg; ++c) {
        clas.push_back(ops[t * per_track + c].cla_m2);
        cdas.push_back(ops[t * per_track + c].cda_m2);
      }
      const AeroOperatingPoint& p0 = ops[t * per_track + c0];
      TradeGrid grid{t,
                     c0,
                     grid_axis(p0.cla_m2, zero_cla, clas, o, false,
                               axis_floor(base, Knob::cla, p0.cla_m2, zero_cla)),
                     grid_axis(p0.cda_m2, zero_cda, cdas, o, true,
                               axis_floor(base, Knob::cda, p0.cda_m2, zero_cda)),
                     {}};
      for (double cla : grid.cla_m2)
        for (double cda : grid.cda_m2)
          grid_jobs.push_back({t,
                               moved_to(moved_to(base, Knob::cla, p0.cla_m2, zero_cla, cla),
                                        Knob::cda, p0.cda_m2, zero_cda, cda),
                               false,
                               "the trade grid's lap at ClA " + fixed(cla, 3) + " m2, CdA " +
                                   fixed(cda, 3) + " m2"});
      grids.push_back(std::move(grid));
    }
    jobs = std::move(grid_jobs);
    std::vector<double> grid_times;
    std::vector<AeroOperatingPoint> unused;
    Warnings none;
    solve(grid_times, unused, none);
    const std::size_t nodes = static_cast<std::size_t>(g) * static_cast<std::size_t>(g);
    for (std::size_t t = 0; t < nt; ++t)
      grids[t].lap_time_s.assign(grid_times.begin() + static_cast<std::ptrdiff_t>(t * nodes),
                                 grid_times.begin() + static_cast<std::ptrdiff_t>((t + 1) * nodes));
  }

  Trade out;
  out.options = o;
  out.grids = std::move(grids);
  std::size_t k = 0;
  for (std::size_t t = 0; t < nt; ++t) {
    std::vector<double> own(times.begin() + static_cast<std::ptrdiff_t>(k),
                            times.begin() + static_cast<std::ptrdiff_t>(k + ncfg));
    const std::vector<AeroOperatingPoint> op(ops.begin() + static_cast<std::ptrdiff_t>(k),
                                             ops.begin() + static_cast<std::ptrdiff_t>(k + ncfg));
    out.operating.insert(out.operating.end(), op.begin(), op.end());
    out.own_lap_time_s.insert(out.own_lap_time_s.end(), own.begin(), own.end());
    for (std::size_t c = 0; c < ncfg; ++c) out.own_warnings.push_back(warnings[k + c]);
    k += ncfg;
    std::vector<Sensitivity> here;
    for (std::size_t c : configs) {
      const ConfiguredCar base = car.configured(c);
      const AeroConfig& a = base.aero();
      Sensitivity s{t, c, own[c], op[c].cla_m2, op[c].cda_m2, base.car().mass_kg, 0, 0, 0, 0, {}};
      // Central differences: dt/dx = (t(x (1 + h)) - t(x (1 - h))) / (2 h x): scaling every
      // value of the config by 1 +- h moves its operating point by +-h x to first order.
      // A zero aero area is moved by step m2 instead of step x 0.
      auto central = [&](double x) {
        const double d = (times[k] - times[k + 1]) / (2.0 * o.step * (x != 0.0 ? x : 1.0));
        k += 2;
        return d;
      };
      s.dt_dcla_s_per_m2 = central(zero_area(a, Knob::cla) ? 0.0 : s.cla_m2);
      s.dt_dcda_s_per_m2 = central(zero_area(a, Knob::cda) ? 0.0 : s.cda_m2);
      s.dt_dmass_s_per_kg = central(s.mass_kg);
      s.dt_dpower_s_per_percent = central(100.0);  // x = 100 %: per percent of power
      if (s.dt_dcla_s_per_m2 < 0.0 && s.dt_dcda_s_per_m2 > 0.0)
        s.breakeven_dcda_per_dcla = -s.dt_dcla_s_per_m2 / s.dt_dcda_s_per_m2;
      here.push_back(s);
      out.sensitivities.push_back(s);
    }
    for (std::size_t a = 0; a < ncfg; ++a)
      for (std::size_t b = a + 1; b < ncfg; ++b) {
        std::size_t ref = 0;
        for (std::size_t r = 0; r < here.size(); ++r)
          if (here[r].config == a) ref = r;
        const Sensitivity& s = here[ref];
        Attribution at{t, a, b, s.config, own[b] - own[a], 0, 0, 0, 0, 0, true};
        at.delta_cla_m2 = op[b].cla_m2 - op[a].cla_m2;
        at.delta_cda_m2 = op[b].cda_m2 - op[a].cda_m2;
        at.from_cla_s = s.dt_dcla_s_per_m2 * at.delta_cla_m2;
        at.from_cda_s = s.dt_dcda_s_per_m2 * at.delta_cda_m2;
        at.residual_s = at.total_s - at.from_cla_s - at.from_cda_s;
        at.first_order_reliable =
            !(std::abs(at.residual_s) > attribution_residual_limit * std::abs(at.total_s));
        out.attributions.push_back(at);
      }
  }
  assert(k == times.size());
  return out;
}

}  // namespace lapwing
