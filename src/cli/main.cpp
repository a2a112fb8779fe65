// lapwing's command line: parses options (CLI11), calls the commands, maps failures to exit
// codes: 0 success, 1 internal fault, 2 bad input or usage, 3 a car that cannot move.
#include <CLI/CLI.hpp>

#include <iostream>

#include "commands.hpp"
#include "lapwing/error.hpp"
#include "lapwing/report.hpp"

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
      "Example:\n  lapwing check --car cars/tern-fr.yaml --track tracks/kestrel-park.yaml");

  cli::RunOptions run_o;
  auto* run = app.add_subcommand("run", "Simulate one lap of one track with one aero config");
  run->add_option("--car", run_o.car, "Car file (YAML)")->required();
  run->add_option("--track", run_o.track, "Track file (YAML)")->required();
  run->add_option("--config", run_o.config, "Aero config name (default: the car file's first)");
  run->add_option("--out", run_o.out,
                  "Folder for summary.json, trace-TRACK-CONFIG.csv and corners.csv");
  add_air(run, run_o.air);
  run->footer(
      "Example:\n  lapwing run --car cars/tern-fr.yaml --track tracks/kestrel-park.yaml "
      "--config high --out out/kestrel-high");

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  }

  try {
    if (*check) return cli::check(check_o);
    if (*run) return cli::run(run_o);
  } catch (const cli::UsageError& e) {
    std::cerr << "lapwing: error: " << e.message << "\n";
    return 2;
  } catch (const InputError& e) {
    std::cerr << e.what() << "\n";
    return 2;
  } catch (const CannotMove& e) {
    std::cerr << "lapwing: error: the car cannot complete the track: " << e.what() << "\n";
    return 3;
  } catch (const std::exception& e) {
    std::cerr << "lapwing: internal error: " << e.what() << "\n";
    return 1;
  }
  return 1;
}
