#include "lapwing/study/correlate.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>
#include <memory>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/study/track_quality.hpp"

namespace lapwing {

namespace {

std::string row(const char* column, std::size_t i) {
  return std::string(column) + "[" + std::to_string(i) + "]";
}

// A trace on an even grid (step h from 0), read by linear interpolation; periodic over the
// track's length for a closed track.
struct Grid {
  double h = 1.0, length = 0.0;
  // 1 / h where h is a power of two (the search's 2 m and 0.5 m): s / h is then s times it,
  // the same double (both are the exact quotient, correctly rounded), without a division.
  double inv_h = 0.0;
  bool periodic = false;
  std::vector<double> v;
  // The value at s, or nothing off an open trace.
  bool at(double s, double& out) const {
    if (periodic) {
      // fmod's remainder, worked without it where it is one subtraction or none: s - length is
      // exact for s in [length, 2 length) (Sterbenz's lemma), and it is what fmod returns there
      // (the exact remainder), as s itself is for |s| < length; most alignments read within a
      // lap of the line.
      if (s >= length && s < 2.0 * length)
        s -= length;
      else if (!(s > -length && s < length))
        s = std::fmod(s, length);
      if (s < 0.0) s += length;
    } else if (s < 0.0 || s > length) {
      return false;
    }
    const Bracket b = even_bracket(inv_h != 0.0 ? s * inv_h : s / h, v.size() - 1);
    out = lerp(v[b.i], v[b.i + 1], b.w);
    return true;
  }
};

// The simulated speed on a grid of step h over the track.
Grid sim_grid(const Mesh& mesh, const std::vector<double>& speed, double h) {
  Grid g;
  g.h = h;
  int e = 0;
  if (std::frexp(h, &e) == 0.5) g.inv_h = 1.0 / h;
  g.length = mesh.length_m;
  g.periodic = mesh.closed;
  const std::size_t n = static_cast<std::size_t>(std::ceil(mesh.length_m / h));
  g.v.resize(n + 1);
  AxisWalk walk(mesh.s_m);
  for (std::size_t j = 0; j <= n; ++j) {
    const double s = std::min(mesh.length_m, static_cast<double>(j) * h);
    g.v[j] = at(speed, walk.at(s));
  }
  // The grid's last node stands at n h >= L: on a closed lap it is the line again.
  if (g.periodic)
    g.v[n] = interpolate(mesh.s_m, speed, std::fmod(static_cast<double>(n) * h, mesh.length_m));
  return g;
}

// The log's samples on a grid of step h along its own distance, with the sums of their speeds
// and squared speeds in order (sum_all: what score adds where every sample is on the track).
struct LogSamples {
  std::vector<double> d, v;
  double sa = 0.0, saa = 0.0;
  void sum_all() {
    sa = saa = 0.0;
    for (const double a : v) {
      sa += a;
      saa += a * a;
    }
  }
};
// Nothing is sampled inside the log's gaps (log_gaps): a line drawn across one is not logged.
LogSamples log_samples(const LoggedSpeed& log, const std::vector<std::uint8_t>& gaps, double h) {
  LogSamples out;
  const double d0 = log.distance_m.front(), d1 = log.distance_m.back();
  AxisWalk walk(log.distance_m);
  for (double d = d0; d <= d1; d += h) {
    const Bracket b = walk.at(d);
    if (gaps[b.i] && b.w > 0.0 && b.w < 1.0) continue;
    out.d.push_back(d);
    out.v.push_back(at(log.speed_mps, b));
  }
  out.sum_all();
  return out;
}

// Pearson's r of the log's samples against the simulated grid at an alignment, with the share of
// samples on the track (open tracks: the rest fall off its ends).
struct Score {
  double r = -2.0, overlap = 0.0;
};
Score score(const LogSamples& l, const Grid& g, double offset, double scale) {
  double n = 0, sa = 0, sb = 0, saa = 0, sbb = 0, sab = 0;
  if (g.periodic) {
    // On a closed track every sample reads the grid: the log's own sums are those of all its
    // samples in order, the same additions as below.
    n = static_cast<double>(l.d.size());
    sa = l.sa;
    saa = l.saa;
    for (std::size_t j = 0; j < l.d.size(); ++j) {
      double b;
      g.at(scale * (l.d[j] - offset), b);
      const double a = l.v[j];
      sb += b;
      sbb += b * b;
      sab += a * b;
    }
  } else {
    for (std::size_t j = 0; j < l.d.size(); ++j) {
      double b;
      if (!g.at(scale * (l.d[j] - offset), b)) continue;
      const double a = l.v[j];
      n += 1;
      sa += a;
      sb += b;
      saa += a * a;
      sbb += b * b;
      sab += a * b;
    }
  }
  Score s;
  s.overlap = n / static_cast<double>(l.d.size());
  if (n < 3) return s;
  // r = cov(a, b) / (sd(a) sd(b)), the sums' form.
  const double cov = sab - sa * sb / n, va = saa - sa * sa / n, vb = sbb - sb * sb / n;
  s.r = va > 0 && vb > 0 ? cov / std::sqrt(va * vb) : 0.0;
  return s;
}

double median(std::vector<double> v) {
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2), v.end());
  return v[v.size() / 2];
}

