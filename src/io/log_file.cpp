#include "lapwing/io/log_file.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <sstream>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/text.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/io/line_track.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/log_curvature.hpp"
#include "lapwing/path/logged_speed.hpp"

namespace lapwing {

namespace {

// SI per unit of a log channel, or nothing for a unit not accepted.
std::optional<double> speed_scale(const std::string& unit) {
  if (unit == "km/h" || unit == "kph") return units::kph;
  if (unit == "m/s") return 1.0;
  if (unit == "mph") return 1609.344 / 3600.0;
  return std::nullopt;
}
std::optional<double> accel_scale(const std::string& unit) {
  if (unit == "g") return units::g0;
  if (unit == "m/s2") return 1.0;
  return std::nullopt;
}
std::optional<double> yaw_scale(const std::string& unit) {
  if (unit == "deg/s") return units::deg;
  if (unit == "rad/s") return 1.0;
  return std::nullopt;
}

// The curvature profile a log becomes (the columns a curvature file has).
struct ProfileRow {
  double s_m, curvature_1pm;
};
constexpr CsvColumn<ProfileRow> profile_columns[] = {
    {"distance_m", [](std::string& o, const ProfileRow& r) { csv_number(o, r.s_m); }},
    {"curvature_1pm", [](std::string& o, const ProfileRow& r) { csv_number(o, r.curvature_1pm); }},
};

// A log that begins (or ends) with the car standing still (a standing start, a log begun in the
// pit box): the rows before the car first moves are left out but the last of them (the start,
// at rest), and likewise after it last stops, with a note naming them. At rest between two rows:
// the distance does not move (given), or the speed is 0 at both (time: the distance integrated
// from the speed does not move). A log in which the car never moves is left whole (its own
// errors follow). The table keeps its rows' file lines, so later errors still name the file's.
void drop_standstill(CsvTable& t, const std::string& speed, const std::string& distance,
                     const std::string& time, std::vector<std::string>& notes) {
  if (t.find(speed) < 0 || t.find(distance.empty() ? time : distance) < 0) return;  // named later
  const std::vector<double>& v = t.column(speed);
  const std::vector<double>* d = distance.empty() ? nullptr : &t.column(distance);
  const std::size_t n = t.rows();
  auto at_rest = [&](std::size_t i) {  // between rows i and i + 1
    return d ? (*d)[i + 1] == (*d)[i] : v[i] == 0.0 && v[i + 1] == 0.0;
  };
  std::size_t first = 0, last = n - 1;
  while (first + 1 < n && at_rest(first)) ++first;
  if (first + 1 >= n) return;  // never moves
  while (last > first && at_rest(last - 1)) --last;
  if (first == 0 && last == n - 1) return;
  auto lines = [&](std::size_t a, std::size_t b) {
    return a == b ? "line " + std::to_string(t.lines[a])
                  : "lines " + std::to_string(t.lines[a]) + " to " + std::to_string(t.lines[b]);
  };
  if (first > 0)
    notes.push_back("the car stands still before it moves: " + lines(0, first - 1) +
                    " left out (the log starts at line " + std::to_string(t.lines[first]) +
                    ", the last row at rest)");
  if (last < n - 1)
    notes.push_back("the car stands still after it stops: " + lines(last + 1, n - 1) +
                    " left out (the log ends at line " + std::to_string(t.lines[last]) +
                    ", the first row at rest)");
  const auto keep = [&](auto& rows) {
    rows.erase(rows.begin() + static_cast<std::ptrdiff_t>(last + 1), rows.end());
    rows.erase(rows.begin(), rows.begin() + static_cast<std::ptrdiff_t>(first));
  };
  for (auto& c : t.columns) keep(c);
  keep(t.lines);
  if (t.rows() < log_min_samples)
    throw InputError(t.file, Mark{t.lines.back(), 1},
                     "only " + std::to_string(t.rows()) +
                         " rows where the car moves (those where it stands still left out); at "
                         "least " +
                         std::to_string(log_min_samples) + " are needed");
}

}  // namespace

std::optional<Violation> LogOptions::validate() const {
  const bool by_yaw = !yaw_rate.empty();
  auto unit = [](const char* what, const std::string& u) {
    return std::string("unknown ") + what + " unit '" + u + "'";
  };
  return FirstViolation()
      .rule(!speed.empty(), "speed", "give the speed column")
      .rule(distance.empty() != time.empty(), "distance",
            "give one of the distance and time columns")
      .rule(lat_accel.empty() == by_yaw, "lat_accel",
            "give one of the lateral acceleration and yaw rate columns")
      // The unit of each channel used (an option for a channel not used is not read).
      .rule(speed_scale(speed_unit).has_value(), "speed_unit",
            [&] { return unit("speed", speed_unit); })
      .rule(by_yaw || accel_scale(accel_unit).has_value(), "accel_unit",
            [&] { return unit("accel", accel_unit); })
      .rule(!by_yaw || yaw_scale(yaw_unit).has_value(), "yaw_unit",
            [&] { return unit("yaw", yaw_unit); })
      .rule(!smoothing_m || smoothing_range.contains(*smoothing_m), "smoothing",
            [&] {
              return out_of_range("smoothing", *smoothing_m, smoothing_range, Quantity::length)
                  .message();
            })
      .range("min_speed", min_speed_mps, positive(), Quantity::speed)
      .part("air", [&] { return air.validate(); })
      .result();
}

LogTrack track_from_log(const LogOptions& o, const std::string& csv_name) {
  CsvTable t = read_csv(o.log, 10);
  // Bad options are this log's error, as a whole (they name no row).
  if (const auto v = o.validate()) throw InputError(o.log, Mark{}, v->message());
  std::vector<std::string> notes;
  drop_standstill(t, o.speed, o.distance, o.time, notes);
  auto kph_text = [](double mps) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1f", mps / units::kph);
    return std::string(buf);
  };
  LogChannels log;
  log.source = o.log;
  const double vs = *speed_scale(o.speed_unit);
  const auto& vcol = t.column(o.speed);
  log.speed_mps.resize(vcol.size());
  for (std::size_t i = 0; i < vcol.size(); ++i) {
    log.speed_mps[i] = vcol[i] * vs;
    // As fit and correlate read a log (read_speed_log): no speed below 0 (a campaign's -5 km/h
    // row made a track without a word, its curvature a / v^2 read as if it were +5).
    if ((i > 0 || o.closed) && log.speed_mps[i] < 0.0) {
      char buf[64];
      std::snprintf(buf, sizeof buf, "%.6g", vcol[i]);
      throw InputError(o.log, t.at(i, o.speed),
                       std::string("speed ") + buf + " " + o.speed_unit +
                           " is negative: a logged speed is at least 0");
    }
  }
  const double v0 = log.speed_mps[0];
  if (!o.closed && v0 < 0.0)
    throw InputError(o.log, t.at(0, o.speed),
                     "the first logged speed is negative (" + kph_text(v0) +
                         " km/h): an open log's first speed becomes the track's start_speed");
  if (!o.closed && v0 > log_max_start_speed_mps)
    throw InputError(o.log, t.at(0, o.speed),
                     "the first logged speed, " + kph_text(v0) + " km/h read with --speed-unit " +
                         o.speed_unit +
                         ", is more than a track's start_speed may be (540 km/h); is the speed "
                         "in another unit?");
  // Distance: given, or integrated from time (the path's).
  if (!o.distance.empty()) {
    require_increasing(t, o.distance);
    log.distance_m = t.column(o.distance);
  } else {
    require_increasing(t, o.time);
    log.time_s = t.column(o.time);
  }
  const bool by_yaw = !o.yaw_rate.empty();
  {
    const double scale = by_yaw ? *yaw_scale(o.yaw_unit) : *accel_scale(o.accel_unit);
    const auto& c = t.column(by_yaw ? o.yaw_rate : o.lat_accel);
    std::vector<double>& channel = by_yaw ? log.yaw_rate_radps : log.lat_accel_mps2;
    channel.resize(c.size());
    for (std::size_t i = 0; i < c.size(); ++i) channel[i] = c[i] * scale;
  }
  // A row of the lateral acceleration that jumps from its neighbours by more than
  // log_spike_mps2 (their median: the two rows each side) is a spike in the channel, not the
  // car: no car's lateral acceleration changes by 2 g from one row to the next and back. The
  // largest, for the warning below and for the 8 g error, whose cause it then is rather than a
  // unit (a helper's finding: one row of 45 g was refused with "give --accel-unit m/s2", wrong
  // for the other 670 rows; one of 7.5 g bent the track with no word of it).
  struct Spike {
    std::size_t row = 0, count = 0;
    double jump = 0.0, neighbours = 0.0;
  } spike;
  if (!by_yaw) {
    const std::vector<double>& a = log.lat_accel_mps2;
    for (std::size_t i = 2; i + 2 < a.size(); ++i) {
      std::array<double, 4> n{a[i - 2], a[i - 1], a[i + 1], a[i + 2]};
      std::sort(n.begin(), n.end());
      const double median = 0.5 * (n[1] + n[2]);
      const double jump = std::abs(a[i] - median);
      if (!(jump > log_spike_mps2)) continue;
      ++spike.count;
      if (jump > spike.jump) spike = {i, spike.count, jump, median};
    }
  }
  const auto spike_text = [&] {
    const double g = units::g0;
    return "line " + std::to_string(t.lines[spike.row]) + " reads " +
           fixed(log.lat_accel_mps2[spike.row] / g, 2) + " g where the rows about it read " +
           fixed(spike.neighbours / g, 2) + " g (their median)" +
           (spike.count > 1 ? ", and " + std::to_string(spike.count - 1) + " more row" +
                                  (spike.count > 2 ? "s" : "") + " jump so"
                            : std::string()) +
           ": a spike in the lateral acceleration, not the car (no car's changes by " +
           fixed(log_spike_mps2 / g, 0) + " g from one row to the next and back)";
  };
  LogCurvatureOptions co;
  co.closed = o.closed;
  co.smoothing_m = o.smoothing_m;
  co.min_speed_mps = o.min_speed_mps;
  LogCurvature lc;
  try {
    lc = log_curvature(log, co);
  } catch (const InvalidInput& e) {
    if (e.subject() != o.log) throw;
    throw row_error(t, e);
  }
  // What a unit read wrong does: a_y in m/s2 read as g is 9.81 times too large (and in g read
  // as m/s2 9.81 times too small); a yaw rate in deg/s read as rad/s is 57.3 times too large;
  // a speed in km/h read as m/s makes a_y / v^2 3.6^2 times too small.
  // The hint names the mistake that scales curvature the way seen: a number in the smaller
  // unit read as the larger one is too large (m/s2 read as g, deg/s read as rad/s).
  auto unit_hint = [&](bool too_large) {
    const std::string what = by_yaw ? "a yaw rate" : "a lateral acceleration";
    const std::string option = by_yaw ? "--yaw-unit" : "--accel-unit";
    const std::string now = by_yaw ? o.yaw_unit : o.accel_unit;
    const std::string larger = by_yaw ? "rad/s" : "g", smaller = by_yaw ? "deg/s" : "m/s2";
    const std::string factor = by_yaw ? "57.3" : "9.81";
    std::string hint = "check " + option + " (" + now + " now)";
    if (too_large && now == larger)
      hint = what + " in " + smaller + " read as " + larger + " is " + factor +
             " times too large: if the log is in " + smaller + ", give " + option + " " + smaller;
    if (!too_large && now == smaller)
      hint = what + " in " + larger + " read as " + smaller + " is " + factor +
             " times too small: if the log is in " + larger + ", give " + option + " " + larger;
    return hint + "; else check --speed-unit (" + o.speed_unit + " now) and the columns given";
  };
  // The turns a lap adds up to say which: a unit read wrong scales them all, so a lap of one
  // turn reads about 9.81 (57.3 for a yaw rate) times one turn, or that part of one; near a
  // whole number the units are right and the gap is the log's own (within a factor of 1.5 of
  // each: 3.6^2 = 13 turns, a speed in km/h read as m/s with a yaw rate, is none of them).
  // A gap in the rows much wider than their median spacing (a dropout): what it does to the
  // lap is named at the row after it.
  auto has_gap = [&] { return is_dropout(lc.largest_gap_m, lc.row_spacing_m); };
  auto closure_hint = [&](double turns) {
    const double factor = by_yaw ? 57.3 : 9.81;
    const auto about = [](double x, double target) { return x > target / 1.5 && x < target * 1.5; };
    if (about(turns, factor)) return unit_hint(true);
    if (about(turns, 1.0 / factor)) return unit_hint(false);
    // Units right, the rows too few to draw the lap: a dropout, or a log too sparse throughout.
    if (has_gap())
      return "the log has a gap here: rows " + fixed(lc.largest_gap_m, 1) +
             " m apart where the median is " + fixed(lc.row_spacing_m, 2) +
             " m (a dropout); the curvature across it is a straight guess, so the lap cannot "
             "close: give a log without the gap";
    if (lc.row_spacing_m > log_sparse_spacing_m)
      return "the log's rows are " + fixed(lc.row_spacing_m, 1) +
             " m apart (median): too sparse to draw the corners, so the lap cannot close: log "
             "at 10 Hz or more";
    if (turns >= 0.5 && std::abs(turns - std::round(turns)) < 0.1)
      return std::string(
          "the turns are close to a whole number, so the units look right: the log may not start "
          "and end at the same place (a lap cut before or after the line), or its distance may "
          "read long or short; give a log from line to line, or leave out --closed for an open "
          "track");
    return by_yaw ? "check --yaw-unit (" + o.yaw_unit + " now), --speed-unit (" + o.speed_unit +
                        " now) and the columns given"
                  : "check --accel-unit (" + o.accel_unit + " now), --speed-unit (" + o.speed_unit +
                        " now) and the columns given";
  };
  // No car corners at more than 8 g: curvature x speed^2 beyond that is a unit read wrong (on
  // the filtered curvature, so that one spiky sample cannot refuse a log).
  if (lc.peak_lateral_g > log_max_lateral_g) {
    std::ostringstream os;
    os.precision(3);
    os << "the log implies a lateral acceleration of " << lc.peak_lateral_g
       << " g here (curvature x speed^2, filtered over " << lc.smoothing_m << " m), more than the "
       << log_max_lateral_g << " g no car exceeds: ";
    // A spike within the filter's reach of the peak is its cause: named, at its own row.
    const bool by_spike = spike.count > 0 && std::abs(static_cast<double>(spike.row) -
                                                      static_cast<double>(lc.peak_row)) *
                                                     lc.row_spacing_m <=
                                                 lc.smoothing_m;
    if (by_spike) {
      os << spike_text() << "; mend or remove the row";
      throw InputError(o.log, t.at(spike.row, o.lat_accel), os.str());
    }
    os << unit_hint(true);
    throw InputError(o.log, Mark{t.lines[lc.peak_row], 1}, os.str());
  }
  // A lap logged right closes to within the drift of its sensors; a gap that is a good part of
  // the lap is curvature scaled wrong, and spreading it would draw another track.
  if (o.closed && lc.closure_gap_m > log_max_closure_fraction * lc.length_m) {
    std::ostringstream os;
    os.precision(4);
    os << "the lap does not close: with its heading closed its end is " << lc.closure_gap_m
       << " m from its start, more than " << 100 * log_max_closure_fraction << " % of the lap's "
       << lc.length_m << " m (its curvature adds up to " << lc.turns
       << " turns where a lap makes a whole number): " << closure_hint(std::abs(lc.turns));
    // The end that misses; or the gap, when the rows have one and no unit explains the miss.
    const bool at_gap = os.str().find("the log has a gap here") != std::string::npos;
    throw InputError(o.log, Mark{t.lines[at_gap ? lc.largest_gap_row : t.rows() - 1], 1}, os.str());
  }
  // What it writes must load: no turn tighter than any track's 1 m radius (issue 19, finding 12:
  // a lap closed over a few metres, a slow log's a_y / v^2).
  if (!(std::abs(lc.tightest_1pm) <= max_curvature_1pm)) {
    std::ostringstream os;
    os.precision(3);
    os << "the track from this log turns tighter than a 1 m radius near this row (curvature "
       << lc.tightest_1pm << " 1/m, filtered over " << lc.smoothing_m << " m"
       << (o.closed ? ", its closure spread along the lap" : "")
       << "); a track's is at most 1/m: is the log too short or too slow for a track?";
    throw InputError(o.log, Mark{t.lines[lc.tightest_row], 1}, os.str());
  }
  LogTrack out{};
  out.length_m = lc.length_m;
  out.start_speed_mps = v0;
  out.peak_lateral_g = lc.peak_lateral_g;
  out.closure_heading_deg = lc.closure_heading_deg;
  out.closure_gap_m = lc.closure_gap_m;
  out.smoothing_m = lc.smoothing_m;
  out.smoothing = lc.smoothing;
  out.row_spacing_m = lc.row_spacing_m;
  out.overlap_m = lc.overlap_m;
  out.turns = lc.turns;
  out.notes = std::move(notes);
  if (lc.overlap_m > 0.0)
    out.notes.push_back("the log runs " + fixed(lc.overlap_m, 1) +
                        " m past the line through its start (where its path crosses it again): "
                        "that part is left out, as a lap ends at the line");
  if (lc.crossing_before_end_m > 0.0)
    out.warnings.push_back(
        "the log's path crosses the line through its start " + fixed(lc.crossing_before_end_m, 1) +
        " m before its end: a log that runs on past the line, or a turning channel a little off "
        "(the path then closes early; see the turns below); under 0.5 % of the lap the two "
        "cannot be told apart, and nothing is cut");
  if (spike.count > 0)
    out.warnings.push_back(spike_text() + ": the track bends there, its curvature the filter's " +
                           fixed(lc.smoothing_m, 1) + " m spread of the spike; mend or remove " +
                           (spike.count > 1 ? "those rows" : "the row"));
  if (has_gap())
    out.warnings.push_back("rows " + fixed(lc.largest_gap_m, 1) + " m apart at line " +
                           std::to_string(t.lines[lc.largest_gap_row]) + " (the median is " +
                           fixed(lc.row_spacing_m, 2) +
                           " m): a dropout; the track across it is a straight guess of its "
                           "curvature");
  // A closed lap turns a whole number of times. With the speed and the turning channel right,
  // the distance scales the turns its curvature adds up to: a channel that reads long or short
  // shows there (README, "Commands": track from-log).
  // Over time with the lateral acceleration, the curvature a / v^2 and the distance v dt make
  // the turns scale as 1 / f where the speed reads f times its true value: f = 1 / implied
  // (a helper's finding: a speed 25 % high read "19.99 % high", 1 - turns).
  const auto speed_off = [](double implied) {
    const double f = 1.0 / implied;
    return fixed(100.0 * std::abs(f - 1.0), 2) + (f > 1.0 ? " % high" : " % low");
  };
  // Where that factor is another unit's ratio to --speed-unit's (within 2 %), the unit is the
  // likelier fault than a rolling radius.
  const auto unit_hint_for = [&](double implied) {
    const double f = 1.0 / implied, given = *speed_scale(o.speed_unit);
    for (const char* u : {"km/h", "m/s", "mph"}) {
      const double ratio = given / *speed_scale(u);  // the speed read in `given` over `u`
      if (std::abs(ratio - 1.0) > 1e-9 && std::abs(f / ratio - 1.0) < 0.02)
        return std::string(", or a log in ") + u + " read as " + o.speed_unit +
               ": check --speed-unit";
    }
    return std::string();
  };
  if (o.closed) {
    const double whole = std::round(lc.turns);
    const double implied = whole != 0.0 ? lc.turns / whole : 1.0;
    if (std::abs(implied - 1.0) > log_turns_warning_fraction) {
      const double pct = 100.0 * (implied - 1.0);
      const std::string by = fixed(std::abs(pct), 2) + " %";
      const std::string turning = by_yaw ? "yaw rate" : "lateral acceleration";
      const std::string figures = "the lap's curvature adds up to " + fixed(lc.turns, 4) +
                                  " turns where a lap makes " + fixed(whole, 0) + " (" +
                                  fixed(lc.closure_heading_deg, 2) +
                                  " deg of heading, spread along it)";
      out.warnings.push_back(
          figures +
          // Rows too sparse to draw the corners miss heading of their own: the sampling is
          // the first suspect, not a channel's scale.
          (lc.row_spacing_m > log_sparse_spacing_m
               ? std::string(": rows " + fixed(lc.row_spacing_m, 1) +
                             " m apart draw the corners short, which may explain it; a channel "
                             "that reads " +
                             by + " off would too")
           : o.distance.empty() && by_yaw
               // Turns from the yaw rate over time do not depend on the speed.
               ? ": the yaw rate reads " + by + (pct > 0 ? " high" : " low") +
                     " (its scale or a bias), or the time channel runs " + by +
                     (pct > 0 ? " fast" : " slow")
               : o.distance.empty()
                     ? ": the channels disagree by " + by + ". With the " + turning +
                           " right, the speed reads " + speed_off(implied) +
                           " (a wheel speed's rolling radius" + unit_hint_for(implied) + ")"
                     : ": the channels disagree by " + by + ". With the speed and the " + turning +
                           " right, the distance reads " + by + (pct > 0 ? " long" : " short") +
                           ": the track is " + fixed(lc.length_m, 1) + " m, and scaled by 1/" +
                           fixed(implied, 4) + " it would be " + fixed(lc.length_m / implied, 1) +
                           " m (a wheel's rolling radius; check the distance channel)"));
    }
  }
  CsvWriter<ProfileRow> csv(profile_columns, lc.s_m.size());
  for (std::size_t j = 0; j < lc.s_m.size(); ++j) csv.add({lc.s_m[j], lc.curvature_1pm[j]});
  std::ostringstream y_out;
  // The name on one printable line too: a control character is no part of a track's name (the
  // track file would be refused), a byte that is not UTF-8 none of the file's.
  const std::string name =
      printable(o.name.empty() ? std::filesystem::path(o.log).stem().string() : o.name);
  // The log's file name in a comment: one printable line (a newline in the name once wrote
  // keys into the track: issue 19, finding 9), and UTF-8 as the file must be.
  y_out << "# Made by 'lapwing track from-log' from "
        << printable(std::filesystem::path(o.log).filename().string()) << ": curvature from "
        << (by_yaw ? "yaw rate / speed" : "lateral acceleration / speed^2") << ", filtered over "
        << fixed(lc.smoothing_m, 1) << " m"
        << (lc.smoothing.automatic ? " (auto: generalised cross-validation)" : "")
        << "; the log's rows are " << fixed(lc.row_spacing_m, 2)
        << " m apart (median), the spacing the data-quality verdict judges (source_spacing).\n";
  y_out << "format: 1\nname: " << json_quote(name) << "\nclosed: " << (o.closed ? "true" : "false")
        << "\n";
  if (!o.closed) y_out << "start_speed: " << format_number(v0) << " m/s  # the log's first\n";
  y_out << air_yaml(o.air);
  y_out << "mesh: 0.5 m\ncurvature: {file: " << json_quote(csv_name)
        << ", source_spacing: " << format_number(lc.row_spacing_m) << " m}\n";
  out.yaml = y_out.str();
  out.csv = csv.take();
  return out;
}

