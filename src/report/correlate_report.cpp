#include "lapwing/report/correlate_report.hpp"

#include <cmath>

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/report/check_report.hpp"
#include "lapwing/report/lap_files.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing {

namespace {

struct CorrelateRow {
  double s_m, sim_mps, log_mps, delta_s;
};
constexpr CsvColumn<CorrelateRow> correlate_columns[] = {
    {"distance_m", [](std::string& o, const CorrelateRow& r) { csv_number(o, r.s_m); }},
    {"sim_speed_kph",
     [](std::string& o, const CorrelateRow& r) { csv_number(o, units::to_kph(r.sim_mps)); }},
    {"log_speed_kph",
     [](std::string& o, const CorrelateRow& r) { csv_number(o, units::to_kph(r.log_mps)); }},
    {"speed_error_kph",
     [](std::string& o, const CorrelateRow& r) {
       csv_number(o, units::to_kph(r.sim_mps - r.log_mps));
     }},
    {"time_delta_s", [](std::string& o, const CorrelateRow& r) { csv_number(o, r.delta_s); }},
};

std::string kph(double mps, int decimals = 1) {
  return fixed(units::to_kph(mps), decimals);
}
std::string dkph(double mps) {
  return signed_fixed(units::to_kph(mps), 1);
}

// Where a point of the lap is, in words: "in corner 4", "before corner 5", "before the line".
std::string where(const ErrorPeak& p) {
  if (p.corner) return "in corner " + std::to_string(p.corner);
  if (p.next_corner) return "before corner " + std::to_string(p.next_corner);
  return "before the line";
}

// The share of the track the log covers: "100.0 %" only when all of it, at most 99.9 % when
// any is missing (0.99985 rounds to 100.0 and read as whole beside a lap over less).
std::string coverage_text(double coverage) {
  return fixed(coverage >= 1.0 ? 100.0 : std::min(99.9, 100.0 * coverage), 1) + " %";
}

// The share of a sector the log covers, "100 %" when all of it (to the metre).
std::string sector_logged(const SectorError& s) {
  const double length = s.end_m - s.start_m;
  return s.covered_m >= length - 1e-6 * std::max(1.0, length) ? "100 %"
                                                              : coverage_text(s.covered_m / length);
}

// A number, or null where it is not a number (a standard error not found).
void number_or_null(JsonWriter& w, std::string_view key, double v) {
  optional_field(w, key, std::isfinite(v) ? std::optional<double>(v) : std::nullopt);
}

}  // namespace

std::string correlate_text(const Circuit& circuit, const Correlation& c) {
  std::string o;
  o += "aligned  offset " + fixed(c.alignment.offset_m, 2) +
       " m (the log's distance at the line), "
       "scale " +
       fixed(c.alignment.scale, 4) + ", speed correlation " + fixed(c.alignment.correlation, 4) +
       ", " + coverage_text(c.coverage) + " of the track covered\n";
  for (const std::string& w : c.warnings) o += "warning: " + w + "\n";
  o += "lap      simulated " + fixed(c.lap_time_sim_s, 3) + " s, logged " +
       fixed(c.lap_time_log_s, 3) + " s, difference " +
       signed_fixed(c.lap_time_sim_s - c.lap_time_log_s, 3) + " s (sim - log)" +
       (c.covered_length_m < circuit.mesh.length_m
            ? ", over the " + fixed(c.covered_length_m, 1) + " m the log covers"
            : std::string()) +
       "\n";
  o += "speed    RMS error " + fixed(units::to_kph(c.rms_speed_error_mps), 2) + " km/h\n\n";
  std::vector<std::vector<std::string>> rows;
  for (std::size_t k = 0; k < c.sectors.size(); ++k) {
    const SectorError& s = c.sectors[k];
    rows.push_back({std::to_string(k + 1), fixed(s.start_m, 0) + "-" + fixed(s.end_m, 0),
                    sector_logged(s), fixed(s.sim_s, 3), fixed(s.log_s, 3),
                    signed_fixed(s.error_s, 3)});
  }
  o += text_table({"sector", "m", "logged", "sim s", "log s", "error s"}, rows) +
       "(sector times over the part of each sector the log covers)\n\n";
  rows.clear();
  for (const CornerError& e : c.corners) {
    const auto b = e.braking_error_m();
    rows.push_back({std::to_string(e.id), fixed(e.apex_m, 0), kph(e.sim_apex_mps),
                    kph(e.log_apex_mps), dkph(e.sim_entry_mps - e.log_entry_mps),
                    dkph(e.sim_apex_mps - e.log_apex_mps), dkph(e.sim_exit_mps - e.log_exit_mps),
                    b ? signed_fixed(*b, 1) : "-"});
  }
  if (!rows.empty())
    o += text_table({"corner", "apex m", "sim apex km/h", "log apex km/h", "entry err", "apex err",
                     "exit err", "braking m"},
                    rows) +
         "(errors sim - log, km/h; braking m: simulated braking point - logged, > 0 brakes "
         "later; - where either takes the corner without braking)\n\n";
  o += "largest speed errors (sim - log):";
  for (std::size_t k = 0; k < c.peaks.size(); ++k)
    o += std::string(k ? "," : "") + " " + dkph(c.peaks[k].error_mps) + " km/h at " +
         fixed(c.peaks[k].at_m, 0) + " m (" + where(c.peaks[k]) + ")";
  o += "\n";
  return o;
}