// A centred moving average over `window_m` of mesh distance (for corner figures).
std::vector<double> smoothed(const std::vector<double>& v, const std::vector<std::uint8_t>& ok,
                             const Mesh& mesh, double window_m) {
  const std::size_t half =
      std::max<std::size_t>(1, static_cast<std::size_t>(std::lround(0.5 * window_m / mesh.step_m)));
  std::vector<double> out(v.size(), 0.0);
  for (std::size_t i = 0; i < v.size(); ++i) {
    if (!ok[i]) continue;
    double sum = 0.0, n = 0.0;
    for (std::size_t j = i >= half ? i - half : 0; j <= std::min(v.size() - 1, i + half); ++j)
      if (ok[j]) sum += v[j], n += 1.0;
    out[i] = sum / n;
  }
  return out;
}

// The mesh indices from `from` to `apex`; on a closed track with from > apex, round the line
// (the last point, the line again, left out: point 0 stands for it).
std::vector<std::size_t> span_to_apex(const Mesh& mesh, std::size_t from, std::size_t apex) {
  std::vector<std::size_t> out;
  if (from >= apex && mesh.closed) {
    // Round the line. A closed lap's lone corner is its own previous corner: the span is the
    // whole lap before its apex (from the point after it), not the apex alone.
    for (std::size_t i = from == apex ? apex + 1 : from; i + 1 < mesh.size(); ++i) out.push_back(i);
    from = 0;
  }
  for (std::size_t i = std::min(from, apex); i <= apex; ++i) out.push_back(i);
  return out;
}

// Where the speed peaks over `span` (indices ending at the apex), if it falls enough to the apex:
// its distance, negative (before the line) for a point reached round the line.
std::optional<double> braking_point(const std::vector<double>& v, const Mesh& mesh,
                                    const std::vector<std::size_t>& span) {
  const std::size_t apex = span.back();
  std::size_t peak = span.size() - 1;
  for (std::size_t k = 0; k < span.size(); ++k)
    if (v[span[k]] > v[span[peak]]) peak = k;
  if (v[span[peak]] - v[apex] < braking_min_drop_mps) return std::nullopt;
  const std::size_t i = span[peak];
  return i > apex ? mesh.s_m[i] - mesh.length_m : mesh.s_m[i];
}

// A row's interval in time, 2 ds / (v_a + v_b) (infinite where the car stands: no interval).
double interval_s(const LoggedSpeed& log, std::size_t i) {
  const double vsum = log.speed_mps[i] + log.speed_mps[i + 1];
  const double ds = log.distance_m[i + 1] - log.distance_m[i];
  return vsum > 0.0 ? 2.0 * ds / vsum : std::numeric_limits<double>::infinity();
}

}  // namespace

std::vector<std::string> alignment_warnings(const Alignment& a) {
  std::vector<std::string> out;
  if (a.correlation < correlate_min_trusted_correlation)
    out.push_back("the log's speed correlates with the lap's at only " + fixed(a.correlation, 2) +
                  " at its best alignment: the alignment and every comparison on it are not to "
                  "be trusted (is the log of this track, and does its speed vary?)");
  // The finest grid's half step (0.01 %) from the edge: the search stopped there.
  if (std::abs(a.scale - 1.0) > alignment_max_scale_error - 0.5e-4)
    out.push_back("the alignment's scale, " + fixed(a.scale, 4) +
                  ", is at the edge of its search (" + fixed(100.0 * alignment_max_scale_error, 0) +
                  " %): the log's distance reads that much off the track's or more, or the log "
                  "is not of this track; the alignment and every comparison on it are not to be "
                  "trusted (check the distance channel, or give --time)");
  return out;
}

double log_row_spacing_m(const LoggedSpeed& log, double scale) {
  std::vector<double> ds;
  for (std::size_t i = 0; i + 1 < log.distance_m.size(); ++i)
    if (log.distance_m[i + 1] > log.distance_m[i])
      ds.push_back(scale * (log.distance_m[i + 1] - log.distance_m[i]));
  return ds.empty() ? 0.0 : median(ds);
}

