// The command line's commands: each takes its parsed options, calls the library, and prints.
// Kept apart from main so that main is only option parsing and error mapping.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace lapwing {
struct Car;
}

namespace lapwing::cli {

/// --altitude, --temperature, --pressure, --humidity as given (text with units); they replace
/// every track's values. Parsed by the commands so that errors name the option.
struct AirOptions {
  std::string altitude, temperature, pressure, humidity;
};

/// --model point-mass | axle (empty: the car file's).
void apply_model(const std::string& model, lapwing::Car& car);

struct CheckOptions {
  std::string car;
  std::vector<std::string> tracks;
  std::string json;
  AirOptions air;
};

struct RunOptions {
  std::string memory_limit;  // empty: half the machine's memory
  std::string car;
  std::string model;
  std::string track;
  std::string config;
  std::string out;
  AirOptions air;
};

struct CompareOptions {
  std::string memory_limit;
  std::string car;
  std::string model;
  std::vector<std::string> tracks;
  std::vector<std::string> configs;
  std::string out;
  unsigned threads = 0;
  AirOptions air;
};

struct TradeOptions {
  std::string memory_limit;
  std::string car;
  std::string model;
  std::vector<std::string> tracks;
  std::string config;
  std::string step = "2 %";
  std::string span = "15 %";
  int grid = 9;
  std::string out;
  unsigned threads = 0;
  AirOptions air;
};

struct FromLogOptions {
  std::string log, speed, lat_accel, yaw_rate, distance, time, out, name;
  std::string speed_unit = "km/h", accel_unit = "g", yaw_unit = "deg/s";
  std::string smoothing = "auto";
  bool closed = false;
  AirOptions air;  // written into the track file
};

struct SweepOptions {
  std::string car;
  std::string model;
  std::vector<std::string> tracks;
  std::vector<std::string> configs;
  std::vector<std::string> sets;
  std::string design = "grid";
  std::string shard = "1/1";
  std::string out;
  unsigned threads = 0;
  AirOptions air;
  std::string command;  // the command line as typed (stored with the results)
};

struct SweepMergeOptions {
  std::string out;
  std::vector<std::string> inputs;
};

struct SweepExportOptions {
  std::string file, csv;
};

struct TrackLineOptions {
  std::string track, out, car, config;
  std::string method = "min-curvature";  // or min-time (needs --car)
  std::string vehicle_width, margin;     // with units; default the track's line: or 2 m, 0.5 m
  AirOptions air;
};

/// What correlate and fit read of each log (the column options apply to every log).
struct LogColumns {
  std::string distance, time, speed;
  std::string speed_unit = "km/h";
};

struct CorrelateOptions {
  std::string car, model, track, log, config, out;
  LogColumns columns;
  AirOptions air;
};

struct FitOptions {
  std::string car, model, config, out, free;
  std::vector<std::string> tracks, logs;  // in pairs: the i-th log is a lap of the i-th track
  LogColumns columns;
  unsigned threads = 0;
  AirOptions air;
};

/// A usage error found after parsing (a bad option value): exit 2.
struct UsageError {
  std::string message;
};

int check(const CheckOptions& o);
int run(const RunOptions& o);
int compare(const CompareOptions& o);
int trade(const TradeOptions& o);
int track_from_log(const FromLogOptions& o);
int sweep(const SweepOptions& o);
int sweep_merge(const SweepMergeOptions& o);
int sweep_export(const SweepExportOptions& o);
int track_line(const TrackLineOptions& o);
int correlate(const CorrelateOptions& o);
int fit(const FitOptions& o);

}  // namespace lapwing::cli
