// lapwing::fit: the solve of `fit` (Ceres Solver), apart from the rest of fit.hpp's functions
// (fit.cpp): the command line loads it as a module of its own when `lapwing fit` runs, so that
// Ceres and the libraries it needs (glog, gflags, SuiteSparse, LAPACK, BLAS) are not loaded by
// every other command (DEVELOPERS.md, "The fit module"). The library (lapwing::study) has both.
#include <ceres/ceres.h>
#include <ceres/covariance.h>
#include <glog/logging.h>
#include <Eigen/Dense>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
#include <map>
#include <memory>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/study/fit.hpp"
#include "lapwing/study/thread_pool.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing {

namespace {

double start_value(FitParameter p) {
  return p == FitParameter::balance ? 0.0 : 1.0;
}

// One log's residual points: mesh indices and the logged speed there.
struct LogPoints {
  const FitLog* log;
  std::vector<std::size_t> at;
  std::vector<double> speed_mps;
};

// The residuals of every log at a parameter vector, sim - log in km/h, and by central
// differences their Jacobian; the last evaluations kept, since Ceres asks each one-residual
// block in turn at the same point.
class Residuals {
 public:
  Residuals(const ConfiguredCar& car, const std::vector<FitParameter>& params,
            std::vector<LogPoints> points, double step, unsigned threads,
            std::vector<FitBounds> bounds = {})
      : car_(car),
        params_(params),
        points_(std::move(points)),
        step_(step),
        threads_(threads),
        bounds_(std::move(bounds)) {
    for (const auto& p : points_) count_ += p.at.size();
  }
  std::size_t count() const { return count_; }
  int laps() const { return laps_; }

  struct Eval {
    bool ok = false;
    std::vector<double> r;  // count
    std::vector<double> J;  // count x params, row-major; empty until asked
  };
  // The residuals (and the Jacobian when asked) at x.
  const Eval& at(const double* x, bool jacobian) {
    std::vector<double> key(x, x + params_.size());
    auto it = cache_.find(key);
    if (it == cache_.end()) {
      if (cache_.size() > 64) cache_.clear();
      it = cache_.emplace(key, Eval{}).first;
      it->second.r.resize(count_);
      it->second.ok = residuals(key, it->second.r.data());
    }
    Eval& e = it->second;
    if (jacobian && e.ok && e.J.empty()) e.ok = jacobian_at(key, e);
    return e;
  }

  // Residuals at one vector into out (count_); false where a lap cannot be solved (the car
  // cannot move, a start speed it cannot hold: a step too far).
  bool residuals(const std::vector<double>& x, double* out) {
    std::vector<std::vector<double>> rs;
    if (!many({x}, rs)) return false;
    std::copy(rs[0].begin(), rs[0].end(), out);
    return true;
  }

 private:
  // Residuals at several vectors, the laps in parallel (each vector x log one job; results
  // at their own indices, so the same for any thread count).
  bool many(const std::vector<std::vector<double>>& xs, std::vector<std::vector<double>>& rs) {
    const std::size_t nl = points_.size();
    rs.assign(xs.size(), std::vector<double>(count_));
    std::vector<std::uint8_t> ok(xs.size() * nl, 1);
    std::vector<std::size_t> first(nl, 0);
    for (std::size_t l = 1; l < nl; ++l) first[l] = first[l - 1] + points_[l - 1].at.size();
    parallel_for(xs.size() * nl, threads_, [&](std::size_t job, LapSolver& solver) {
      const std::size_t v = job / nl, l = job % nl;
      const LogPoints& p = points_[l];
      try {
        const ConfiguredCar c = fitted_car(car_, params_, xs[v]);
        const Envelope env(Envelope::Unchecked{}, c, p.log->circuit->air);
        const Lap& lap = solve_speed_only(env, *p.log->circuit, solver);
        for (std::size_t k = 0; k < p.at.size(); ++k)
          rs[v][first[l] + k] = units::to_kph(lap.speed_mps[p.at[k]] - p.speed_mps[k]);
      } catch (const CannotMove&) {
        ok[job] = 0;
      } catch (const InvalidInput&) {
        ok[job] = 0;
      }
    });
    laps_ += static_cast<int>(xs.size() * nl);
    return std::all_of(ok.begin(), ok.end(), [](std::uint8_t b) { return b != 0; });
  }

