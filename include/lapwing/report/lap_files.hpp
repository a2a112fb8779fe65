// A lap's output files: summary.json, the trace CSV and corners.csv (full precision). Each CSV's
// columns are one list, for header and rows (STYLE habit 13).
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/io/json.hpp"
#include "lapwing/io/output.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"
#include "lapwing/study/track_quality.hpp"

namespace lapwing {

/// summary.json (README, "Output files"): {"lapwing", "car", "results": [...]}. Each result whose
/// track and config have a verdict in `qualities` gets it as "track_quality".
std::string summary_json(const std::string& car_name, const std::vector<LapSummary>& results,
                         const std::vector<TrackQuality>& qualities = {});

/// The "balance" object of a result in summary.json; compare.json writes the same per config.
/// `"key": number`, or `"key": null` where the value is undefined.
void optional_field(JsonWriter& w, std::string_view key, const std::optional<double>& v);
void write_balance(JsonWriter& w, const BalanceSummary& b);
/// The "window" object inside "balance": the balance window and how the lap kept to it.
void write_balance_window(JsonWriter& w, const BalanceWindowResult& r);

/// One channel of a lap's trace: a column of trace-<track>-<config>.csv, by its name there, and
/// its value at mesh point i in the file's units. `number` gives every kind's value: the gear as a
/// whole number, the phase as its enumerator (phase_name() gives its word), NaN where a
/// `number_or_empty` channel is undefined (its field is empty in the file).
struct TraceChannel {
  enum class Kind { number, number_or_empty, integer, phase };
  std::string_view name;
  Kind kind;
  double (*number)(const Lap& lap, const Mesh& mesh, std::size_t i);
};
/// The trace's channels in the file's order (the file's header): one list, for the CSV's header
/// and rows and for a program that wants the trace's columns without the file.
std::span<const TraceChannel> trace_channels();

/// trace-<track>-<config>.csv, one row per mesh point (README, "Output files"), handed to `sink`
/// in pieces of about 64 KB (never held whole).
void trace_csv(const Lap& lap, const Mesh& mesh, const OutputSink& sink);

/// corners.csv: the corners arrays of all results, one row per corner, track and config first.
std::string corners_csv(const std::vector<LapSummary>& results);

}  // namespace lapwing
