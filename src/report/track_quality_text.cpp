#include "lapwing/report/track_quality_text.hpp"

#include <algorithm>
#include <cmath>

#include "lapwing/base/format.hpp"

namespace lapwing {

namespace {
std::string thresholds() {
  return "good: spacing <= " + fixed(quality_good_spacing_m, 0) +
         " m and spread <= " + fixed(100 * quality_good_spread, 0) + " %; poor: spacing > " +
         fixed(quality_usable_spacing_m, 0) + " m or spread > " +
         fixed(100 * quality_usable_spread, 0) + " %";
}

const char* source_name(const TrackQuality& q) {
  if (q.segments) return "segments";
  switch (q.source) {
    case PathProfile::Source::centerline:
      return "centerline";
    case PathProfile::Source::curvature:
      return "curvature profile";
    case PathProfile::Source::line:
      return "racing line";
  }
  return "centerline";
}

std::string findings(const TrackQuality& q) {
  if (q.segments) return "segments (exact geometry)";
  std::string o = source_name(q);
  if (q.spacing_m)
    o += std::string(q.source_spacing                             ? ", from data rows "
                     : q.source == PathProfile::Source::curvature ? ", rows "
                                                                  : ", points ") +
         fixed(*q.spacing_m, 1) + " m apart";
  if (q.noise_m)
    o += ", noise " + fixed(1000 * *q.noise_m, 0) + " mm rms" +
         (q.noise_estimated ? " (GCV estimate)" : " (fit residual)");
  if (q.source == PathProfile::Source::curvature) return o + ", taken as given";
  if (q.spread)
    o += ", lap " + fixed(100 * *q.spread, 2) + " % apart between half and double smoothing";
  else
    o += ", lap spread between half and double smoothing unknown (see the notes)";
  if (q.source_verdict)
    o += ", made from data whose verdict is " + std::string(verdict_name(*q.source_verdict)) +
         " (source_verdict: this track reads no better)";
  return o;
}
}  // namespace

std::string quality_line(const TrackQuality& q) {
  return "track data: " + findings(q) + ": " + std::string(verdict_name(q.verdict)) +
         (q.segments ? std::string() : " (" + thresholds() + ")");
}

std::string quality_warning(const TrackQuality& q) {
  return "track data " + std::string(verdict_name(q.verdict)) + ": " + findings(q) + " (" +
         thresholds() + ")";
}

std::string smoothing_text(const PathProfile& p) {
  std::string o = fixed(p.smoothing_m, 1) + " m";
  if (!p.smoothing.automatic) return o + " (given)";
  const std::string at = fixed(p.smoothing.chosen_at_spacing_m, 2) + " m apart";
  if (p.smoothing.at_lower_bound)
    return o + " (auto: the shortest length searched, 2 point spacings: the points, " + at +
           ", show no noise GCV can tell from the path)";
  if (p.smoothing.at_upper_bound)
    return o + " (auto: the longest length searched: the points, " + at +
           ", look like noise at every length searched)";
  return o + " (auto: GCV's minimum on the points, " + at + ")";
}

std::string line_text(const Track& t) {
  if (!t.line_path || !t.line) return "";
  Track described = t;
  described.line_path.reset();
  double largest = 0.0;
  for (double a : t.line_path->offset_m) largest = std::max(largest, std::abs(a));
  return "line: min-curvature, vehicle " + fixed(t.line->vehicle_width_m, 2) + " m wide, margin " +
         fixed(t.line->margin_m, 2) + " m: " + fixed(t.line_path->s_m.back(), 1) +
         " m long (the centerline " + fixed(described.length_m(), 1) + " m), largest offset " +
         fixed(largest, 2) + " m, " + std::to_string(t.line_path->line_iterations) +
         " linearisations";
}

void write_track_quality(JsonWriter& w, const TrackQuality& q) {
  auto optional = [&](std::string_view key, const std::optional<double>& v) {
    w.key(key);
    if (v)
      w.value(*v);
    else
      w.null();
  };
  w.key("track_quality").begin_object().field("source", source_name(q));
  w.field("verdict", std::string(verdict_name(q.verdict)));
  optional("point_spacing_m", q.spacing_m);
  optional("noise_m", q.noise_m);
  if (q.segments) {
    w.key("smoothing_m").null().key("smoothing_auto").null();
  } else {
    w.field("smoothing_m", q.smoothing_m).field("smoothing_auto", q.smoothing_auto);
  }
  optional("lap_half_smoothing_s", q.lap_half_s);
  optional("lap_double_smoothing_s", q.lap_double_s);
  optional("spread", q.spread);
  w.key("source_verdict");
  if (q.source_verdict)
    w.value(std::string(verdict_name(*q.source_verdict)));
  else
    w.null();
  w.key("notes").begin_array();
  for (const auto& n : q.notes) w.value(n);
  w.end_array().end_object();
}

}  // namespace lapwing