std::optional<Violation> SpeedLogOptions::validate() const {
  return FirstViolation()
      .rule(!speed.empty(), "speed", "give the speed column")
      .rule(distance.empty() != time.empty(), "distance",
            "give one of the distance and time columns")
      .rule(speed_scale(speed_unit).has_value(), "speed_unit",
            [&] { return "unknown speed unit '" + speed_unit + "' (km/h, kph, m/s or mph)"; })
      .result();
}

SpeedLogFile read_speed_log(const SpeedLogOptions& o) {
  if (const auto v = o.validate()) throw InputError(o.log, Mark{}, v->message());
  SpeedLogFile f;
  f.table = read_csv(o.log, log_min_samples);
  drop_standstill(f.table, o.speed, o.distance, o.time, f.notes);
  const CsvTable& t = f.table;
  LoggedSpeed& log = f.speed;
  log.source = o.log;
  const double vs = *speed_scale(o.speed_unit);
  const auto& vcol = t.column(o.speed);
  log.speed_mps.resize(vcol.size());
  for (std::size_t i = 0; i < vcol.size(); ++i) {
    log.speed_mps[i] = vcol[i] * vs;
    // A speed in km/h read as m/s is 3.6 times too large: beyond what any car logs it is a unit
    // read wrong (the log's curvature has the same limit, log_max_row_speed_mps).
    if (!(log.speed_mps[i] >= 0.0) || !(log.speed_mps[i] <= log_max_row_speed_mps)) {
      char buf[64];
      std::snprintf(buf, sizeof buf, "%.6g", vcol[i]);
      throw InputError(
          o.log, t.at(i, o.speed),
          std::string("speed ") + buf + " " + o.speed_unit +
              (log.speed_mps[i] < 0.0 ? " is negative: a logged speed is at least 0"
                                      : " is beyond 900 km/h, which no car logs: is the speed in "
                                        "another unit? (--speed-unit " +
                                            o.speed_unit + " now)"));
    }
  }
  if (!o.distance.empty()) {
    require_increasing(t, o.distance);
    log.distance_m = t.column(o.distance);
    // A speed of 0 at two rows between which the distance moves on is a dropout of the speed
    // channel (the car cannot cover ground at rest): named at its row.
    for (std::size_t i = 1; i < log.distance_m.size(); ++i)
      if (log.speed_mps[i] == 0.0 && log.speed_mps[i - 1] == 0.0) {
        char buf[32];
        std::snprintf(buf, sizeof buf, "%.2f", log.distance_m[i] - log.distance_m[i - 1]);
        throw InputError(o.log, t.at(i, o.speed),
                         std::string("the logged speed is 0 at this row and the one before, yet "
                                     "the distance moves on ") +
                             buf +
                             " m between them: a dropout of the speed channel (give a log "
                             "without it, or its speed)");
      }
  } else {
    require_increasing(t, o.time);
    log.distance_m = distance_from_time(t.column(o.time), log.speed_mps);
    for (std::size_t i = 1; i < log.distance_m.size(); ++i)
      if (!(log.distance_m[i] > log.distance_m[i - 1]))
        throw InputError(o.log, t.at(i, o.speed),
                         "the car does not move between this row and the one before (speed 0 "
                         "at both): a log's distance must increase");
  }
  // No lap is longer than a track may be (200 km; a time column in ms read as s, or an
  // overflow, is not a lap).
  const double span = log.distance_m.back() - log.distance_m.front();
  if (!(span <= PathProfile::max_length_m))
    throw InputError(o.log, Mark{t.lines.back(), 1},
                     "the log covers more than 200 km, which no track does: is the time or "
                     "distance column in another unit?");
  return f;
}

}  // namespace lapwing
