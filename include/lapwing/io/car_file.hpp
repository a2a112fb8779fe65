// Reading a car file (README, the car file) into a Car.
#pragma once

#include <string>

#include "lapwing/model/car.hpp"

namespace lapwing {

/// Loads and validates a car file. Throws InputError.
Car load_car(const std::string& file);

}  // namespace lapwing
