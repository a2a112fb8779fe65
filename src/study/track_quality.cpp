#include "lapwing/study/track_quality.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <memory>
#include <string>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/racing_line.hpp"

namespace lapwing {

std::string_view verdict_name(Verdict v) {
  switch (v) {
    case Verdict::good:
      return "good";
    case Verdict::usable:
      return "usable";
    case Verdict::poor:
      return "poor";
  }
  return "poor";
}

Verdict verdict_of(std::optional<double> spacing, std::optional<double> spread) {
  const double a = spacing.value_or(0.0), b = spread.value_or(0.0);
  if (a > quality_usable_spacing_m || b > quality_usable_spread) return Verdict::poor;
  if (a > quality_good_spacing_m || b > quality_good_spread) return Verdict::usable;
  return Verdict::good;
}

std::optional<Verdict> verdict_named(std::string_view name) {
  for (Verdict v : {Verdict::good, Verdict::usable, Verdict::poor})
    if (verdict_name(v) == name) return v;
  return std::nullopt;
}

namespace {

// Third differences for a centerline's x and y: half lambda is the length x 2^(-1/6).
constexpr int centerline_order = 3;

const PathProfile* data_profile(const Track& t) {
  return t.profile ? &*t.profile : nullptr;
}

}  // namespace

SmoothingVariants smoothing_variants(const Circuit& c) {
  SmoothingVariants v;
  const PathProfile* p = data_profile(c.track);
  if (!p || p->source != PathProfile::Source::centerline || !p->points) return v;
  const double factor = std::pow(2.0, 1.0 / (2 * centerline_order));
  v.half_length_m = p->smoothing_m / factor;
  v.double_length_m = p->smoothing_m * factor;
  // Each variant with the notes it leaves; the two are independent (a refit and a layout of
  // their own), so they are made side by side where there are two processors, and their
  // notes kept in the same order either way.
  std::array<std::vector<std::string>, 2> notes;
  auto variant = [&](double f, const char* name,
                     std::vector<std::string>& said) -> std::optional<Circuit> {
    try {
      Track t = c.track;
      t.profile = refit_centerline(*p, t.closed, f);
      if (t.line) lay_racing_line(t);
      return lay_out(t, c.air, MeshPositions::left_out);  // its lap time alone is read
    } catch (const InvalidInput& e) {
      said.push_back(std::string("the centerline at ") + name + " strength (" +
                     fixed(p->smoothing_m * f, 1) + " m) cannot be laid out: " + e.message());
    }
    return std::nullopt;
  };
  const std::unique_ptr<SecondThread> second =
      usable_processors() >= 2 ? SecondThread::try_start() : nullptr;
  in_halves(2, second.get(), [&](std::size_t which, std::size_t) {
    if (which == 0)
      v.half = variant(1.0 / factor, "half", notes[0]);
    else
      v.twice = variant(factor, "double", notes[1]);
  });
  for (const auto& said : notes) v.notes.insert(v.notes.end(), said.begin(), said.end());
  return v;
}

TrackQuality assess_track_data(const Circuit& c) {
  TrackQuality q;
  q.track_id = c.track.id;
  q.track_name = c.track.name;
  const PathProfile* p = data_profile(c.track);
  if (!p) {
    q.segments = true;
    q.verdict = Verdict::good;
    return q;
  }
  q.source = p->source;
  q.smoothing_m = p->smoothing_m;
  q.smoothing_auto = p->smoothing.automatic;
  if (p->source == PathProfile::Source::centerline) {
    q.spacing_m = p->point_spacing_m;
    q.noise_estimated = p->smoothing.automatic;
    q.noise_m = p->smoothing.automatic ? p->smoothing.noise_rms : p->fit_residual_rms_m;
  } else {
    // A curvature profile's rows, as given; or, when it was resampled from data further
    // apart (a log's rows: `track from-log`), that data's spacing, which is what it can draw.
    q.source_spacing = p->source_spacing_m > 0.0;
    std::vector<double> gaps;
    for (std::size_t i = 1; i < p->s_m.size(); ++i) gaps.push_back(p->s_m[i] - p->s_m[i - 1]);
    std::nth_element(gaps.begin(), gaps.begin() + static_cast<std::ptrdiff_t>(gaps.size() / 2),
                     gaps.end());
    q.spacing_m = q.source_spacing ? p->source_spacing_m : gaps[gaps.size() / 2];
  }
  q.verdict = verdict_of(q.spacing_m, std::nullopt);
  // Made from other data: no better than that data's verdict.
  q.source_verdict = verdict_named(p->source_verdict);
  if (q.source_verdict) q.verdict = std::max(q.verdict, *q.source_verdict);
  return q;
}

TrackQuality assess_track(const Circuit& c, const SmoothingVariants& v, const ConfiguredCar& car,
                          const std::string& config, double lap_s) {
  TrackQuality q = assess_track_data(c);
  q.config = config;
  q.lap_s = lap_s;
  if (q.segments) return q;
  q.notes = v.notes;
  auto lap_of = [&](const std::optional<Circuit>& variant, const char* name,
                    double length) -> std::optional<double> {
    if (!variant) return std::nullopt;
    try {
      LapSolver solver;  // the lap time alone: no channel is read here
      return lap_time(car, *variant, solver);
    } catch (const InvalidInput& e) {
      q.notes.push_back(std::string("the centerline at ") + name + " strength (" +
                        fixed(length, 1) + " m) cannot be solved with config " + config + ": " +
                        e.message());
    } catch (const CannotMove& e) {
      q.notes.push_back(std::string("the centerline at ") + name + " strength (" +
                        fixed(length, 1) + " m) cannot be solved with config " + config +
                        ": the car cannot complete it: " + e.what());
    }
    return std::nullopt;
  };
  q.lap_half_s = lap_of(v.half, "half", v.half_length_m);
  q.lap_double_s = lap_of(v.twice, "double", v.double_length_m);
  if (q.lap_half_s && q.lap_double_s) q.spread = std::abs(*q.lap_half_s - *q.lap_double_s) / lap_s;
  q.verdict = verdict_of(q.spacing_m, q.spread);
  if (q.source_verdict) q.verdict = std::max(q.verdict, *q.source_verdict);
  return q;
}

Verdict worst(const std::vector<TrackQuality>& qualities) {
  Verdict w = Verdict::good;
  for (const auto& q : qualities) w = std::max(w, q.verdict);
  return w;
}

}  // namespace lapwing
