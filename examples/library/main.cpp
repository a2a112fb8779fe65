// One lap with lapwing as a library: lap_time CAR TRACK CONFIG.
//
// Does what `lapwing run --car CAR --track TRACK --config CONFIG` does for the lap time: reads the
// car and the track, lays the track out in the track's own air, and solves one lap of the car with
// that aero config in the car's vehicle model (the one the car file names, else the library's
// default: no model is chosen here, exactly as `run` without --model chooses none). Prints what
// it ran, then the lap time in seconds at full precision, the shortest text that reads back to
// the same double, as the last line. Exit codes as lapwing's: 2 bad input, 3 a car that cannot
// complete the track.
#include <charconv>
#include <exception>
#include <iostream>
#include <string>

#include "lapwing/lapwing.hpp"

int main(int argc, char** argv) {
  if (argc != 4) {
    std::cerr << "usage: lap_time CAR TRACK CONFIG\n";
    return 2;
  }
  try {
    const lapwing::Car car = lapwing::load_car(argv[1]);
    const lapwing::Track track = lapwing::load_track(argv[2]);
    const int config = car.config_index(argv[3]);
    if (config < 0) {
      std::string names;
      for (const auto& n : car.config_names()) names += " " + n;
      std::cerr << "lap_time: no config named '" << argv[3] << "' (the car has" << names << ")\n";
      return 2;
    }
    // The track's air (ISO 2533 at its altitude, or its ambient), the mesh and the corners.
    const lapwing::Circuit circuit = lapwing::lay_out(track, lapwing::make_air(track.air));
    const lapwing::LapRun lap =
        lapwing::run_lap(car.configured(static_cast<std::size_t>(config)), circuit);

    std::cout << "car " << car.name << ", config " << lap.summary.config << ", "
              << (car.model == lapwing::VehicleModel::axle ? "axle" : "point-mass")
              << " model; track " << track.name << "\n";
    // std::to_chars without a precision: the shortest form that round-trips (C++17).
    char text[64];
    const auto end = std::to_chars(text, text + sizeof text, lap.summary.lap_time_s).ptr;
    std::cout << std::string(text, end) << "\n";
    return 0;
  } catch (const lapwing::InputError& e) {  // a file's error, at its place
    std::cerr << e.what() << "\n";
    return 2;
  } catch (const lapwing::InvalidInput& e) {  // a rule the library checks, by key path
    std::cerr << e.what() << "\n";
    return 2;
  } catch (const lapwing::CannotMove& e) {
    std::cerr << "lap_time: " << e.what() << "\n";
    return 3;
  } catch (const std::exception& e) {
    std::cerr << "lap_time: internal error: " << e.what() << "\n";
    return 1;
  }
}
