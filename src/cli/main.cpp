// lapwing's command line: parses options (CLI11), calls the commands, maps failures to exit
// codes: 0 success, 1 internal fault, 2 bad input or usage, 3 a car that cannot move.
#include <CLI/CLI.hpp>

#include <algorithm>
#include <functional>
#include <iostream>
#include <optional>
#include <string>
#include <vector>

#include "commands.hpp"
#include "fit_module.hpp"
#include "lapwing/base/error.hpp"
#include "lapwing/base/text.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/input_file.hpp"
#include "lapwing/study/trade.hpp"

namespace {

// What the parser library would word in its own terms, said in lapwing's before parsing: a
// command name that is not one ("did you mean", and the list), and an option that takes one
// value given more than once. Returns the message, or nothing when the line is fine so far.
std::optional<std::string> check_command_line(CLI::App& app, int argc, char** argv) {
  const std::function<bool(CLI::App*)> all = [](CLI::App*) { return true; };
  CLI::App* at = &app;
  std::string path;
  int i = 1;
  // The command words: each must name a subcommand of the one before.
  for (;; ++i) {
    const std::vector<CLI::App*> subs = at->get_subcommands(all);
    if (subs.empty()) break;
    std::vector<std::string> names;
    for (CLI::App* sub : subs) names.push_back(sub->get_name());
    std::string list;
    for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
    const std::string of = path.empty() ? "" : " of " + path.substr(0, path.size() - 1);
    const std::string word = i < argc ? argv[i] : "";
    // A command with options of its own and optional subcommands (sweep; sweep merge).
    if (at != &app && at->get_require_subcommand_min() == 0 && (word.empty() || word[0] == '-'))
      break;
    if (word.empty()) return "give a command (commands" + of + ": " + list + ")";
    if (word[0] == '-') break;  // --help, --version; the parser says the rest
    const auto it = std::find(names.begin(), names.end(), word);
    if (it == names.end()) {
      const std::string near = lapwing::closest(word, names);
      return "unknown command '" + path + word + "'" +
             (near.empty() ? "" : "; did you mean '" + path + near + "'?") + " (commands" + of +
             ": " + list + ")";
    }
    at = subs[static_cast<std::size_t>(it - names.begin())];
    path += word + " ";
  }
  // Options of the command that take one value, given more than once; and any option given an
  // empty value ("--out ''", "--json=": a script's unset variable), which the parser would take
  // as not given at all: the output would silently not be written.
  std::vector<std::pair<std::string, int>> counts;
  for (; i < argc; ++i) {
    std::string word = argv[i];
    if (word.rfind("--", 0) != 0) continue;
    {
      const std::size_t eq = word.find('=');
      const std::string name = word.substr(0, eq);
      const CLI::Option* opt = at->get_option_no_throw(name);
      const bool takes_value = opt && opt->get_items_expected_max() >= 1;
      const bool empty = eq != std::string::npos
                             ? eq + 1 == word.size()
                             : (takes_value && i + 1 < argc && argv[i + 1][0] == '\0');
      if (takes_value && empty) return name + " is given an empty value";
    }
    word = word.substr(0, word.find('='));
    const CLI::Option* opt = at->get_option_no_throw(word);
    if (!opt || opt->get_items_expected_max() != 1) continue;
    auto it = std::find_if(counts.begin(), counts.end(), [&](auto& c) { return c.first == word; });
    if (it == counts.end())
      counts.push_back({word, 1});
    else
      ++it->second;
  }
  for (const auto& [name, n] : counts) {
    if (n < 2) continue;
    if (at->get_name() == "run" && name == "--track")
      return "--track is given " + std::to_string(n) +
             " times; run laps one track (compare and trade take several)";
    return name + " is given " + std::to_string(n) + " times; " + path + "takes one";
  }
  return std::nullopt;
}

}  // namespace