  // dr/dx_j = (r(x + h e_j) - r(x - h e_j)) / 2h, h = step max(1, |x_j|); one-sided, from x,
  // where a side would leave the parameter's bounds (a fit at a bound: the car past it may not
  // lap, a negative area).
  bool jacobian_at(const std::vector<double>& x, Eval& e) {
    const std::size_t np = params_.size();
    std::vector<std::vector<double>> xs;
    std::vector<double> width(np);
    for (std::size_t j = 0; j < np; ++j) {
      const double h = step_ * std::max(1.0, std::abs(x[j]));
      double up = x[j] + h, down = x[j] - h;
      if (j < bounds_.size()) {
        if (up > bounds_[j].hi) up = x[j];
        if (down < bounds_[j].lo) down = x[j];
      }
      if (up == down) up = x[j] + h;  // a range narrower than the step: as before
      // 2h where neither side is held (as before bounds: (x + h) - (x - h) is not 2h to the bit).
      width[j] = up == x[j] + h && down == x[j] - h ? 2.0 * h : up - down;
      for (const double v : {up, down}) {
        xs.push_back(x);
        xs.back()[j] = v;
      }
    }
    std::vector<std::vector<double>> rs;
    if (!many(xs, rs)) return false;
    e.J.assign(count_ * np, 0.0);
    for (std::size_t j = 0; j < np; ++j)
      for (std::size_t k = 0; k < count_; ++k)
        e.J[k * np + j] = (rs[2 * j][k] - rs[2 * j + 1][k]) / width[j];
    return true;
  }

  const ConfiguredCar& car_;
  const std::vector<FitParameter>& params_;
  std::vector<LogPoints> points_;
  double step_;
  unsigned threads_;
  std::vector<FitBounds> bounds_;  // per parameter (none: central differences everywhere)
  std::size_t count_ = 0;
  int laps_ = 0;
  std::map<std::vector<double>, Eval> cache_;
};

// One residual of the problem (its own block, so that the Huber loss applies to each point).
class PointCost : public ceres::CostFunction {
 public:
  PointCost(Residuals& all, std::size_t k, int params) : all_(all), k_(k) {
    set_num_residuals(1);
    mutable_parameter_block_sizes()->push_back(params);
  }
  bool Evaluate(double const* const* x, double* r, double** jacobians) const override {
    const bool want = jacobians && jacobians[0];
    const Residuals::Eval& e = all_.at(x[0], want);
    if (!e.ok) return false;
    r[0] = e.r[k_];
    if (want) {
      const std::size_t np = static_cast<std::size_t>(parameter_block_sizes()[0]);
      for (std::size_t j = 0; j < np; ++j) jacobians[0][j] = e.J[k_ * np + j];
    }
    return true;
  }

 private:
  Residuals& all_;
  std::size_t k_;
};

// Ceres reports through glog, to stderr, in glog's format ("E... covariance_impl.cc:772] Error:
// ..." for a rank-deficient covariance, which fit reports in its own words as a warning):
// silenced while Ceres runs, the level put back after.
class QuietCeres {
 public:
  QuietCeres() : level_(FLAGS_minloglevel) { FLAGS_minloglevel = google::GLOG_FATAL; }
  ~QuietCeres() { FLAGS_minloglevel = level_; }
  QuietCeres(const QuietCeres&) = delete;
  QuietCeres& operator=(const QuietCeres&) = delete;

 private:
  int level_;
};

double rms_kph(const std::vector<double>& r, std::size_t from, std::size_t to) {
  double s = 0.0;
  for (std::size_t k = from; k < to; ++k) s += r[k] * r[k];
  return to > from ? std::sqrt(s / static_cast<double>(to - from)) : 0.0;
}

}  // namespace

