// Reading a car file (README, "Car") into a Car.
#pragma once

#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/io/document.hpp"

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

/// Reads a car from a parsed car file (one with values set by a sweep, say), as read_car_file.
CarFile read_car_document(const Document& doc);
/// The same with the document kept by the car's SourceMap, which indexes its key paths only
/// when a position or a text is asked for (an error): a sweep reads a car for every point and
/// keeps none of its positions (the index was some 450 000 instructions a car, measured).
CarFile read_car_document(std::shared_ptr<const Document> doc);

/// The key path a sweep's key names in this car file: a wing family's name (README, "Wing
/// families") stands for its setting, "aero.families.NAME.at"; any other key is a key path as
/// given ("mass", "tyres.mu_lat", "powertrain.gears[2]", "aero.configs.medium.cla").
std::string car_key_path(const Document& doc, std::string_view key);

/// Sets the value at `key_path` to the scalar `text` ("620 kg"), as if the file said so: an
/// existing scalar's text is replaced (its place in the file kept, for errors); a key missing
/// from a map that exists is added there (the car loader then checks that the key is one of the
/// schema's, with "did you mean"). A path through a map or list the file does not have, or to a
/// map or a list, is an InputError naming the key path (with the nearest key, "did you mean").
void set_car_value(Document& doc, std::string_view key_path, const std::string& text);

/// The text of car file `file` with `edits` applied in place (README, "Correlating with your
/// data", `fit --out`): each number keeps its unit and its place, comments and layout stay; a
/// path to a list (or a list of lists) edits every number in it. `powertrain.torque_curve.torque`
/// edits `power_curve.power` in a file that gives power. Numbers are written to 6 significant
/// digits. InputError for a path the file does not hold, or a value that is not a number.
std::string edited_car_text(const std::string& file, const std::vector<CarValueEdit>& edits);

/// The index of the config named `name` in `car` (the first config when `name` is empty). An
/// unknown name is an InvalidInput of the car's file (key path aero.configs, which the car's
/// SourceMap places at its line) with the nearest name, case aside ("did you mean"), and the
/// list of the car's configs.
std::size_t pick_config(const Car& car, const std::string& name);

/// The car alone.
Car load_car(const std::string& file);

}  // namespace lapwing