std::optional<std::string> log_spacing_warning(const LoggedSpeed& log, const Alignment& a) {
  const double spacing = log_row_spacing_m(log, a.scale);
  const Verdict v = verdict_of(spacing, std::nullopt);
  if (v == Verdict::good) return std::nullopt;
  // The log's rate (its median interval in time, over the rows that move) and the rate that
  // puts its rows quality_good_spacing_m apart at the same speeds; 10 Hz at least (the least
  // rate README, "Correlating with your data" advises).
  std::vector<double> dt;
  for (std::size_t i = 0; i + 1 < log.distance_m.size(); ++i)
    if (log.distance_m[i + 1] > log.distance_m[i] && std::isfinite(interval_s(log, i)))
      dt.push_back(interval_s(log, i));
  double need_hz = 10.0;
  if (!dt.empty() && median(dt) > 0.0)
    need_hz = std::max(need_hz, std::ceil(spacing / quality_good_spacing_m / median(dt)));
  std::string w = "the log's rows are " + fixed(spacing, 1) +
                  " m apart along the track (median): the data-quality verdict's spacing rule "
                  "reads that as " +
                  std::string(verdict_name(v)) + " (over " +
                  fixed(v == Verdict::poor ? quality_usable_spacing_m : quality_good_spacing_m, 0) +
                  " m";
  if (v == Verdict::poor)
    w += ": rows that far apart cannot draw a hairpin); the braking points, apex speeds, lap and "
         "sector times and the RMS error read from it are the sampling's artefacts as much as "
         "the car's differences";
  else
    w += "); the braking points read from it may be off by up to a row's spacing, and the apex "
         "speeds and the RMS error carry the straight line drawn between rows";
  return w + ": log at " + fixed(need_hz, 0) + " Hz or more (rows " +
         fixed(quality_good_spacing_m, 0) + " m apart or closer)";
}

std::vector<std::uint8_t> log_gaps(const LoggedSpeed& log) {
  const std::size_t m = log.distance_m.size() - 1;
  std::vector<double> dt(m);
  for (std::size_t i = 0; i < m; ++i) dt[i] = interval_s(log, i);
  const double limit = std::max(log_gap_min_s, log_gap_median_factor * median(dt));
  std::vector<std::uint8_t> gaps(m, 0);
  for (std::size_t i = 0; i < m; ++i) gaps[i] = !(dt[i] <= limit);
  return gaps;
}

