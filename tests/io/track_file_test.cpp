// Track files: segments, grades, sectors, and their checks.
#include <doctest/doctest.h>

#include <fstream>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/source_map.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/study/circuit.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("bundled tracks load; arc length is R x angle; turns are signed") {
  const Track t = load_track(test::source_path("tracks/skidpad.yaml"));
  REQUIRE(t.segments.size() == 2);
  // Skid pad centre radius 9.125 m (student-formula rules, REFERENCES "Geometry").
  CHECK(near(t.segments[0].length_m, 2 * units::pi * 9.125, 1e-14));
  CHECK(near(t.segments[0].curvature_start_1pm, -1 / 9.125, 1e-14));  // right
  CHECK(near(t.segments[1].curvature_start_1pm, 1 / 9.125, 1e-14));   // left
  CHECK(t.closed);
  CHECK(t.id == "skidpad");
}

TEST_CASE("the acceleration run is 75 m from a standing start (student-formula rules)") {
  const Track t = load_track(test::source_path("tracks/acceleration.yaml"));
  CHECK_FALSE(t.closed);
  CHECK(t.length_m() == 75.0);
  CHECK(t.start_speed_mps == 0.0);
}

TEST_CASE("segment forms: straight as a length or a map with grade; clothoid radii") {
  const std::string path = "track_test_segments.yaml";
  {
    std::ofstream f(path);
    f << "format: 1\nname: t\nclosed: false\nsegments:\n"
         "  - straight: 100 m\n"
         "  - straight: {length: 50 m, grade: 4 %}\n"
         "  - clothoid: {length: 30 m, to_radius: 60 m, turn: left}\n"
         "  - clothoid: {length: 30 m, from_radius: 60 m, to_radius: 30 m, turn: right}\n";
  }
  const Track t = load_track(path);
  REQUIRE(t.segments.size() == 4);
  CHECK(t.segments[1].grade == doctest::Approx(0.04));
  CHECK(t.segments[2].curvature_start_1pm == 0.0);
  CHECK(near(t.segments[2].curvature_end_1pm, 1 / 60.0, 1e-15));
  CHECK(near(t.segments[3].curvature_end_1pm, -1 / 30.0, 1e-15));
  CHECK(t.sectors_m == std::vector<double>{0.0});
  std::remove(path.c_str());
}

TEST_CASE("widths: at track level, per segment; a line: key makes the line what is lapped") {
  const std::string path = "track_test_line.yaml";
  {
    std::ofstream f(path);
    f << "format: 1\nname: t\nclosed: false\nwidth: 12 m\nsegments:\n"
         "  - straight: 200 m\n"
         "  - arc: {radius: 30 m, angle: 90 deg, turn: left, width: 14 m}\n"
         "  - straight: {length: 200 m}\n"
         "sectors: [0 m, 350 m]\n";
  }
  const Track plain = load_track(path);
  CHECK(plain.width_m == 12.0);
  CHECK(plain.segments[1].width_m == 14.0);
  CHECK_FALSE(plain.segments[0].width_m);
  CHECK(plain.has_widths());
  CHECK_FALSE(plain.line_path);
  const Mesh m = build_mesh(plain, 1.0);
  // Half the width each side of the centerline.
  CHECK(m.width_left_m[100] == 6.0);
  CHECK(m.width_right_m[220] == 7.0);
  {
    std::ofstream f(path, std::ios::app);
    f << "line: {vehicle_width: 1.8 m, margin: 0.4 m}\n";
  }
  const Track lined = load_track(path);
  REQUIRE(lined.line);
  CHECK(lined.line->vehicle_width_m == 1.8);
  REQUIRE(lined.line_path);
  CHECK(lined.line_path->source == PathProfile::Source::line);
  // The line cuts the corner: shorter than the centerline's 400 + 15 pi m.
  CHECK(lined.length_m() < plain.length_m());
  // The sector start at 350 m of the centerline, after the corner, is where the line passes
  // it: before 350 m of the line's distance (it cut the corner) and after 330 m (by less: the
  // corner's centerline is 47 m long).
  const auto sectors = lapped_sectors_m(lined);
  REQUIRE(sectors.size() == 2);
  CHECK(sectors[1] < 350.0);
  CHECK(sectors[1] > 330.0);
  // What is lapped: the line's mesh, laid out from the line.
  const Mesh lm = build_mesh(lined, 0.5);
  CHECK(near(lm.length_m, lined.length_m(), 1e-12));
  std::remove(path.c_str());
}

TEST_CASE("a centerline's smoothing is auto unless a length is given") {
  const std::string path = "track_test_smoothing.yaml";
  for (const char* given : {"", ", smoothing: auto", ", smoothing: 25 m"}) {
    {
      std::ofstream f(path);
      f << "format: 1\nname: t\nclosed: true\ncenterline: {file: "
        << test::source_path("tracks/brannock-park-survey.csv") << given << "}\n";
    }
    const Track t = load_track(path);
    CAPTURE(given);
    REQUIRE(t.profile);
    const bool length_given = std::string(given).find("25 m") != std::string::npos;
    CHECK(t.profile->smoothing.automatic == !length_given);
    if (length_given) CHECK(t.profile->smoothing_m == 25.0);
  }
  std::remove(path.c_str());
}

TEST_CASE("a closure error found when the track is laid out names the data file's line") {
  // The mesh names the centerline's last point by its index; the track file's source map turns
  // it into the CSV's file and line, and the error into the track file's place of `centerline`.
  const std::string file = test::source_path("tests/data/bad/track-centerline-gap.yaml");
  const TrackFile t = read_track_file(file);
  SourceMaps maps;
  maps.add(t.sources);
  try {
    lay_out(t.track, make_air(t.track.air));
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.message().find("its last point (data point ") != std::string::npos);
    const InputError placed = maps.error(e);
    CHECK(placed.file() == file);
    CHECK(placed.mark().line == 5);
    CHECK(placed.key_path() == "centerline");
    CHECK(placed.message().find("its last point (" +
                                test::source_path("tests/data/bad/track-centerline-gap.csv") +
                                " line 254) is 955.3 m from its first") != std::string::npos);
  }
}

TEST_CASE("a centerline's source_verdict is read (good, usable or poor)") {
  const std::string path = "track_test_source_verdict.yaml";
  for (const char* given : {"", "good", "usable", "poor"}) {
    {
      std::ofstream f(path);
      f << "format: 1\nname: t\nclosed: true\ncenterline: {file: "
        << test::source_path("tracks/brannock-park-survey.csv")
        << (*given ? std::string(", source_verdict: ") + given : std::string()) << "}\n";
    }
    CAPTURE(given);
    const Track t = load_track(path);
    REQUIRE(t.profile);
    CHECK(t.profile->source_verdict == given);
  }
  std::remove(path.c_str());
}
