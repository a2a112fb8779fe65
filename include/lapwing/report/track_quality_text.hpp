// A track's data-quality verdict and its smoothing as words: one line for the terminal (check,
// run) and the report, the warning a poor verdict makes, and summary.json's track_quality.
#pragma once

#include <string>

#include "lapwing/io/json.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/study/track_quality.hpp"

namespace lapwing {

/// "track data: centerline, points 2.0 m apart, noise 52 mm rms (GCV estimate), lap 0.33 %
/// apart between half and double smoothing: good (good: spacing <= 5 m and spread <= 1 %;
/// poor: spacing > 10 m or spread > 2 %)".
std::string quality_line(const TrackQuality& q);

/// The warning of a poor verdict (run's warnings): "track data poor: ...".
std::string quality_warning(const TrackQuality& q);

/// A fit's smoothing and why: "20.4 m (auto: GCV's minimum on the points, 2.0 m apart)" or
/// "20.0 m (given)".
std::string smoothing_text(const PathProfile& p);

/// A track's racing line in words: "line: min-curvature, vehicle 2.0 m wide, margin 0.5 m:
/// 2712.3 m long (the path 2747.6 m), largest offset 4.50 m, 7 linearisations".
std::string line_text(const Track& t);

/// summary.json's "track_quality" object (null where a figure does not apply).
void write_track_quality(JsonWriter& w, const TrackQuality& q);

}  // namespace lapwing