FitResult fit(const ConfiguredCar& car, const std::vector<FitLog>& logs,
              const std::vector<FitParameter>& params, const FitOptions& options) {
  require_valid(options.validate(), "fit options");
  require_valid(FirstViolation()
                    .rule(!params.empty(), "free", "free at least one parameter")
                    .rule(!logs.empty(), "log", "give at least one log")
                    .result(),
                "fit");
  for (std::size_t i = 0; i < params.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (params[i] == params[j])
        throw InvalidInput("fit", broken_rule("free", std::string(fit_parameter_name(params[i])) +
                                                          " is freed twice"));
  // grip scales mu_lat and mu_long together: with grip_lat and grip_long freed too, any change of
  // grip is undone by the other two (mu_lat = grip grip_lat, mu_long = grip grip_long), so the
  // three are two factors and no log can tell them apart. Their Jacobian columns differ by the
  // central differences' noise alone (a smallest singular value of 2 % of the largest in a test
  // of a bundled log, against 11 % for four factors the log separates): no rank test on it tells
  // the two cases apart, so the combination is refused by what it is.
  const auto freed = [&](FitParameter p) {
    return std::find(params.begin(), params.end(), p) != params.end();
  };
  if (freed(FitParameter::grip) && freed(FitParameter::grip_lat) && freed(FitParameter::grip_long))
    throw InvalidInput(
        "fit", broken_rule("free",
                           "grip, grip_lat and grip_long are two factors, not three: grip scales "
                           "mu_lat and mu_long together, so the other two undo any change of it "
                           "and no log tells them apart (free grip_lat and grip_long, or grip "
                           "and one of them)"));
  FitResult out;
  out.params = params;
  const std::size_t np = params.size();
  // Residual points every residual_spacing_m under the logs' alignments.
  auto points_at = [&](const std::vector<Alignment>& al) {
    std::vector<LogPoints> points;
    for (std::size_t k = 0; k < logs.size(); ++k) {
      const Circuit& c = *logs[k].circuit;
      const LogOnMesh on = log_on_mesh(*logs[k].log, c.mesh, al[k]);
      LogPoints p{&logs[k], {}, {}};
      const std::size_t every = std::max<std::size_t>(
          1, static_cast<std::size_t>(std::lround(options.residual_spacing_m / c.mesh.step_m)));
      for (std::size_t i = 0; i < c.mesh.size(); i += every)
        if (on.covered[i]) {
          p.at.push_back(i);
          p.speed_mps.push_back(on.speed_mps[i]);
        }
      points.push_back(std::move(p));
    }
    return points;
  };
  // Each log aligned with a car: the alignment by cross-correlation leans towards the car's own
  // braking points, so it is found again with the fitted car (below).
  // The first search is over every offset; the next rounds refine the last round's.
  auto aligned = [&](const ConfiguredCar& c, const std::vector<Alignment>* near) {
    std::vector<Alignment> al;
    LapSolver solver;
    solver.set_threads(lone_lap_threads());
    for (std::size_t k = 0; k < logs.size(); ++k) {
      const Circuit& circuit = *logs[k].circuit;
      const Envelope env =
          near ? Envelope(Envelope::Unchecked{}, c, circuit.air) : Envelope(c, circuit.air);
      const Lap& lap = solve_speed_only(env, circuit, solver);
      al.push_back(near ? refine_alignment(*logs[k].log, circuit.mesh, lap.speed_mps, (*near)[k])
                        : align_log(*logs[k].log, circuit.mesh, lap.speed_mps));
    }
    return al;
  };
  std::vector<double> x0(np);
  for (std::size_t j = 0; j < np; ++j) x0[j] = start_value(params[j]);
  // Each parameter within the range that keeps the fitted car one the car file allows (a
  // factor on a CdA or a ClA once went below 0: a campaign's log of a car with twice the
  // torque, fitted by its drag alone, read CdA x-0.31).
  std::vector<FitBounds> bounds;
  for (const FitParameter p : params) bounds.push_back(fit_bounds(car, p));
  // More residual points than parameters, at every alignment.
  const auto require_more_points = [&](std::size_t count) {
    if (count <= np)
      throw InvalidInput(
          "fit", broken_rule("log", "the logs give " + std::to_string(count) + " points for " +
                                        std::to_string(np) + " parameters"));
  };
  const std::vector<Alignment> al0 = aligned(car, nullptr);  // checked: the car the user gave
  out.alignments = al0;
  {
    // The RMS before: the car as given.
    const std::vector<LogPoints> points = points_at(al0);
    std::vector<std::size_t> at(1, 0);
    for (const auto& p : points) at.push_back(at.back() + p.at.size());
    Residuals given(car, params, points, options.step, options.threads, bounds);
    const std::size_t count = given.count();
    require_more_points(count);
    std::vector<double> r0(count);
    if (!given.residuals(x0, r0.data()))
      throw InvalidInput("fit", broken_rule("", "the starting car cannot lap a track"));
    for (std::size_t l = 0; l + 1 < at.size(); ++l)
      out.rms_before_mps.push_back(rms_kph(r0, at[l], at[l + 1]) * units::kph);
    out.rms_before_mps_all = rms_kph(r0, 0, count) * units::kph;
    out.laps_solved += given.laps();
  }
  // One fit from a start: fit and alignment in turn (block coordinate descent), at most
  // options.alignment_rounds, until the alignment moves less than fit_alignment_settled_m and
  // fit_alignment_settled_scale. Its problem holds the address of its x: kept in place.
  struct Attempt {
    std::vector<double> x;
    std::vector<Alignment> al;
    std::unique_ptr<Residuals> all;
    std::unique_ptr<ceres::Problem> problem;
    ceres::Solver::Summary summary;
    std::size_t n = 0;
    double moved_m = 0.0, moved_scale = 0.0;  // the last round's largest move
    int rounds = 0, iterations = 0, laps = 0;
    bool settled = false, cap = false;
    std::string termination;
    double rms_after = 0.0;           // over every log's points, at the alignment found last
    std::vector<double> r_after;      // those residuals (km/h), log after log
    std::vector<std::size_t> at_log;  // where each log's start in r_after (and the end)
  };
  const QuietCeres quiet;
  // `bounded`: each factor held within its bounds (Ceres's bounds, one-sided differences at a
  // bound); without, the path of a fit that stays within them is the one it always took (a
  // bounded problem takes another: the demo's fit solved 358 laps where it solved 133).
  const std::vector<FitBounds> none;
  const auto attempt = [&](const std::vector<double>& from, bool bounded) {
    const std::vector<FitBounds>& held = bounded ? bounds : none;
    auto a = std::make_unique<Attempt>();
    a->x = from;
    a->al = al0;
    std::vector<double>& x = a->x;
    for (int round = 0; round < options.alignment_rounds; ++round) {
      a->all = std::make_unique<Residuals>(car, params, points_at(a->al), options.step,
                                           options.threads, held);
      a->n = a->all->count();
      require_more_points(a->n);
      ceres::Problem::Options po;
      po.cost_function_ownership = ceres::TAKE_OWNERSHIP;
      po.loss_function_ownership = ceres::TAKE_OWNERSHIP;
      a->problem = std::make_unique<ceres::Problem>(po);
      for (std::size_t k = 0; k < a->n; ++k)
        a->problem->AddResidualBlock(new PointCost(*a->all, k, static_cast<int>(np)),
                                     new ceres::HuberLoss(options.huber_kph), x.data());
      for (std::size_t j = 0; j < held.size(); ++j) {
        const int at = static_cast<int>(j);
        if (std::isfinite(held[j].lo)) a->problem->SetParameterLowerBound(x.data(), at, held[j].lo);
        if (std::isfinite(held[j].hi)) a->problem->SetParameterUpperBound(x.data(), at, held[j].hi);
      }
      ceres::Solver::Options so;
      so.linear_solver_type = ceres::DENSE_QR;
      so.minimizer_type = ceres::TRUST_REGION;
      so.trust_region_strategy_type = ceres::LEVENBERG_MARQUARDT;
      so.max_num_iterations = options.max_iterations;
      so.num_threads = 1;  // the residual cache is not shared between threads; laps in parallel
      so.logging_type = ceres::SILENT;
      so.minimizer_progress_to_stdout = false;
      // A factor to 1e-4 is below what the logs resolve (standard errors of 0.03 % and more in
      // the tests' fits, README, "Correlating with your data").
      so.parameter_tolerance = 1e-4;
      so.function_tolerance = 1e-6;
      ceres::Solve(so, a->problem.get(), &a->summary);
      a->iterations += static_cast<int>(a->summary.iterations.size());
      a->laps += a->all->laps();
      a->termination = a->summary.message;
      a->cap = a->summary.termination_type == ceres::NO_CONVERGENCE;
      const std::vector<Alignment> next = aligned(fitted_car(car, params, x), &a->al);
      a->moved_m = a->moved_scale = 0.0;
      for (std::size_t k = 0; k < a->al.size(); ++k) {
        a->moved_m = std::max(a->moved_m, std::abs(next[k].offset_m - a->al[k].offset_m));
        a->moved_scale = std::max(a->moved_scale, std::abs(next[k].scale - a->al[k].scale));
      }
      a->rounds = round + 1;
      a->al = next;
      a->settled =
          a->moved_m <= fit_alignment_settled_m && a->moved_scale <= fit_alignment_settled_scale;
      if (a->settled) break;
    }
    a->laps += static_cast<int>(logs.size()) * (a->rounds + 1);  // the alignments' laps
    const std::vector<LogPoints> points = points_at(a->al);
    a->at_log.assign(1, 0);
    for (const auto& p : points) a->at_log.push_back(a->at_log.back() + p.at.size());
    Residuals final_points(car, params, points, options.step, options.threads, held);
    a->r_after.resize(final_points.count());
    if (!final_points.residuals(x, a->r_after.data()))
      throw InvalidInput("fit", broken_rule("", "the fitted car cannot lap a track"));
    a->laps += final_points.laps();
    a->rms_after = rms_kph(a->r_after, 0, a->r_after.size());
    return a;
  };
  // A fit first without bounds; where it ends beyond one, or where the car could not be lapped
  // at a step it took (a value past a rule the Envelope refuses: a trim's ClA below 0), again
  // with them from its end held within them. Its iterations and laps count in both.
  const auto fitted_from = [&](const std::vector<double>& from) {
    std::unique_ptr<Attempt> a = attempt(from, false);
    bool outside = a->summary.termination_type == ceres::FAILURE;
    std::vector<double> held = a->x;
    for (std::size_t j = 0; j < np; ++j) {
      outside = outside || !(held[j] >= bounds[j].lo && held[j] <= bounds[j].hi);
      held[j] = std::isfinite(held[j]) ? std::clamp(held[j], bounds[j].lo, bounds[j].hi) : from[j];
    }
    if (!outside) return a;
    const int laps = a->laps, iterations = a->iterations;
    a = attempt(held, true);
    a->laps += laps;
    a->iterations += iterations;
    return a;
  };
  std::unique_ptr<Attempt> best = fitted_from(x0);
  // A second start for the balance where a coarse grid of shifts (-0.2 to +0.2, within its
  // bounds, the other factors at theirs) finds a better one than 0: the speed trace is not
  // monotone in the balance (which axle limits a corner changes with it), and from 0 a fit of
  // a log with a balance 0.2 further forward settled at -0.06 (a campaign's finding: RMS 3.5
  // km/h, where the true balance gives 0.5). The fit with the lower RMS after is kept (a grid
  // start can mislead where other factors are off too: a seven-factor fit from it ended at 1.1
  // km/h where the fit from 0 ended at 0.04).
  if (const auto b = std::find(params.begin(), params.end(), FitParameter::balance);
      b != params.end()) {
    const std::size_t j = static_cast<std::size_t>(b - params.begin());
    Residuals grid(car, params, points_at(al0), options.step, options.threads, bounds);
    std::vector<double> r(grid.count());
    double lowest = std::numeric_limits<double>::infinity();
    double shift_at = 0.0;
    for (const double shift : {0.0, -0.2, -0.1, 0.1, 0.2}) {
      if (shift < bounds[j].lo || shift > bounds[j].hi) continue;
      std::vector<double> at = x0;
      at[j] = shift;
      if (!grid.residuals(at, r.data())) continue;
      double cost = 0.0;
      for (const double v : r) cost += v * v;
      if (cost < lowest) {
        lowest = cost;
        shift_at = shift;
      }
    }
    out.laps_solved += grid.laps();
    if (shift_at != 0.0) {
      std::vector<double> from = x0;
      from[j] = shift_at;
      std::unique_ptr<Attempt> other = fitted_from(from);
      if (other->rms_after < best->rms_after) std::swap(best, other);
      out.laps_solved += other->laps;  // the fit not kept: its laps and iterations count too
      out.iterations += other->iterations;
    }
  }
  out.laps_solved += best->laps;
  out.iterations += best->iterations;
  const std::vector<double>& x = best->x;
  const std::vector<Alignment>& al = best->al;
  std::unique_ptr<ceres::Problem>& problem = best->problem;
  const ceres::Solver::Summary& summary = best->summary;
  const std::size_t n = best->n;
  const double moved_m = best->moved_m, moved_scale = best->moved_scale;
  out.rounds = best->rounds;
  out.settled = best->settled;
  out.termination = best->termination;
  out.iteration_cap = best->cap;
  out.final_alignments = al;
  out.values = x;

  // RMS after: the fitted car against the logs at the alignments found with it (the kept
  // fit's last residuals).
  for (std::size_t l = 0; l + 1 < best->at_log.size(); ++l)
    out.rms_after_mps.push_back(rms_kph(best->r_after, best->at_log[l], best->at_log[l + 1]) *
                                units::kph);
  out.rms_after_mps_all = best->rms_after * units::kph;

  // What the figures must be read with, per log, then of the fit.
  for (std::size_t k = 0; k < logs.size(); ++k) {
    const std::string& name = logs[k].log->source;
    std::vector<std::string> w = alignment_warnings(out.alignments[k]);
    if (w.empty()) w = alignment_warnings(al[k]);
    if (auto sparse = log_spacing_warning(*logs[k].log, al[k])) w.push_back(std::move(*sparse));
    const LogOnMesh on = log_on_mesh(*logs[k].log, logs[k].circuit->mesh, al[k]);
    if (!on.gaps_m.empty()) {
      double gap_m = 0.0;
      for (const auto& g : on.gaps_m) gap_m += g.second - g.first;
      w.push_back("the log has gaps (up to " + fixed(on.longest_gap_s, 1) +
                  " s without a row): " + fixed(gap_m, 0) + " m of the track not fitted");
    }
    if (on.full_laps > 1)
      w.push_back("the log holds " + std::to_string(on.full_laps) +
                  " laps (line to line); the one from the log's distance " +
                  fixed(on.lap_start_d, 1) + " m is fitted");
    for (const std::string& s : w) out.warnings.push_back(name + ": " + s);
  }
  if (!out.settled)
    out.warnings.push_back(
        "the alignment still moved " + fixed(moved_m, 2) + " m (scale " + fixed(moved_scale, 4) +
        ") in the last of " + std::to_string(options.alignment_rounds) +
        " rounds of fit and alignment: the factors are fitted to the last round's alignment, "
        "the RMS after is at the newest; a log far off the starting car's alignment fits better "
        "from a car nearer the logged one");
  if (out.rms_after_mps_all > out.rms_before_mps_all)
    out.warnings.push_back(
        "the RMS error after the fit, " + fixed(units::to_kph(out.rms_after_mps_all), 2) +
        " km/h, is above the one before, " + fixed(units::to_kph(out.rms_before_mps_all), 2) +
        " km/h: the fit lowers the Huber loss (" + fixed(options.huber_kph, 1) +
        " km/h), in which points far off the model (a lock-up, traffic, a missed apex) weigh "
        "less than in the RMS; the logs hold such points (correlate's largest errors show them), "
        "and the factors follow the rest of the lap");

  if (summary.termination_type == ceres::FAILURE)
    out.warnings.push_back(
        "the fit stopped where the car could not be lapped at a step it tried (" + out.termination +
        "): the factors are where it stopped, not a best fit; a factor may be beyond what the "
        "car's file allows with its other values (a straight-line trim's ClA, a balance near 0 "
        "or 1)");
  if (out.iteration_cap)
    out.warnings.push_back(
        "the fit's last round stopped at its limit of " + std::to_string(options.max_iterations) +
        " iterations, short of its tolerances: the factors had not settled (they are where the "
        "fit had moved them); free fewer factors, or start from a car nearer the logged one");
  // A factor at its bound: the logs ask for more than it can give within the car file's rules.
  for (std::size_t j = 0; j < np; ++j) {
    const FitBounds& b = bounds[j];
    const double slack = 1e-9 * std::max(1.0, std::abs(x[j]));
    const bool low = x[j] <= b.lo + slack, high = x[j] >= b.hi - slack;
    if (!low && !high) continue;
    const bool shift = params[j] == FitParameter::balance;
    out.warnings.push_back(
        std::string(fit_parameter_name(params[j])) + " ended at its " +
        (low ? "least" : "largest") + " value within the car file's rules (" +
        (shift ? "a shift of " : "x") + fixed(x[j], 4) +
        "): the logs ask for more than it can give; another factor is likely off (free it, "
        "or check the car: its power, mass, grip), or the logs are of another car or config; "
        "its standard error does not hold at a bound");
  }

  // A fit that still misses the logs by far, or a factor far from the file's: figures to read
  // with doubt (a helper's campaign: a log 30 % faster fitted with mass x0.344, 220 kg for a
  // 640 kg car, and RMS 7.4 km/h after, without a word; grip alone x1.67 and 14.6 km/h).
  if (units::to_kph(out.rms_after_mps_all) > fit_poor_rms_kph)
    out.warnings.push_back(
        "the fitted car still misses the logs by " +
        fixed(units::to_kph(out.rms_after_mps_all), 2) + " km/h RMS (over " +
        fixed(fit_poor_rms_kph, 0) +
        " km/h): these factors do not make the car the logged one; the logs may be of another "
        "car, config or track, or a factor not freed is off (correlate shows where the laps "
        "part)");
  for (std::size_t j = 0; j < np; ++j)
    if (params[j] != FitParameter::balance && std::abs(x[j] - 1.0) > fit_far_factor)
      out.warnings.push_back(std::string(fit_parameter_name(params[j])) + " moved to x" +
                             fixed(x[j], 3) + " of the car file's, more than " +
                             fixed(100.0 * fit_far_factor, 0) +
                             " % off: beyond a set-up change; check that the logs are of this "
                             "car and config and the files' units before using the fitted car");

  // Covariance of the parameters: Ceres gives (J^T J)^-1 for unit-variance residuals; scaled by
  // the residuals' variance, s^2 = 2 cost / (N - P) (cost = 1/2 sum rho(r^2), the robust one).
  const double nan = std::numeric_limits<double>::quiet_NaN();
  out.std_errors.assign(np, nan);
  out.correlation.assign(np, std::vector<double>(np, nan));
  ceres::Covariance::Options co;
  co.algorithm_type = ceres::DENSE_SVD;
  // A rank-deficient Jacobian (a freed factor with no effect on the lap; grip_lat, grip_long and
  // grip, three that are two, are refused above) has no covariance: Compute() says so and none is
  // reported (the pseudo-inverse, null_space_rank -1, gave such a factor a standard error of 0:
  // certain).
  co.null_space_rank = 0;
  co.num_threads = 1;
  ceres::Covariance cov(co);
  const std::vector<std::pair<const double*, const double*>> blocks{{x.data(), x.data()}};
  std::vector<double> c(np * np);
  if (cov.Compute(blocks, problem.get()) && cov.GetCovarianceBlock(x.data(), x.data(), c.data())) {
    const double s2 = 2.0 * summary.final_cost / static_cast<double>(n - np);
    bool finite = true;
    for (double& v : c) {
      v *= s2;
      finite = finite && std::isfinite(v);
    }
    if (finite) {
      out.covariance_found = true;
      for (std::size_t i = 0; i < np; ++i)
        out.std_errors[i] = std::sqrt(std::max(0.0, c[i * np + i]));
      for (std::size_t i = 0; i < np; ++i)
        for (std::size_t j = 0; j < np; ++j) {
          const double d = std::sqrt(c[i * np + i] * c[j * np + j]);
          // The covariance's two halves averaged: Ceres's differ in the last bits, and a
          // correlation matrix is symmetric (fit.json's differed in its last digit).
          const double cij = 0.5 * (c[i * np + j] + c[j * np + i]);
          out.correlation[i][j] = i == j ? 1.0 : d > 0 ? cij / d : 0.0;
        }
    }
  }
  for (std::size_t i = 0; i < np; ++i)
    for (std::size_t j = i + 1; j < np; ++j) {
      const double rho = out.correlation[i][j];
      if (!out.covariance_found || std::abs(rho) > options.separable_limit)
        out.inseparable.push_back({i, j, rho, separation_advice(params[i], params[j])});
    }
  // Three or more factors can be inseparable together where no pair is (a campaign's seven
  // factors fitted to a log of a car with twice the drag: power, CdA, ClA and mass moved along
  // one valley, each pair's |correlation| under the limit, their standard errors a hundredth
  // of their errors): each factor's multiple correlation with all the others, R^2 = 1 - 1 /
  // (C^-1)_jj for the correlation matrix C (the variance inflation factor's; Belsley, Kuh &
  // Welsch, Regression Diagnostics, 1980), beyond the same limit.
  if (out.covariance_found && np >= 3) {
    Eigen::MatrixXd corr(np, np);
    for (std::size_t i = 0; i < np; ++i)
      for (std::size_t j = 0; j < np; ++j)
        corr(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = out.correlation[i][j];
    const Eigen::FullPivLU<Eigen::MatrixXd> lu(corr);
    const Eigen::MatrixXd inv = lu.inverse();
    std::string together;
    double worst = 0.0;
    for (std::size_t j = 0; j < np; ++j) {
      const double d = inv(static_cast<Eigen::Index>(j), static_cast<Eigen::Index>(j));
      const double r = d >= 1.0 ? std::sqrt(1.0 - 1.0 / d) : 0.0;
      if (!(r > options.separable_limit) && std::isfinite(d)) continue;
      bool paired = false;
      for (const auto& pair : out.inseparable) paired = paired || pair.a == j || pair.b == j;
      if (paired) continue;
      together +=
          std::string(together.empty() ? "" : ", ") + std::string(fit_parameter_name(params[j]));
      worst = std::max(worst, std::isfinite(d) ? r : 1.0);
    }
    if (!together.empty())
      out.warnings.push_back(
          together + (together.find(',') == std::string::npos ? " is" : " are each") +
          " nearly a combination of the other factors (multiple correlation up to " +
          fixed(worst, 3) + ", beyond " + fixed(options.separable_limit, 2) +
          ", though no pair with them is): these logs cannot tell them apart together, and their "
          "standard errors understate how far off they can be; fix some of them (the car "
          "weighed, its power measured) or add logs that weigh them differently");
  }
  return out;
}

}  // namespace lapwing
