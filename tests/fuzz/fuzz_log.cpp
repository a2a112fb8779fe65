// Fuzz target: the log importer (io/log_file.hpp, `track from-log`). The columns are those of a
// lapwing trace (distance_m, time_s, speed_kph, lat_accel_g); the last byte picks the options
// (open or closed, distance or time). What it writes must load and lay out again (issue 19,
// finding 12): a track file it produces that the track loader refuses is a finding. The same
// bytes go through correlate's and fit's speed-log reader (read_speed_log): a log it accepts
// must keep its promises (a finite, strictly increasing distance, speeds from 0 to 900 km/h).
#include <cmath>
#include <fstream>

#include "fuzz_support.hpp"
#include "lapwing/io/log_file.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/path/log_curvature.hpp"
#include "lapwing/study/circuit.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace lapwing;
  const std::uint8_t pick = size > 0 ? data[size - 1] : 0;
  LogOptions o;
  o.log = fuzz::as_file(data, size > 0 ? size - 1 : 0, "log.csv");
  o.speed = "speed_kph";
  o.lat_accel = "lat_accel_g";
  (pick & 2 ? o.time : o.distance) = pick & 2 ? "time_s" : "distance_m";
  o.closed = pick & 1;
  {
    SpeedLogOptions so;
    so.log = o.log;
    so.speed = o.speed;
    so.distance = o.distance;
    so.time = o.time;
    std::optional<SpeedLogFile> f;
    fuzz::input_errors_only([&] { f = read_speed_log(so); });
    if (f) {
      const auto& d = f->speed.distance_m;
      const auto& v = f->speed.speed_mps;
      if (d.size() != v.size() || d.size() < log_min_samples)
        fuzz::finding("read_speed_log: sizes");
      for (std::size_t i = 0; i < d.size(); ++i) {
        if (i && !(d[i] > d[i - 1])) fuzz::finding("read_speed_log: distance not increasing");
        if (!std::isfinite(d[i])) fuzz::finding("read_speed_log: a distance not finite");
        if (!(v[i] >= 0.0 && v[i] <= log_max_row_speed_mps))
          fuzz::finding("read_speed_log: a speed out of range");
      }
    }
  }
  std::optional<LogTrack> t;
  fuzz::input_errors_only([&] { t = track_from_log(o, "lap.csv"); });
  if (!t) return 0;
  {
    std::ofstream(fuzz::scratch("lap.csv"), std::ios::binary) << t->csv;
    std::ofstream(fuzz::scratch("lap.yaml"), std::ios::binary) << t->yaml;
  }
  try {
    const Track track = load_track(fuzz::scratch("lap.yaml"));
    lay_out(track, make_air(track.air));
  } catch (const std::exception& e) {
    fuzz::finding(std::string("track from-log wrote a track that does not load: ") + e.what());
  }
  return 0;
}
