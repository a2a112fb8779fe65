// Reading a car file (README, "Car") into a Car.
#pragma once

#include <string>

#include "lapwing/io/source_map.hpp"
#include "lapwing/model/car.hpp"

namespace lapwing {

/// A car read from its file, with where each of its values stands in the file.
struct CarFile {
  Car car;
  SourceMap sources;
};

/// Reads a car file and checks it (Car::validate). Throws InputError at the place of the first
/// problem: FILE:LINE:COL: error: ... (key.path).
CarFile read_car_file(const std::string& file);

/// The car alone.
Car load_car(const std::string& file);

}  // namespace lapwing
