#include "lapwing/study/sweep.hpp"

#include <boost/random/sobol.hpp>

#include <algorithm>
#include <cctype>
#include <charconv>
#include <chrono>
#include <cmath>
#include <limits>
#include <random>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/study/thread_pool.hpp"

namespace lapwing {

namespace {

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

[[noreturn]] void bad(std::string subject, std::string sentence, std::string key = {}) {
  throw InvalidInput(std::move(subject), broken_rule(std::move(key), std::move(sentence)));
}

// "620kg" -> 620, "kg"; "3.2 m2" -> 3.2, "m2"; a word -> nothing.
struct NumberText {
  double number;
  std::string unit;
};
std::optional<NumberText> split_number(std::string_view text) {
  text = trim(text);
  double v = 0.0;
  const char* first = text.data();
  if (!text.empty() && text.front() == '+') ++first;
  const auto [end, ec] = std::from_chars(first, text.data() + text.size(), v);
  // from_chars reads "nan" and "inf" too: not a value any key takes (a car file refuses them).
  if (ec != std::errc() || end == first || !std::isfinite(v)) return std::nullopt;
  const std::string_view unit = trim(text.substr(static_cast<std::size_t>(end - text.data())));
  // A unit is a word (letters, digits, '/', '%', '^'); "1.5.2" is not a number with a unit.
  if (!unit.empty() &&
      !(std::isalpha(static_cast<unsigned char>(unit.front())) || unit.front() == '%'))
    return std::nullopt;
  return NumberText{v, std::string(unit)};
}

std::optional<std::size_t> parse_count(std::string_view t) {
  t = trim(t);
  std::size_t n = 0;
  const auto [end, ec] = std::from_chars(t.data(), t.data() + t.size(), n);
  if (ec != std::errc() || end != t.data() + t.size() || t.empty()) return std::nullopt;
  return n;
}

}  // namespace

std::string value_text(double number, const std::string& unit) {
  return unit.empty() ? format_number(number) : format_number(number) + " " + unit;
}

SweepSet parse_set(std::string_view text) {
  const std::string subject = "--set " + std::string(text);
  SweepSet s;
  s.text = std::string(text);
  const std::size_t eq = text.find('=');
  if (eq == std::string_view::npos) bad(subject, "expected KEY=VALUES (e.g. mass=620kg:680kg:4)");
  s.key = std::string(trim(text.substr(0, eq)));
  const std::string_view values = trim(text.substr(eq + 1));
  if (s.key.empty()) bad(subject, "the key is empty (expected KEY=VALUES)");
  if (values.empty())
    bad(subject, "no values after '=' (a list a,b,c or a range start:stop:count)");
  if (values.find(':') != std::string_view::npos) {
    // A range: start:stop[:count], both ends numbers in one unit (or one end without a unit).
    std::vector<std::string_view> parts;
    for (std::size_t a = 0;;) {
      const std::size_t b = values.find(':', a);
      parts.push_back(values.substr(a, b == std::string_view::npos ? b : b - a));
      if (b == std::string_view::npos) break;
      a = b + 1;
    }
    if (parts.size() < 2 || parts.size() > 3)
      bad(subject, "a range is start:stop:count (or start:stop for lhs and sobol)", s.key);
    const auto a = split_number(parts[0]), b = split_number(parts[1]);
    if (!a)
      bad(subject, "range start '" + std::string(trim(parts[0])) + "' is not a number", s.key);
    if (!b) bad(subject, "range stop '" + std::string(trim(parts[1])) + "' is not a number", s.key);
    if (!a->unit.empty() && !b->unit.empty() && a->unit != b->unit)
      bad(subject,
          "give both ends of the range in one unit ('" + a->unit + "' and '" + b->unit + "')",
          s.key);
    s.range = true;
    s.start = a->number;
    s.stop = b->number;
    s.unit = a->unit.empty() ? b->unit : a->unit;
    if (parts.size() == 3) {
      const auto n = parse_count(parts[2]);
      if (!n || *n < 1 || *n > max_sweep_points)
        bad(subject,
            "range count '" + std::string(trim(parts[2])) + "' must be a whole number >= 1", s.key);
      if (*n == 1 && s.start != s.stop)
        bad(subject, "a range of count 1 needs start = stop (or give a count of 2 or more)", s.key);
      s.count = static_cast<int>(*n);
    }
    return s;
  }
  for (std::size_t a = 0;;) {
    const std::size_t b = values.find(',', a);
    const std::string_view item = trim(values.substr(a, b == std::string_view::npos ? b : b - a));
    if (item.empty()) bad(subject, "an empty value in the list", s.key);
    s.items.emplace_back(item);
    if (b == std::string_view::npos) break;
    a = b + 1;
  }
  // The set's column holds each value's number (README, "Sweep"): numbers in two units, or some
  // with a unit and some without, would sit in one column as if in one (a review's finding:
  // mass=700kg,1550lb stored 700 and 1550). As a range's ends, every number in one unit.
  std::optional<std::string> unit;
  for (const std::string& item : s.items)
    if (const auto num = split_number(item)) {
      if (unit && *unit != num->unit)
        bad(subject,
            "give every number of the list in one unit ('" + *unit + "' and '" + num->unit +
                "'; a number without a unit is in the key's own): the set's column holds the "
                "numbers as typed",
            s.key);
      unit = num->unit;
    }
  s.unit = unit.value_or("");  // the list's one unit, as a range's (the table's header, the store)
  return s;
}

std::string SweepDesign::text() const {
  switch (kind) {
    case Kind::grid:
      return "grid";
    case Kind::lhs:
      return "lhs:" + std::to_string(samples);
    case Kind::sobol:
      return "sobol:" + std::to_string(samples);
  }
  return "grid";
}

SweepDesign parse_design(std::string_view text) {
  const std::string subject = "--design " + std::string(text);
  SweepDesign d;
  text = trim(text);
  if (text == "grid") return d;
  const std::size_t colon = text.find(':');
  const std::string_view kind = text.substr(0, colon);
  if (kind != "lhs" && kind != "sobol") bad(subject, "expected grid, lhs:N or sobol:N");
  d.kind = kind == "lhs" ? SweepDesign::Kind::lhs : SweepDesign::Kind::sobol;
  const auto n =
      colon == std::string_view::npos ? std::nullopt : parse_count(text.substr(colon + 1));
  if (!n || *n < 1 || *n > max_sweep_points)
    bad(subject, std::string(kind) + " needs its number of points: " + std::string(kind) +
                     ":N with N from 1 to " + std::to_string(max_sweep_points));
  d.samples = *n;
  return d;
}

Shard parse_shard(std::string_view text) {
  const std::string subject = "--shard " + std::string(text);
  const std::size_t slash = text.find('/');
  const auto k =
      slash == std::string_view::npos ? std::nullopt : parse_count(text.substr(0, slash));
  const auto n =
      slash == std::string_view::npos ? std::nullopt : parse_count(text.substr(slash + 1));
  if (!k || !n || *n < 1 || *k < 1 || *k > *n)
    bad(subject, "expected K/N with 1 <= K <= N (shard K of N, e.g. 3/8)");
  return Shard{*k, *n};
}

std::vector<SetValue> grid_values(const SweepSet& set) {
  std::vector<SetValue> out;
  if (!set.range) {
    for (const auto& item : set.items) {
      const auto num = split_number(item);
      out.push_back({num ? std::optional<double>(num->number) : std::nullopt,
                     num ? value_text(num->number, num->unit) : item});
    }
    return out;
  }
  const int n = set.count;
  for (int i = 0; i < n; ++i) {
    // The ends exactly as typed; between them start + (stop - start) i / (n - 1).
    const double v = i == 0       ? set.start
                     : i == n - 1 ? set.stop
                                  : set.start + (set.stop - set.start) * i / (n - 1);
    out.push_back({v, value_text(v, set.unit)});
  }
  return out;
}

SweepPlan::SweepPlan(std::vector<SweepSet> sets, SweepDesign design)
    : sets_(std::move(sets)), design_(design) {
  if (sets_.empty()) bad("--set", "give at least one --set KEY=VALUES");
  for (std::size_t i = 0; i < sets_.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (sets_[i].key == sets_[j].key)
        bad("--set " + sets_[i].text, "key '" + sets_[i].key + "' is set twice", sets_[i].key);
  if (design_.kind == SweepDesign::Kind::grid) {
    points_ = 1;
    for (const auto& s : sets_) {
      if (s.range && s.count == 0)
        bad("--set " + s.text, "the grid design needs a count: start:stop:count", s.key);
      levels_.push_back(grid_values(s));
      if (points_ > max_sweep_points / levels_.back().size())
        bad("--set " + s.text,
            "the grid has more than " + std::to_string(max_sweep_points) + " points");
      points_ *= levels_.back().size();
    }
    return;
  }
  for (const auto& s : sets_)
    if (!s.range)
      bad("--set " + s.text, design_.text() + " samples ranges: give start:stop, not a list",
          s.key);
  points_ = design_.samples;
  samples_ = design_.kind == SweepDesign::Kind::lhs
                 ? latin_hypercube(points_, sets_.size(), lhs_seed)
                 : sobol_points(points_, sets_.size());
}

SetValue SweepPlan::value(std::size_t point, std::size_t set) const {
  if (!levels_.empty()) {
    // Row-major: the last set varies fastest.
    std::size_t stride = 1;
    for (std::size_t s = levels_.size(); s-- > set + 1;) stride *= levels_[s].size();
    return levels_[set][(point / stride) % levels_[set].size()];
  }
  const SweepSet& s = sets_[set];
  const double u = samples_[point * sets_.size() + set];
  const double v = s.start + (s.stop - s.start) * u;
  return {v, value_text(v, s.unit)};
}

namespace {
// A uniform integer in [0, n) from the engine by rejection (no modulo bias, portable).
std::uint64_t below(std::mt19937_64& g, std::uint64_t n) {
  const std::uint64_t limit =
      std::numeric_limits<std::uint64_t>::max() - std::numeric_limits<std::uint64_t>::max() % n;
  std::uint64_t x;
  do x = g();
  while (x >= limit);
  return x % n;
}
// A uniform double in [0, 1): the top 53 bits over 2^53.
double unit_interval(std::mt19937_64& g) {
  return static_cast<double>(g() >> 11) * 0x1p-53;
}
}  // namespace

std::vector<double> latin_hypercube(std::size_t n, std::size_t dims, std::uint64_t seed) {
  std::mt19937_64 g(seed);
  std::vector<double> out(n * dims);
  std::vector<std::size_t> perm(n);
  for (std::size_t d = 0; d < dims; ++d) {
    for (std::size_t i = 0; i < n; ++i) perm[i] = i;
    // Fisher-Yates shuffle (Knuth, TAOCP vol. 2, algorithm P).
    for (std::size_t i = n; i-- > 1;) std::swap(perm[i], perm[below(g, i + 1)]);
    // Point i lies in stratum perm[i]: x = (perm[i] + u) / n.
    for (std::size_t i = 0; i < n; ++i)
      out[i * dims + d] =
          (static_cast<double>(perm[i]) + unit_interval(g)) / static_cast<double>(n);
  }
  return out;
}

std::vector<double> sobol_points(std::size_t n, std::size_t dims) {
  boost::random::sobol gen(dims);
  std::vector<double> out(n * dims);
  // Boost's engine starts after the origin (its first point is the box's centre), as the
  // sweep wants: the origin is a corner of the box.
  // The engine's integers are 64-bit fractions of 2^64.
  for (auto& x : out) x = static_cast<double>(gen()) * 0x1p-64;
  return out;
}

SweepOutcome run_sweep(const SweepPlan& plan, const std::vector<Circuit>& circuits,
                       const std::vector<std::string>& configs,
                       const std::function<Car(std::size_t point)>& car_at, SweepSink& sink,
                       const SweepOptions& o) {
  SweepOutcome out;
  std::vector<std::size_t> todo;
  for (std::size_t p = 0; p < plan.points(); ++p) {
    if (!o.shard.contains(p)) continue;
    ++out.in_shard;
    if (sink.has(p))
      ++out.skipped;
    else
      todo.push_back(p);
  }
  const auto start = std::chrono::steady_clock::now();
  const std::size_t per_point = circuits.size() * configs.size();
  const std::size_t batch = std::max<std::size_t>(o.points_per_commit, 1);
  std::vector<SweepRow> rows;
  for (std::size_t b = 0; b < todo.size(); b += batch) {
    const std::size_t m = std::min(batch, todo.size() - b);
    rows.assign(m * per_point, SweepRow{});
    parallel_for(m, o.threads, [&](std::size_t i, LapSolver& solver) {
      const std::size_t point = todo[b + i];
      const Car car = car_at(point);
      for (std::size_t c = 0; c < configs.size(); ++c) {
        const int index = car.config_index(configs[c]);
        if (index < 0)
          throw InvalidInput(car.subject(),
                             broken_rule("aero.configs", "no config named '" + configs[c] + "'"));
        const ConfiguredCar configured = car.configured(static_cast<std::size_t>(index));
        for (std::size_t t = 0; t < circuits.size(); ++t) {
          SweepRow& r = rows[i * per_point + c * circuits.size() + t];
          r.point = point;
          r.track = t;
          r.config = c;
          try {
            // The lowest front share at speed and the balance window's verdict read the front
            // share, so a point needs both passes, the second for the loads alone (no usage: a
            // row keeps no corner's axle) and only at the points those figures read (full drive
            // at speed, the window's turns); the lap is summarised in the solver's buffers
            // (run_lap would copy it out) and nothing is written but the figures below.
            const Envelope env(configured, circuits[t].air);
            solve_speed_only(env, circuits[t], solver);
            const Lap& lap =
                solver.add_row_loads(env, circuits[t].mesh, summary_row_loads(env.car()));
            const LapSummary s = summarize(lap, circuits[t].mesh, circuits[t].track,
                                           circuits[t].corners, env, SummaryDetail::row_figures);
            r.lap_time_s = s.lap_time_s;
            r.top_speed_kph = units::to_kph(s.top_speed_mps);
            r.min_speed_kph = units::to_kph(s.min_speed_mps);
            r.full_throttle_fraction = s.full_throttle_fraction;
            r.braking_fraction = s.braking_fraction;
            if (s.balance.has_fast_acceleration)
              r.lowest_front_share_fast = s.balance.lowest_front_share_fast;
            if (env.car().balance_window)
              r.window = window_verdict(*env.car().balance_window, lap, circuits[t].mesh);
            // The lap's warnings its speeds tell (a table's rows left behind, a lift hold), as
            // run gives them: a row of a lap read beyond its data says so.
            for (const std::string& w : lap_speed_warnings(
                     env, lap, circuits[t].mesh, SpeedRange{s.min_speed_mps, s.top_speed_mps}))
              r.message += (r.message.empty() ? "" : "; ") + w;
          } catch (const CannotMove& e) {
            // A point that cannot lap is a result of the study, not a stop (README, "Sweep").
            r.ok = false;
            r.message = e.what();
          } catch (const SweepPointInvalid&) {
            throw;
          } catch (const InvalidInput& e) {
            throw SweepPointInvalid(point, e);
          }
        }
      }
    });
    sink.commit(rows);
    out.run += m;
    out.laps += rows.size();
    if (o.progress)
      o.progress({out.run, todo.size(), out.laps,
                  std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count()});
    if (o.stop && o.stop->load()) {
      out.stopped = out.run < todo.size();
      break;
    }
  }
  return out;
}

}  // namespace lapwing