int main(int argc, char** argv) {
  using namespace lapwing;
  CLI::App app{
      "lapwing: lap times, corner limits and aero trade-offs from a car file, its aero "
      "configurations and track curvature profiles"};
  app.set_version_flag("--version", version());
  app.require_subcommand(1);
  app.footer("Run 'lapwing COMMAND --help' for a command's options and an example.");

  // The air options, on every command: they replace each track's values.
  auto add_air = [](CLI::App* cmd, cli::AirOptions& a) {
    cmd->add_option("--altitude", a.altitude, "Altitude for every track (e.g. '1200 m')");
    cmd->add_option("--temperature", a.temperature, "Air temperature (e.g. '31 C')");
    cmd->add_option("--pressure", a.pressure,
                    "Air pressure (e.g. '985 hPa'); default ISA at altitude");
    cmd->add_option("--humidity", a.humidity, "Relative humidity (e.g. '60 %')");
  };

  cli::CheckOptions check_o;
  auto* check = app.add_subcommand("check", "Validate a car and tracks; print what was derived");
  check->add_option("--car", check_o.car, "Car file (YAML)")->required();
  check->add_option("--track", check_o.tracks, "Track file(s) (YAML)");
  check->add_option("--json", check_o.json, "Also write the findings as JSON to FILE");
  add_air(check, check_o.air);
  check->footer(
      "Example:\n  lapwing check --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml");

  // The memory a run may take: refused at once beyond it (README, "Memory").
  auto add_memory = [](CLI::App* cmd, std::string& limit) {
    cmd->add_option("--memory-limit", limit,
                    "Refuse a study estimated to need more memory, e.g. 4GB or 500MB (default: "
                    "half the machine's memory)");
  };

  cli::RunOptions run_o;
  auto* run = app.add_subcommand("run", "Simulate one lap of one track with one aero config");
  run->add_option("--car", run_o.car, "Car file (YAML)")->required();
  run->add_option("--track", run_o.track, "Track file (YAML)")->required();
  run->add_option("--config", run_o.config, "Aero config name (default: the car file's first)");
  run->add_option("--out", run_o.out,
                  "Folder for summary.json, trace-TRACK-CONFIG.csv, corners.csv and report.html");
  run->add_option("--model", run_o.model, "point-mass or axle (default: the car file's model)");
  add_memory(run, run_o.memory_limit);
  add_air(run, run_o.air);
  run->footer(
      "Example:\n  lapwing run --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml "
      "--config high --out out/brannock-high");

  // What compare and trade both take: the car, the tracks, the model and the thread count.
  auto add_study = [](CLI::App* cmd, std::string& car, std::vector<std::string>& tracks,
                      std::string& model, unsigned& threads) {
    cmd->add_option("--car", car, "Car file (YAML)")->required();
    cmd->add_option("--track", tracks, "Track file(s) (YAML)")->required();
    cmd->add_option("--model", model, "point-mass or axle (default: the car file's)");
    cmd->add_option("--threads", threads, "Laps solved at once (default: all cores)")
        ->check(CLI::Range(0, 256));
  };

  cli::CompareOptions compare_o;
  auto* compare = app.add_subcommand(
      "compare", "Rank aero configs on each track; where each wins or loses the time");
  add_study(compare, compare_o.car, compare_o.tracks, compare_o.model, compare_o.threads);
  add_memory(compare, compare_o.memory_limit);
  compare->add_option("--config", compare_o.configs, "Config name(s) (default: all of the car's)");
  compare->add_option(
      "--out", compare_o.out,
      "Folder for compare.json, delta-TRACK-A-B.csv, summary.json, traces, corners.csv, "
      "report.html");
  add_air(compare, compare_o.air);
  compare->footer(
      "Example:\n  lapwing compare --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml "
      "--track tracks/saltmere-flats.yaml --config low --config high --out out/compare");

  cli::TradeOptions trade_o;
  auto* trade = app.add_subcommand(
      "trade", "Lap-time sensitivities to downforce, drag, mass and power; the exchange rate");
  add_study(trade, trade_o.car, trade_o.tracks, trade_o.model, trade_o.threads);
  add_memory(trade, trade_o.memory_limit);
  trade->add_option("--config", trade_o.config, "Config to trade (default: every config)");
  trade->add_option("--step", trade_o.step,
                    "Relative step of the central differences (default 2 %)");
  trade->add_option("--grid", trade_o.grid, "Points per axis of the ClA x CdA grid (default 9)")
      ->check(CLI::Range(lapwing::TradeOptions::min_grid_points,
                         lapwing::TradeOptions::max_grid_points));
  trade->add_option("--span", trade_o.span,
                    "Half-width of the grid around the config (default 15 %)");
  trade->add_option("--out", trade_o.out,
                    "Folder for trade.json, trade-grid-TRACK.csv and report.html");
  add_air(trade, trade_o.air);
  trade->footer(
      "Example:\n  lapwing trade --car cars/pellion-fr2.yaml --track tracks/cairnholt.yaml "
      "--config medium --step 2% --out out/trade");

  cli::FromLogOptions log_o;
  auto* track = app.add_subcommand("track", "Make track files from data");
  track->require_subcommand(1);
  auto* from_log = track->add_subcommand(
      "from-log", "A track (curvature profile) from a logged lap: speed and lateral acceleration");
  from_log->add_option("--log", log_o.log, "Logged lap (CSV with a header)")->required();
  from_log->add_option("--speed", log_o.speed, "Speed column")->required();
  from_log->add_option("--lat-accel", log_o.lat_accel,
                       "Lateral acceleration column (+ to the left)");
  from_log->add_option("--yaw-rate", log_o.yaw_rate, "Yaw-rate column (+ to the left), instead");
  from_log->add_option("--distance", log_o.distance, "Distance column (m)");
  from_log->add_option("--time", log_o.time, "Time column (s), instead of distance");
  from_log->add_flag("--closed", log_o.closed, "The log is one whole lap");
  from_log->add_option("--speed-unit", log_o.speed_unit, "km/h (default), m/s or mph");
  from_log->add_option("--accel-unit", log_o.accel_unit, "g (default) or m/s2");
  from_log->add_option("--yaw-unit", log_o.yaw_unit, "deg/s (default) or rad/s");
  from_log->add_option("--smoothing", log_o.smoothing,
                       "Filter length on the curvature, or auto (default: chosen by "
                       "generalised cross-validation)");
  from_log->add_option("--name", log_o.name, "Track name (default: the log's file name)");
  add_air(from_log, log_o.air);
  from_log
      ->add_option("--out", log_o.out, "Track file to write (TRACK.yaml, and TRACK.csv beside it)")
      ->required();
  from_log->footer(
      "Example:\n  lapwing track from-log --log logs/brannock-park-survey-lap.csv "
      "--speed speed_kph --lat-accel lat_accel_g --time time_s --out out/brannock-logged.yaml");

  cli::TrackLineOptions line_o;
  auto* line = track->add_subcommand(
      "line", "A racing line over a track with widths: minimum curvature, or minimum time");
  line->add_option("--track", line_o.track, "Track file (YAML) with widths")->required();
  line->add_option("--out", line_o.out,
                   "Track file to write (OUT.yaml, and OUT.csv beside it: the line)")
      ->required();
  line->add_option("--car", line_o.car,
                   "Car file: laps on the path and the line (min-time: the "
                   "car the line is for)");
  line->add_option("--config", line_o.config, "Config of --car (default: the car file's first)");
  line->add_option("--method", line_o.method, "min-curvature (default) or min-time (needs --car)");
  line->add_option("--vehicle-width", line_o.vehicle_width,
                   "Vehicle width (default: the track's line:, else 2.0 m)");
  line->add_option("--margin", line_o.margin,
                   "Room kept from each edge beyond half the width (default: 0.5 m)");
  add_air(line, line_o.air);
  line->footer(
      "Example:\n  lapwing track line --track tracks/brannock-park.yaml --out "
      "out/brannock-line.yaml --car cars/pellion-fr2.yaml");
  // What correlate and fit read of each log.
  auto add_log_columns = [](CLI::App* cmd, cli::LogColumns& c) {
    cmd->add_option("--distance", c.distance, "Distance column (m)");
    cmd->add_option("--time", c.time, "Time column (s), instead of distance");
    cmd->add_option("--speed", c.speed, "Speed column")->required();
    cmd->add_option("--speed-unit", c.speed_unit, "km/h (default), kph, m/s or mph");
  };
  cli::CorrelateOptions corr_o;
  auto* correlate = app.add_subcommand(
      "correlate", "Hold a simulated lap against a logged one: lap, sector and corner errors");
  correlate->add_option("--car", corr_o.car, "Car file (YAML)")->required();
  correlate->add_option("--track", corr_o.track, "Track file (YAML)")->required();
  correlate->add_option("--log", corr_o.log, "Logged lap (CSV with a header)")->required();
  add_log_columns(correlate, corr_o.columns);
  correlate->add_option("--config", corr_o.config,
                        "Aero config name (default: the car file's first)");
  correlate->add_option("--model", corr_o.model, "point-mass or axle (default: the car file's)");
  correlate->add_option("--out", corr_o.out,
                        "Folder for correlate.json, correlate-TRACK.csv and report.html");
  add_air(correlate, corr_o.air);
  correlate->footer(
      "Example:\n  lapwing correlate --car cars/pellion-fr2.yaml --track "
      "tracks/brannock-park-survey.yaml --log logs/brannock-park-survey-lap.csv --time "
      "time_s --speed speed_kph --config medium --out out/correlate");

  cli::FitOptions fit_o;
  auto* fit = app.add_subcommand(
      "fit", "Fit the car's grip, power, drag, downforce, balance or mass to logged laps");
  fit->add_option("--car", fit_o.car, "Car file (YAML)")->required();
  fit->add_option("--track", fit_o.tracks, "Track file (YAML); one per --log, in order")
      ->required();
  fit->add_option("--log", fit_o.logs, "Logged lap (CSV) of the --track in the same place")
      ->required();
  add_log_columns(fit, fit_o.columns);
  fit->add_option("--free", fit_o.free,
                  "Parameters to fit, comma-separated: grip, grip_lat, grip_long, power, cda, "
                  "cla, balance, mass")
      ->required();
  fit->add_option("--config", fit_o.config, "Aero config name (default: the car file's first)");
  fit->add_option("--model", fit_o.model, "point-mass or axle (default: the car file's)");
  fit->add_option("--threads", fit_o.threads, "Laps solved at once (default: all cores)")
      ->check(CLI::Range(0, 256));
  fit->add_option("--out", fit_o.out, "Folder for fit.json and car.yaml (the fitted car)");
  add_air(fit, fit_o.air);
  fit->footer(
      "Example:\n  lapwing fit --car cars/pellion-fr2.yaml --track "
      "tracks/brannock-park-survey.yaml "
      "--log logs/brannock-park-survey-lap.csv --distance distance_m --speed speed_kph --config "
      "medium --free grip,power,cda --out out/fit");

  cli::SweepOptions sweep_o;
  // The command as typed, stored with the results, without --threads: the store's bytes do not
  // depend on the thread count (README, "Sweep"). Each word quoted where a shell needs it
  // (--temperature '35 C'), so that the command stored runs again as it stands.
  for (int i = 0; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--threads") {
      ++i;
      continue;
    }
    if (a.rfind("--threads=", 0) == 0) continue;
    sweep_o.command += (sweep_o.command.empty() ? "" : " ") + shell_word(a);
  }
  auto* sweep = app.add_subcommand(
      "sweep", "Laps over any values of the car (a grid or samples) into an SQLite results store");
  sweep->add_option("--car", sweep_o.car, "Car file (YAML)");
  sweep->add_option("--track", sweep_o.tracks, "Track file(s) (YAML)");
  sweep->add_option("--set", sweep_o.sets,
                    "KEY=VALUES: a car key path or a wing family, a list a,b,c or a range "
                    "start:stop:count with units (repeat for more sets)");
  sweep->add_option("--config", sweep_o.configs,
                    "Config name(s) (default: the swept families', else the car file's first)");
  sweep->add_option("--design", sweep_o.design, "grid (default), lhs:N or sobol:N");
  sweep->add_option("--shard", sweep_o.shard, "Run shard K of N of the points (K/N; default 1/1)");
  sweep->add_option("--model", sweep_o.model, "point-mass or axle (default: the car file's)");
  sweep->add_option("--threads", sweep_o.threads, "Laps solved at once (default: all cores)")
      ->check(CLI::Range(0, 256));
  sweep->add_option("--out", sweep_o.out,
                    "Results store (SQLite) to create, or to resume when it holds this study");
  add_air(sweep, sweep_o.air);
  sweep->footer(
      "Example:\n  lapwing sweep --car cars/pellion-fr2.yaml --track tracks/cairnholt.yaml "
      "--set front_flap=7deg:22deg:16 --set mass=620kg:680kg:4 --out out/flap.sqlite\n"
      "Also: lapwing sweep merge OUT.sqlite IN.sqlite ...   lapwing sweep export FILE.sqlite "
      "--csv OUT.csv");
  cli::SweepMergeOptions merge_o;
  auto* merge = sweep->add_subcommand("merge", "Join results stores of one study (shards)");
  merge->add_option("OUT", merge_o.out, "Results store to write (or add to)")->required();
  merge->add_option("IN", merge_o.inputs, "Results stores to join")->required();
  merge->footer("Example:\n  lapwing sweep merge out/all.sqlite out/shard-*.sqlite");
  cli::SweepExportOptions export_o;
  auto* exp = sweep->add_subcommand("export", "Write a results store's laps table as CSV");
  exp->add_option("FILE", export_o.file, "Results store")->required();
  exp->add_option("--csv", export_o.csv, "CSV file to write")->required();
  exp->footer("Example:\n  lapwing sweep export out/all.sqlite --csv out/all.csv");

  if (const auto msg = check_command_line(app, argc, argv)) {
    std::cerr << "lapwing: error: " << printable(*msg) << "\n";
    return 2;
  }
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    // Help and version print and succeed; anything else is a usage error in one line.
    if (e.get_exit_code() == static_cast<int>(CLI::ExitCodes::Success)) return app.exit(e);
    std::cerr << "lapwing: error: " << printable(e.what()) << " (see lapwing --help)\n";
    return 2;
  }

  try {
    // Every file the command reads is recorded, and no output may replace one (io/input_file.hpp).
    const InputLedger inputs;
    if (*check) return cli::check(check_o);
    if (*run) return cli::run(run_o);
    if (*compare) return cli::compare(compare_o);
    if (*trade) return cli::trade(trade_o);
    if (*from_log) return cli::track_from_log(log_o);
    if (*line) return cli::track_line(line_o);
    if (*correlate) return cli::correlate(corr_o);
    if (*fit) return cli::fit(fit_o);
    if (*merge) return cli::sweep_merge(merge_o);
    if (*exp) return cli::sweep_export(export_o);
    if (*sweep) return cli::sweep(sweep_o);
  } catch (const cli::UsageError& e) {
    std::cerr << "lapwing: error: " << printable(e.message) << "\n";
    return 2;
  } catch (const InputError& e) {
    std::cerr << e.what() << "\n";
    return 2;
  } catch (const InvalidInput& e) {
    // Bad input of no file the command loaded (the commands map the others to their place).
    std::cerr << e.what() << "\n";
    return 2;
  } catch (const OutputError& e) {
    std::cerr << "lapwing: error: " << printable(e.what()) << "\n";
    return 2;
  } catch (const CannotMove& e) {
    std::cerr << "lapwing: error: the car cannot complete the track: " << printable(e.what())
              << "\n";
    return 3;
  } catch (const cli::FitModuleMissing& e) {
    std::cerr << "lapwing: error: " << printable(e.what()) << "\n";
    return 1;
  } catch (const std::exception& e) {
    std::cerr << "lapwing: internal error: " << printable(e.what()) << "\n";
    return 1;
  }
  return 1;
}
