// Fuzz target: the car loader (io/car_file.hpp). A car it accepts must keep every rule of the
// model (Car::validate() finds nothing): the loader may not let through what the library would
// refuse.
#include "fuzz_support.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/model/car.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace lapwing;
  const std::string file = fuzz::as_file(data, size, "car.yaml");
  fuzz::input_errors_only([&] {
    const Car car = load_car(file);
    if (const auto v = car.validate()) fuzz::finding("accepted a car that breaks " + v->message());
  });
  return 0;
}