namespace {

// A stretch of the log's distance [from, to] that an alignment is scored on.
struct Window {
  double from, to;
};

LogSamples within(const LogSamples& l, Window w) {
  LogSamples out;
  for (std::size_t j = 0; j < l.d.size(); ++j)
    if (l.d[j] >= w.from && l.d[j] <= w.to) {
      out.d.push_back(l.d[j]);
      out.v.push_back(l.v[j]);
    }
  out.sum_all();
  return out;
}

// What an alignment is scored on: on a closed track, the lap compared under `a` (log_on_mesh:
// from its line to the next, in the log's distance), not the log's other laps, which another
// drive of the lap (a driver's, a car's) would pull the alignment towards, and over which a
// distance read at the wrong scale drifts further than the coarse search allows; the whole log
// for an open track (it is one run), or when the lap holds too few samples to score.
struct Scored {
  LogSamples samples;
  bool one_lap = false;
  double lap_start_d = 0.0;  // the lap's line, in the log's distance (one_lap)
};
Scored scored(const LogSamples& all, const LoggedSpeed& log, const Mesh& mesh, const Alignment& a) {
  if (mesh.closed) {
    const double start = log_on_mesh(log, mesh, a).lap_start_d;
    Scored lap{within(all, {start, start + mesh.length_m / a.scale}), true, start};
    if (lap.samples.d.size() >= 3) return lap;
  }
  return {all, false, 0.0};
}

// Stage 1: offsets from lo to hi on a 2 m grid at scales 0.4 % apart: at the nearest scale the
// samples drift at most 0.2 % of their length from the track, which the correlation's peak
// survives over a lap.
// The scales in two halves, the second on a thread of its own where there is a processor for it
// (each scale a pass over every offset: 21 scales, some 6 ms each on the surveyed Brannock Park).
// Each half keeps its first best candidate in the one order, scale by scale and offset by
// offset, and the first half's wins a tie: the candidate the search in that order keeps,
// whatever the threads.
Alignment coarse_search(const LogSamples& l, const Grid& coarse, const Mesh& mesh, double lo,
                        double hi) {
  // An open track's candidates must lay most of the log on the track.
  const double min_overlap = mesh.closed ? 0.0 : 0.5;
  const int n_scales = static_cast<int>(std::lround(alignment_max_scale_error / 0.004));
  const auto scales = static_cast<std::size_t>(2 * n_scales + 1);
  std::array<Alignment, 2> part;
  const std::unique_ptr<SecondThread> second =
      usable_processors() >= 2 ? SecondThread::try_start() : nullptr;
  in_halves(scales, second.get(), [&](std::size_t first, std::size_t end) {
    Alignment best;
    best.correlation = -2.0;
    for (std::size_t i = first; i < end; ++i) {
      const double sc = 1.0 + 0.004 * (static_cast<int>(i) - n_scales);
      for (double off = lo; off < hi; off += 2.0) {
        const Score s = score(l, coarse, off, sc);
        if (s.overlap >= min_overlap && s.r > best.correlation) best = {off, sc, s.r};
      }
    }
    part[end == scales ? 1 : 0] = best;  // the second half ends the range (the first may be empty)
  });
  return part[1].correlation > part[0].correlation ? part[1] : part[0];
}

// Stages 2 and 3: offset and scale together, around `start`, on finer grids.
constexpr int alignment_rounds = 40;
Alignment refine_search(const LogSamples& l, const Grid& fine, const Mesh& mesh,
                        const Alignment& start) {
  const double min_overlap = mesh.closed ? 0.0 : 0.5;
  Alignment best = start;
  best.correlation = score(l, fine, best.offset_m, best.scale).r;
  struct Stage {
    double offset_span, offset_step, scale_span, scale_step;
  };
  // A stage whose best lies on its window's edge (in offset or in scale) is taken again around
  // it, until the best lies inside (or at the scale's bound): the peak the stage looks for lay
  // beyond the window. The coarse search's 2 m offsets need not hold the log's own start (an
  // open track's offsets run from half the track before it), and a candidate half a step off
  // in offset trades it for scale: a perfect log of a standing start on the 75 m acceleration
  // strip came out at scale 1.0034 (its best at offset 0.5 m, scale 1.008; the windows around
  // it stopped at 1.004 and 1.0034) where 1.0000 correlates better. Each round raises the
  // correlation, and at most alignment_rounds are taken.
  for (const Stage st : {Stage{4.0, 0.5, 0.004, 0.0005}, Stage{0.6, 0.05, 0.0006, 0.0001}}) {
    const int no = static_cast<int>(std::lround(st.offset_span / st.offset_step));
    const int ns = static_cast<int>(std::lround(st.scale_span / st.scale_step));
    for (int round = 0; round < alignment_rounds; ++round) {
      const Alignment centre = best;
      int best_i = 0, best_k = 0;
      for (int i = -no; i <= no; ++i)
        for (int k = -ns; k <= ns; ++k) {
          const double off = centre.offset_m + i * st.offset_step;
          const double sc = centre.scale + k * st.scale_step;
          if (std::abs(sc - 1.0) > alignment_max_scale_error + 1e-12) continue;
          const Score s = score(l, fine, off, sc);
          if (s.overlap >= min_overlap && s.r > best.correlation) {
            best = {off, sc, s.r};
            best_i = i;
            best_k = k;
          }
        }
      const bool on_edge = std::abs(best_i) == no || std::abs(best_k) == ns;
      if (!on_edge) break;
    }
  }
  return best;
}

}  // namespace