std::string correlate_json(const std::string& car_name, const std::string& config,
                           const std::string& log_file, const Circuit& circuit,
                           const Correlation& c) {
  JsonWriter w;
  w.begin_object()
      .field("lapwing", version())
      .field("car", car_name)
      .field("config", config)
      .field("track", circuit.track.name)
      .field("log", log_file)
      .field("lap_time_sim_s", c.lap_time_sim_s)
      .field("lap_time_log_s", c.lap_time_log_s)
      .field("rms_speed_error_kph", units::to_kph(c.rms_speed_error_mps))
      .field("offset_m", c.alignment.offset_m)
      .field("scale", c.alignment.scale)
      .field("speed_correlation", c.alignment.correlation)
      .field("coverage", c.coverage)
      .field("covered_length_m", c.covered_length_m);
  w.key("warnings").begin_array();
  for (const std::string& warning : c.warnings) w.value(warning);
  w.end_array();
  w.key("sectors").begin_array();
  for (const SectorError& s : c.sectors)
    w.begin_object()
        .field("start_m", s.start_m)
        .field("end_m", s.end_m)
        .field("sim_s", s.sim_s)
        .field("log_s", s.log_s)
        .field("error_s", s.error_s)
        .field("covered_length_m", s.covered_m)
        .end_object();
  w.end_array();
  w.key("corners").begin_array();
  for (const CornerError& e : c.corners) {
    w.begin_object()
        .field("id", e.id)
        .field("apex_m", e.apex_m)
        .field("sim_entry_kph", units::to_kph(e.sim_entry_mps))
        .field("sim_apex_kph", units::to_kph(e.sim_apex_mps))
        .field("sim_exit_kph", units::to_kph(e.sim_exit_mps))
        .field("log_entry_kph", units::to_kph(e.log_entry_mps))
        .field("log_apex_kph", units::to_kph(e.log_apex_mps))
        .field("log_exit_kph", units::to_kph(e.log_exit_mps))
        .field("entry_error_kph", units::to_kph(e.sim_entry_mps - e.log_entry_mps))
        .field("apex_error_kph", units::to_kph(e.sim_apex_mps - e.log_apex_mps))
        .field("exit_error_kph", units::to_kph(e.sim_exit_mps - e.log_exit_mps));
    optional_field(w, "sim_braking_m", e.sim_braking_m);
    optional_field(w, "log_braking_m", e.log_braking_m);
    optional_field(w, "braking_error_m", e.braking_error_m());
    w.end_object();
  }
  w.end_array();
  w.key("largest_errors").begin_array();
  for (const ErrorPeak& p : c.peaks)
    w.begin_object()
        .field("at_m", p.at_m)
        .field("error_kph", units::to_kph(p.error_mps))
        .field("corner", p.corner)
        .field("next_corner", p.next_corner)
        .end_object();
  w.end_array();
  w.end_object();
  return w.str();
}

std::string correlate_csv(const Mesh& mesh, const Lap& lap, const Correlation& c) {
  CsvWriter<CorrelateRow> csv(correlate_columns, mesh.size());
  for (std::size_t i = 0; i < mesh.size(); ++i)
    if (c.covered[i])
      csv.add({mesh.s_m[i], lap.speed_mps[i], c.log_speed_mps[i], c.time_delta_s[i]});
  return csv.take();
}

std::string fit_value_text(FitParameter p, double value) {
  if (p == FitParameter::balance) return signed_fixed(100.0 * value, 2) + " % (added)";
  return "x" + fixed(value, 4);
}

