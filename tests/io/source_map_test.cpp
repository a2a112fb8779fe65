// Source maps: a violation's key path back to FILE:LINE:COL and the value's text as written,
// through aliases and data files; an InvalidInput placed by its subject.
#include <doctest/doctest.h>

#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/source_map.hpp"

using namespace lapwing;

namespace {
const char* yaml_text =
    "mass: 640 kg\n"                                                // line 1
    "tyres:\n"                                                      // line 2
    "  mu_lat: 3.5\n"                                               // line 3, value at column 11
    "powertrain:\n"                                                 // line 4
    "  power_curve: {rpm: [5000, 9000], power: [300 kW, -5 kW]}\n"  // line 5
    "centerline: {file: c.csv}\n";                                  // line 6
}  // namespace

TEST_CASE("a violation is placed at its value, with the value as the file wrote it") {
  const SourceMap map(parse_document(yaml_text, "car.yaml"));
  const InputError e =
      map.error(out_of_range("tyres.mu_lat", 3.5, Range{0.0, 3.0, true, false}, Quantity::number));
  CHECK(std::string(e.what()) ==
        "car.yaml:3:11: error: value 3.5 is out of range: must be (0, 3] (tyres.mu_lat)");
  CHECK(e.mark().line == 3);
  CHECK(e.mark().col == 11);
  // The text as written, not the SI value: 640 kg stays "640 kg".
  const InputError m = map.error(out_of_range("mass", 640.0, Range{0.0, 100.0}, Quantity::mass));
  CHECK(m.message() == "value 640 kg is out of range: must be [0, 100] in SI units");
}

TEST_CASE("a key the file leaves to its default is placed at the map that holds it") {
  const SourceMap map(parse_document(yaml_text, "car.yaml"));
  CHECK(map.mark("tyres.mu_long").line == 3);  // the tyres map starts with its first key
  CHECK(map.mark("tyres").line == 3);
  CHECK(map.mark("nowhere.at.all").line == 1);  // the root
  CHECK(map.error(broken_rule("", "the whole file")).key_path().empty());
}

TEST_CASE("an alias puts the model's torque curve at the file's power curve") {
  SourceMap map(parse_document(yaml_text, "car.yaml"));
  map.alias("powertrain.torque_curve", "powertrain.power_curve");
  map.alias("powertrain.torque_curve.torque", "powertrain.power_curve.power");
  CHECK(map.file_path("powertrain.torque_curve.rpm[1]") == "powertrain.power_curve.rpm[1]");
  CHECK(map.file_path("powertrain.torque_curve.torque[1]") == "powertrain.power_curve.power[1]");
  CHECK(map.file_path("powertrain.torque_curves") == "powertrain.torque_curves");  // not under
  const InputError e = map.error(
      out_of_range("powertrain.torque_curve.torque[1]", -5.3, non_negative(), Quantity::torque));
  CHECK(std::string(e.what()) ==
        "car.yaml:5:52: error: value -5 kW is out of range: must be >= 0 in SI units "
        "(powertrain.power_curve.power[1])");
  // An order violation takes both items' text.
  const InputError o = map.error(
      out_of_order("powertrain.torque_curve.rpm", std::vector<double>{2.0, 1.0}, 1, true));
  CHECK(o.message() == "values must be strictly increasing (item 1: 9000 after 5000)");
}

TEST_CASE("a data point named in a rule becomes its data file and line") {
  SourceMap map(parse_document(yaml_text, "track.yaml"));
  map.data("centerline", "c.csv", {2, 3, 7});
  Violation v = broken_rule("centerline", "its last point ({point}) is far from its first");
  v.point = "centerline.points[2]";
  v.point_text = "data point 3 of c.csv";
  const InputError e = map.error(v);
  CHECK(std::string(e.what()) ==
        "track.yaml:6:13: error: its last point (c.csv line 7) is far from its first (centerline)");
  // Without the map, the library's words.
  CHECK(v.message() == "its last point (data point 3 of c.csv) is far from its first");
}

TEST_CASE("an InvalidInput is placed in the file of its subject, or said without a position") {
  SourceMaps maps;
  maps.add(SourceMap(parse_document(yaml_text, "car.yaml")));
  const InvalidInput found("car.yaml", broken_rule("mass", "too heavy"));
  CHECK(std::string(maps.error(found).what()) == "car.yaml:1:7: error: too heavy (mass)");
  const InvalidInput other("other.yaml", broken_rule("mass", "too heavy"));
  CHECK(std::string(maps.error(other).what()) == "other.yaml: error: too heavy (mass)");
  CHECK(std::string(other.what()) == "other.yaml: error: too heavy (mass)");
}

TEST_CASE("a key path's last index is read only from digits in brackets") {
  CHECK(last_index("x_m[12]") == std::size_t{12});
  CHECK(last_index("a.b[3][40]") == std::size_t{40});
  CHECK_FALSE(last_index("x_m[]").has_value());
  CHECK_FALSE(last_index("x_m[1a]").has_value());
  CHECK_FALSE(last_index("x_m").has_value());
  // A malformed point names no line: the library's words stay.
  SourceMap map(parse_document(yaml_text, "track.yaml"));
  map.data("centerline", "c.csv", {2, 3, 7});
  Violation v = broken_rule("centerline", "point ({point})");
  v.point = "centerline.points[x]";
  v.point_text = "somewhere";
  CHECK(map.error(v).message() == "point (somewhere)");
  v.point = "centerline.points[9]";  // beyond the data
  CHECK(map.error(v).message() == "point (somewhere)");
}