Alignment align_log(const LoggedSpeed& log, const Mesh& mesh, const std::vector<double>& speed) {
  assert(speed.size() == mesh.size() && log.distance_m.size() >= 2);
  // A unit read wrong first: it would align to nonsense. Both medians by distance (the log's
  // on a 2 m grid, as the lap's mesh points are): a log sampled in time holds more rows where it
  // is slow, and its median per row read 1.19 times below the lap's on the bundled survey lap,
  // enough to hide mph read as km/h (1.61) under the 1.45 bound.
  const std::vector<std::uint8_t> gaps = log_gaps(log);
  const LogSamples by_distance = log_samples(log, gaps, 2.0);
  const double log_median =
      by_distance.v.size() >= 2 ? median(by_distance.v) : median(log.speed_mps);
  const double sim_median = median(speed);
  if (!(log_median <= correlate_max_speed_ratio * sim_median &&
        sim_median <= correlate_max_speed_ratio * log_median)) {
    const std::size_t fastest = static_cast<std::size_t>(
        std::max_element(log.speed_mps.begin(), log.speed_mps.end()) - log.speed_mps.begin());
    throw InvalidInput(
        log.source,
        broken_rule("",
                    "the log's median speed, " + fixed(units::to_kph(log_median), 1) +
                        " km/h, is " +
                        (log_median > 0.0 ? fixed(log_median / sim_median, 2) + " times"
                                          : std::string("none of")) +
                        " the simulated lap's " + fixed(units::to_kph(sim_median), 1) +
                        " km/h: is --speed-unit right (m/s read as km/h is 3.6 times too slow, "
                        "mph read as km/h 1.6)?",
                    row("speed_mps", fastest)));
  }
  const double L = mesh.length_m;
  const double d0 = log.distance_m.front(), d1 = log.distance_m.back();
  const Grid coarse = sim_grid(mesh, speed, 2.0);
  const LogSamples& lc = by_distance;  // the log on the same 2 m grid
  // Every offset (a closed lap's offsets repeat after L; an open track's, half the track either
  // way), scored over the whole log: it finds the lap compared.
  Alignment best = mesh.closed ? coarse_search(lc, coarse, mesh, d0, d0 + L)
                               : coarse_search(lc, coarse, mesh, d0 - 0.5 * L, d0 + 0.5 * L);
  // A closed track's log that holds more than that lap is searched again on the lap alone, at
  // offsets near the first's: the whole log's peak stands off the lap's by the drift at the
  // nearest scale over the log (0.2 % of its length) and by the pull of laps driven otherwise,
  // up to 7 m in the logs of two and three laps it was tried on (of cars whose laps differ):
  // 10 m is left for it.
  if (mesh.closed) {
    const Scored lap = scored(lc, log, mesh, best);
    if (lap.one_lap && lap.samples.d.size() < lc.d.size()) {
      const double band = 0.002 * (d1 - d0) + 10.0;
      best =
          coarse_search(lap.samples, coarse, mesh, lap.lap_start_d - band, lap.lap_start_d + band);
    }
  }
  return refine_alignment(log, mesh, speed, best);
}

Alignment refine_alignment(const LoggedSpeed& log, const Mesh& mesh,
                           const std::vector<double>& speed, const Alignment& start) {
  const double L = mesh.length_m;
  const double d0 = log.distance_m.front();
  const Grid fine = sim_grid(mesh, speed, 0.5);
  const LogSamples lf = log_samples(log, log_gaps(log), 0.5);
  // Scored on the lap compared under `start`, its offset named at that lap's line (where the
  // scale's steps turn about); when the refined alignment compares another lap (two laps that
  // tied on coverage no longer do), refined again on that one.
  Alignment best = start;
  std::optional<double> last_start;
  for (int pass = 0; pass < 3; ++pass) {
    const Scored l = scored(lf, log, mesh, best);
    if (l.one_lap) {
      if (last_start && std::abs(l.lap_start_d - *last_start) < 0.5 * L / best.scale) break;
      best.offset_m = l.lap_start_d;
      last_start = l.lap_start_d;
    }
    best = refine_search(l.samples, fine, mesh, best);
    if (!l.one_lap) break;
  }
  // A closed lap's offset is named within one lap after the log's start.
  if (mesh.closed)
    best.offset_m = d0 + std::fmod(std::fmod(best.offset_m - d0, L / best.scale) + L / best.scale,
                                   L / best.scale);
  const LogOnMesh on = log_on_mesh(log, mesh, best);
  // Named at the line of the lap compared (a log that starts just after the line: the crossing
  // just before its first row).
  best.offset_m = on.lap_start_d;
  const double coverage = static_cast<double>(on.covered_points) / static_cast<double>(mesh.size());
  if (coverage < correlate_min_coverage) {
    // Named at the row after the longest gap when the log has one, else at its last row.
    std::string why = " (a whole lap, or the whole run of an open track";
    std::size_t at_row = log.distance_m.size() - 1;
    if (on.longest_gap_row) {
      double gap_m = 0.0;
      for (const auto& g : on.gaps_m) gap_m += g.second - g.first;
      at_row = *on.longest_gap_row + 1;
      why += "; " + fixed(gap_m, 0) + " m of it lie in gaps of the log, the longest " +
             fixed(on.longest_gap_s, 1) + " s without a row before this one";
    }
    // A closed lap's log as long as a lap that starts and ends mid-lap holds no lap from line
    // to line, and nothing is taken from another lap: say so.
    if (mesh.closed &&
        (log.distance_m.back() - log.distance_m.front()) * best.scale >= correlate_min_coverage * L)
      why +=
          "; the log is a lap long, but a closed lap is compared from one crossing of the "
          "line to the next: log from before one crossing to past the next";
    // An alignment the speeds do not vouch for (a log of constant speed, of another track)
    // gives a coverage that says little: say so rather than leave the crossing's advice alone
    // (a campaign's constant-speed log read "covers 73.1 %").
    if (!(best.correlation >= correlate_min_trusted_correlation))
      why += "; the log's speed follows the car's lap poorly at this alignment (r = " +
             fixed(best.correlation, 2) +
             "), so the alignment and this share are unsure: is the log of this track, and its "
             "distance or time channel right?";
    throw InvalidInput(
        log.source,
        broken_rule("",
                    "aligned to the track, the log covers " + fixed(100.0 * coverage, 1) +
                        " % of its " + fixed(L, 1) + " m; a log must cover " +
                        fixed(100.0 * correlate_min_coverage, 0) + " %" + why + ")",
                    row("distance_m", at_row)));
  }
  return best;
}