std::string fit_text(const FitResult& r, const std::vector<std::string>& log_names) {
  std::string o;
  std::vector<std::vector<std::string>> rows;
  for (std::size_t i = 0; i < r.params.size(); ++i) {
    const bool shift = r.params[i] == FitParameter::balance;
    const double se = r.std_errors[i];
    rows.push_back(
        {std::string(fit_parameter_name(r.params[i])), fit_value_text(r.params[i], r.values[i]),
         std::isfinite(se) ? fixed(shift ? 100.0 * se : se, 4) + (shift ? " %" : "") : "-"});
  }
  o += text_table({"parameter", "fitted", "std error"}, rows) + "\n";
  if (r.params.size() > 1) {
    std::vector<std::string> header{"correlation"};
    for (FitParameter p : r.params) header.emplace_back(fit_parameter_name(p));
    rows.clear();
    for (std::size_t i = 0; i < r.params.size(); ++i) {
      std::vector<std::string> row{std::string(fit_parameter_name(r.params[i]))};
      for (std::size_t j = 0; j < r.params.size(); ++j)
        row.push_back(std::isfinite(r.correlation[i][j]) ? fixed(r.correlation[i][j], 3) : "-");
      rows.push_back(row);
    }
    o += text_table(header, rows) + "\n";
  }
  rows.clear();
  for (std::size_t l = 0; l < log_names.size(); ++l)
    rows.push_back({log_names[l], fixed(r.final_alignments[l].offset_m, 2),
                    fixed(r.final_alignments[l].scale, 4),
                    fixed(r.final_alignments[l].correlation, 4),
                    fixed(units::to_kph(r.rms_before_mps[l]), 2),
                    fixed(units::to_kph(r.rms_after_mps[l]), 2)});
  rows.push_back({"all", "", "", "", fixed(units::to_kph(r.rms_before_mps_all), 2),
                  fixed(units::to_kph(r.rms_after_mps_all), 2)});
  o += text_table({"log", "offset m", "scale", "speed r", "RMS before km/h", "RMS after km/h"},
                  rows);
  o += "solver   " + std::to_string(r.rounds) + (r.rounds > 1 ? " rounds" : " round") +
       " of fit and alignment, " + std::to_string(r.iterations) + " iterations, " +
       std::to_string(r.laps_solved) + " laps solved: " + r.termination + "\n";
  for (const std::string& w : r.warnings) o += "warning: " + w + "\n";
  if (!r.covariance_found)
    o += "warning: the covariance could not be found (the logs do not determine every "
         "parameter): no standard errors\n";
  for (const auto& p : r.inseparable)
    o += "warning: " + std::string(fit_parameter_name(r.params[p.a])) + " and " +
         std::string(fit_parameter_name(r.params[p.b])) + " are not separable by these logs" +
         (std::isfinite(p.correlation) ? " (correlation " + fixed(p.correlation, 3) + ")" : "") +
         "; to separate them: " + p.advice + "\n";
  return o;
}

std::string fit_json(const std::string& car_name, const std::string& config,
                     const std::vector<std::string>& log_names,
                     const std::vector<std::string>& track_names, const std::vector<Air>& airs,
                     const FitResult& r) {
  JsonWriter w;
  w.begin_object().field("lapwing", version()).field("car", car_name).field("config", config);
  w.key("parameters").begin_object();
  for (std::size_t i = 0; i < r.params.size(); ++i) {
    w.key(fit_parameter_name(r.params[i])).begin_object();
    w.field(r.params[i] == FitParameter::balance ? "shift" : "scale", r.values[i]);
    number_or_null(w, "std_error", r.std_errors[i]);
    w.end_object();
  }
  w.end_object();
  w.field("rms_before_kph", units::to_kph(r.rms_before_mps_all))
      .field("rms_after_kph", units::to_kph(r.rms_after_mps_all));
  w.key("correlation").begin_array();
  for (const auto& row : r.correlation) {
    w.begin_array();
    for (double v : row) std::isfinite(v) ? w.value(v) : w.null();
    w.end_array();
  }
  w.end_array();
  w.key("logs").begin_array();
  for (std::size_t l = 0; l < log_names.size(); ++l)
    w.begin_object()
        .field("log", log_names[l])
        .field("track", track_names[l])
        .field("air_density_kg_m3", airs[l].density_kg_m3)
        .field("air", air_text(airs[l]))
        .field("offset_m", r.final_alignments[l].offset_m)
        .field("scale", r.final_alignments[l].scale)
        .field("speed_correlation", r.final_alignments[l].correlation)
        .field("rms_before_kph", units::to_kph(r.rms_before_mps[l]))
        .field("rms_after_kph", units::to_kph(r.rms_after_mps[l]))
        .end_object();
  w.end_array();
  w.key("not_separable").begin_array();
  for (const auto& p : r.inseparable) {
    w.begin_object()
        .field("a", fit_parameter_name(r.params[p.a]))
        .field("b", fit_parameter_name(r.params[p.b]));
    number_or_null(w, "correlation", p.correlation);
    w.field("advice", p.advice).end_object();
  }
  w.end_array();
  w.key("warnings").begin_array();
  for (const std::string& warning : r.warnings) w.value(warning);
  w.end_array();
  w.field("rounds", r.rounds).field("settled", r.settled);
  w.field("iterations", r.iterations)
      .field("iteration_limit", r.iteration_cap)
      .field("termination", r.termination)
      .end_object();
  return w.str();
}

}  // namespace lapwing