namespace {

// The log on the mesh for the lap whose line lies at the log's distance lap_start_d: d = s /
// scale + lap_start_d, covered between rows that are not a gap.
LogOnMesh log_lap(const LoggedSpeed& log, const std::vector<std::uint8_t>& gaps, const Mesh& mesh,
                  double scale, double lap_start_d) {
  const double d0 = log.distance_m.front(), d1 = log.distance_m.back();
  LogOnMesh out;
  out.speed_mps.assign(mesh.size(), 0.0);
  out.covered.assign(mesh.size(), 0);
  out.lap_start_d = lap_start_d;
  AxisWalk walk(log.distance_m);
  // A log that ends (or starts) at the line may miss it by the alignment's resolution: its finest
  // steps, 0.05 m of offset and 0.01 % of scale over the lap. Within that, the end row's speed.
  const double slack = 0.05 + 1e-4 * mesh.length_m;
  std::size_t gap_from = mesh.size();  // the first point of the gap being passed
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    const double d = mesh.s_m[i] / scale + lap_start_d;
    if (d < d0 - slack || d > d1 + slack) continue;
    const Bracket b = walk.at(std::clamp(d, d0, d1));
    if (gaps[b.i] && b.w > 0.0 && b.w < 1.0) {
      if (gap_from == mesh.size()) gap_from = i;
      const double dt = interval_s(log, b.i);
      if (!out.longest_gap_row || dt > out.longest_gap_s) {
        out.longest_gap_row = b.i;
        out.longest_gap_s = dt;
      }
      continue;
    }
    if (gap_from < mesh.size()) {
      out.gaps_m.push_back({mesh.s_m[gap_from - (gap_from > 0)], mesh.s_m[i]});
      gap_from = mesh.size();
    }
    out.speed_mps[i] = at(log.speed_mps, b);
    out.covered[i] = 1;
    ++out.covered_points;
  }
  if (gap_from < mesh.size())
    out.gaps_m.push_back({mesh.s_m[gap_from - (gap_from > 0)], mesh.s_m.back()});
  return out;
}

}  // namespace

LogOnMesh log_on_mesh(const LoggedSpeed& log, const Mesh& mesh, const Alignment& a) {
  const std::vector<std::uint8_t> gaps = log_gaps(log);
  const double d0 = log.distance_m.front(), d1 = log.distance_m.back();
  const double lap_d = mesh.length_m / a.scale;  // one lap in the log's distance
  // The laps (line to line) the log reaches: k = 0 from the crossing at the offset.
  long k_lo = 0, k_hi = 0;
  if (mesh.closed) {
    k_lo = static_cast<long>(std::floor((d0 - a.offset_m) / lap_d));
    k_hi = static_cast<long>(std::floor((d1 - a.offset_m) / lap_d));
  }
  auto lap = [&](long k) {
    return log_lap(log, gaps, mesh, a.scale, a.offset_m + static_cast<double>(k) * lap_d);
  };
  LogOnMesh best = lap(k_lo);
  const auto full = [&](const LogOnMesh& l) {
    return static_cast<double>(l.covered_points) >=
           correlate_min_coverage * static_cast<double>(mesh.size());
  };
  int full_laps = full(best);
  for (long k = k_lo + 1; k <= k_hi; ++k) {
    LogOnMesh next = lap(k);
    full_laps += full(next);
    if (next.covered_points > best.covered_points) best = std::move(next);
  }
  best.full_laps = full_laps;
  return best;
}

Correlation correlate(const Lap& lap, const Circuit& circuit, const LoggedSpeed& log) {
  return correlate(lap, circuit, log, align_log(log, circuit.mesh, lap.speed_mps));
}

Correlation correlate(const Lap& lap, const Circuit& circuit, const LoggedSpeed& log,
                      const Alignment& alignment) {
  const Mesh& mesh = circuit.mesh;
  const std::size_t n = mesh.size();
  Correlation c;
  c.alignment = alignment;
  LogOnMesh on = log_on_mesh(log, mesh, alignment);
  c.log_speed_mps = std::move(on.speed_mps);
  c.covered = std::move(on.covered);
  c.coverage = static_cast<double>(on.covered_points) / static_cast<double>(n);
  c.warnings = alignment_warnings(alignment);
  if (auto w = log_spacing_warning(log, alignment)) c.warnings.push_back(std::move(*w));
  if (!on.gaps_m.empty()) {
    std::string at;
    for (const auto& g : on.gaps_m)
      at += (at.empty() ? "" : ", ") + fixed(g.first, 0) + "-" + fixed(g.second, 0) + " m";
    c.warnings.push_back("the log has gaps (up to " + fixed(on.longest_gap_s, 1) +
                         " s without a row) over " + at +
                         " of the track: not compared or drawn there (a gap: neighbouring rows "
                         "more than " +
                         fixed(log_gap_min_s, 1) + " s and " + fixed(log_gap_median_factor, 0) +
                         " median intervals apart)");
  }
  if (on.full_laps > 1)
    c.warnings.push_back("the log holds " + std::to_string(on.full_laps) +
                         " laps (line to line); the one from the log's distance " +
                         fixed(on.lap_start_d, 1) +
                         " m is compared (the one covering most, the first on a tie)");
  const auto& vs = lap.speed_mps;
  const auto& vl = c.log_speed_mps;
  // RMS over the covered points.
  double sum2 = 0.0;
  for (std::size_t i = 0; i < n; ++i)
    if (c.covered[i]) sum2 += (vs[i] - vl[i]) * (vs[i] - vl[i]);
  c.rms_speed_error_mps =
      on.covered_points ? std::sqrt(sum2 / static_cast<double>(on.covered_points)) : 0.0;
  // Times over the intervals the log covers at both ends: the log's dt = 2 ds / (v_a + v_b)
  // (constant acceleration over the interval, as the solver's own times).
  c.time_delta_s.assign(n, 0.0);
  std::vector<double> dt_log(n, 0.0), dt_sim(n, 0.0);  // interval i -> i + 1
  for (std::size_t i = 0; i + 1 < n; ++i) {
    if (!c.covered[i] || !c.covered[i + 1]) continue;
    const double vsum = vl[i] + vl[i + 1];
    if (!(vsum > 0.0))
      throw InvalidInput(log.source,
                         broken_rule("", "the logged speed is 0 at both ends of " +
                                             fixed(mesh.s_m[i + 1] - mesh.s_m[i], 2) +
                                             " m of track: the log's distance and speed disagree"));
    dt_log[i] = 2.0 * (mesh.s_m[i + 1] - mesh.s_m[i]) / vsum;
    dt_sim[i] = lap.time_s[i + 1] - lap.time_s[i];
    c.lap_time_log_s += dt_log[i];
    c.covered_length_m += mesh.s_m[i + 1] - mesh.s_m[i];
    c.lap_time_sim_s += dt_sim[i];
  }
  for (std::size_t i = 1; i < n; ++i)
    c.time_delta_s[i] = c.time_delta_s[i - 1] + dt_sim[i - 1] - dt_log[i - 1];
  // Sectors: an interval across a sector's boundary shared by the length on either side (time
  // linear in distance within it, as run's sector times read the lap's time at the boundary).
  const auto& starts = circuit.track.sectors_m;
  for (std::size_t k = 0; k < starts.size(); ++k) {
    SectorError s{starts[k], k + 1 < starts.size() ? starts[k + 1] : mesh.length_m, 0, 0, 0};
    for (std::size_t i = 0; i + 1 < n; ++i) {
      const double a = std::max(s.start_m, mesh.s_m[i]), b = std::min(s.end_m, mesh.s_m[i + 1]);
      if (!(b > a) || !c.covered[i] || !c.covered[i + 1]) continue;
      const double share = (b - a) / (mesh.s_m[i + 1] - mesh.s_m[i]);
      s.sim_s += share * dt_sim[i];
      s.log_s += share * dt_log[i];
      s.covered_m += b - a;
    }
    s.error_s = s.sim_s - s.log_s;
    c.sectors.push_back(s);
  }
  // Corners: entry, apex, exit as the lap summary takes them (summarize), on the logged speed
  // smoothed over corner_smoothing_m.
  const std::vector<double> vls = smoothed(vl, c.covered, mesh, corner_smoothing_m);
  // A closed track's first corner may be braked for before the line: there the log's rows
  // before the lap's line (the approach driven, the lap before's end), not the lap's own end.
  LogOnMesh before;
  std::vector<double> vls_before;
  if (mesh.closed) {
    before = log_lap(log, log_gaps(log), mesh, alignment.scale,
                     on.lap_start_d - mesh.length_m / alignment.scale);
    vls_before = smoothed(before.speed_mps, before.covered, mesh, corner_smoothing_m);
  }
  // Braking points on both traces smoothed alike: a moving average moves a peak whose two sides
  // differ in slope (drive gentler than braking), and so moves both peaks the same way.
  const std::vector<std::uint8_t> all_points(n, 1);
  const std::vector<double> vss = smoothed(vs, all_points, mesh, corner_smoothing_m);
  // Each corner's apexes first: on a closed track the first corner's braking point is sought
  // from the last corner's apex, round the line.
  const std::size_t nc = circuit.corners.size();
  std::vector<std::size_t> sim_apex(nc), log_apex(nc);
  std::vector<std::uint8_t> corner_covered(nc, 1);
  for (std::size_t k = 0; k < nc; ++k) {
    const CornerSpan& span = circuit.corners[k];
    std::size_t sa = span.start, la = span.start;
    for (std::size_t i = span.start; i <= span.end; ++i) {
      corner_covered[k] = corner_covered[k] && c.covered[i];
      if (vs[i] < vs[sa]) sa = i;
      if (vls[i] < vls[la]) la = i;
    }
    sim_apex[k] = sa;
    log_apex[k] = la;
  }
  for (std::size_t k = 0; k < nc; ++k) {
    if (!corner_covered[k]) continue;
    const CornerSpan& span = circuit.corners[k];
    const std::size_t sa = sim_apex[k], la = log_apex[k];
    // From the previous corner's apex; the first corner of an open track from the start.
    const std::size_t prev = k > 0 ? k - 1 : nc - 1;
    const bool from_start = k == 0 && !mesh.closed;
    const std::vector<std::size_t> sim_span =
        span_to_apex(mesh, from_start ? 0 : sim_apex[prev], sa);
    const std::vector<std::size_t> log_span =
        span_to_apex(mesh, from_start ? 0 : log_apex[prev], la);
    CornerError e{span.id,     mesh.s_m[sa],  vs[span.start],
                  vs[sa],      vs[span.end],  vls[span.start],
                  vls[la],     vls[span.end], braking_point(vss, mesh, sim_span),
                  std::nullopt};
    // Indices past the apex are round the line, before it: read from the rows before the line.
    // The log's search runs back from its apex while the log covers the track; the whole span
    // must be covered, except before the line (a log that starts there, or at the line), where
    // the peak must lie after the first covered point (before it the speed may have been higher).
    std::vector<double> v_log = vls;
    std::vector<std::size_t> logged_span;
    bool whole = true;
    for (std::size_t p = log_span.size(); p-- > 0;) {
      const std::size_t i = log_span[p];
      const bool pre = i > la;
      if (!(pre ? before.covered[i] : c.covered[i])) {
        whole = false;
        break;
      }
      if (pre) v_log[i] = vls_before[i];
      logged_span.insert(logged_span.begin(), i);
    }
    const bool partial_before_line =
        !whole && logged_span.size() > 1 && (logged_span.front() > la || logged_span.front() == 0);
    if (whole || partial_before_line) {
      e.log_braking_m = braking_point(v_log, mesh, logged_span);
      const std::size_t first = logged_span.front();
      if (!whole && e.log_braking_m == mesh.s_m[first] - (first > la ? mesh.length_m : 0.0))
        e.log_braking_m.reset();
    }
    c.corners.push_back(e);
  }
  // The largest errors, each at least correlate_peak_separation_m from the ones before.
  std::vector<std::uint8_t> taken(n, 0);
  for (std::size_t p = 0; p < correlate_peaks; ++p) {
    std::size_t at_i = n;
    for (std::size_t i = 0; i < n; ++i)
      if (c.covered[i] && !taken[i] &&
          (at_i == n || std::abs(vs[i] - vl[i]) > std::abs(vs[at_i] - vl[at_i])))
        at_i = i;
    if (at_i == n) break;
    ErrorPeak e{mesh.s_m[at_i], vs[at_i] - vl[at_i], 0, 0};
    for (const CornerSpan& span : circuit.corners) {
      if (at_i >= span.start && at_i <= span.end) e.corner = span.id;
      if (!e.corner && !e.next_corner && span.start > at_i) e.next_corner = span.id;
    }
    c.peaks.push_back(e);
    for (std::size_t i = 0; i < n; ++i) {
      double d = std::abs(mesh.s_m[i] - e.at_m);
      if (mesh.closed) d = std::min(d, mesh.length_m - d);
      if (d < correlate_peak_separation_m) taken[i] = 1;
    }
  }
  return c;
}

}  // namespace lapwing
