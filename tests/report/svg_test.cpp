// The SVG plot writer: scales, ticks, contour lines.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/report/svg.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("a known point maps to a known pixel") {
  svg::Plot p("t", "title", "x", "y", 860, 300);
  p.x_range(0.0, 1000.0);
  p.y_range(50.0, 250.0);
  const svg::Scale sx = p.x_scale(), sy = p.y_scale();
  // Plot area: x from margin_left to width - margin_right; y from height - margin_bottom (low
  // values) up to margin_top.
  CHECK(sx(0.0) == svg::margin_left);
  CHECK(sx(1000.0) == 860 - svg::margin_right);
  CHECK(near(sx(500.0), 0.5 * (svg::margin_left + 860 - svg::margin_right), 1e-12));
  CHECK(sy(50.0) == 300 - svg::margin_bottom);
  CHECK(sy(250.0) == svg::margin_top);
  CHECK(near(sy(150.0), 0.5 * (300 - svg::margin_bottom + svg::margin_top), 1e-12));
}

TEST_CASE("equal aspect keeps metres per pixel the same on both axes") {
  svg::Plot p("m", "map", "x", "y", 860, 520);
  p.add(svg::Series{"", {0.0, 1000.0}, {0.0, 100.0}, 0, false, 1.0});
  p.equal_aspect();
  const svg::Scale sx = p.x_scale(), sy = p.y_scale();
  const double mx = (sx.d1 - sx.d0) / (sx.p1 - sx.p0), my = (sy.d1 - sy.d0) / (sy.p0 - sy.p1);
  CHECK(near(mx, my, 1e-12));
}

TEST_CASE("ticks fall on 1-2-5 steps covering the range") {
  CHECK(svg::nice_ticks(0.0, 100.0, 5) == std::vector<double>{0, 20, 40, 60, 80, 100});
  const auto t = svg::nice_ticks(61.3, 87.9, 5);
  CHECK(t.front() >= 61.3);
  CHECK(t.back() <= 87.9);
  CHECK(near(t[1] - t[0], 10.0, 1e-12));  // the range / 5 = 5.3: the next 1-2-5 step up
}

TEST_CASE("contour segments of a plane lie on its level line") {
  // z = x + 2 y on a 5 x 4 grid: the level 3 is the line x + 2 y = 3.
  const std::vector<double> x{0, 1, 2, 3, 4}, y{0, 0.5, 1.0, 1.5};
  std::vector<double> z;
  for (double xi : x)
    for (double yj : y) z.push_back(xi + 2 * yj);
  const auto segs = svg::contour_segments(x, y, z, 3.0);
  REQUIRE_FALSE(segs.empty());
  for (const auto& s : segs) {
    CHECK(near(s[0] + 2 * s[1], 3.0, 1e-12));
    CHECK(near(s[2] + 2 * s[3], 3.0, 1e-12));
  }
}

TEST_CASE("the ramp runs dark to light; the palette repeats after eight") {
  CHECK(svg::ramp_colour(0.0) == "#23305c");
  CHECK(svg::ramp_colour(1.0) == "#f2e58a");
  CHECK(svg::series_colour(0) == svg::series_colour(8));
  CHECK(svg::escape("a<b & \"c\"") == "a&lt;b &amp; &quot;c&quot;");
}

TEST_CASE("a colour bar carries round numbers over its range, light at the end it is told") {
  // 61.3 .. 87.9 km/h: ticks every 10 (nice_ticks' 1-2-5 step above 26.6 / 5), each a number.
  const std::string b = svg::colour_bar("ramp", 0, 0, 14, 200, 61.3, 87.9, true, "speed (km/h)");
  CHECK(b.find(">70<") != std::string::npos);
  CHECK(b.find(">80<") != std::string::npos);
  CHECK(b.find(">60<") == std::string::npos);  // outside the range
  CHECK(b.find(">90<") == std::string::npos);
  CHECK(b.find("speed (km/h)") != std::string::npos);
  // Top stop (offset 100 %) is the light end when light stands for high, the dark end when not.
  CHECK(b.find("offset=\"100.0%\" stop-color=\"" + svg::ramp_colour(1.0)) != std::string::npos);
  const std::string r = svg::colour_bar("ramp", 0, 0, 14, 200, 63.0, 66.0, false, "lap time (s)");
  CHECK(r.find("offset=\"100.0%\" stop-color=\"" + svg::ramp_colour(0.0)) != std::string::npos);
}

TEST_CASE("a legend draws a point series as a point and a line series as a line") {
  svg::Plot p("l", "t", "x", "y");
  p.add(svg::Series{"marks", {1.0}, {1.0}, 2, true, 0.0, 4.0});
  p.add(svg::Series{"trace", {0.0, 1.0}, {0.0, 1.0}, 3, false, 1.6});
  p.key({"band", "<rect class=\"band\"/>"});
  const std::string s = p.render();
  const std::size_t marks = s.find(">marks<"), trace = s.find(">trace<");
  REQUIRE(marks != std::string::npos);
  REQUIRE(trace != std::string::npos);
  // Each entry is a group: its symbol, then its name.
  const std::size_t g1 = s.rfind("<g class=\"legend-entry\"", marks);
  const std::size_t g2 = s.rfind("<g class=\"legend-entry\"", trace);
  CHECK(s.substr(g1, marks - g1).find("<circle") != std::string::npos);
  CHECK(s.substr(g2, trace - g2).find("<line") != std::string::npos);
  CHECK(s.find("<rect class=\"band\"/>") != std::string::npos);
  // A long name is shortened, with the full name as a <title>.
  svg::Plot q("q", "t", "x", "y");
  q.add(svg::Series{"high_downforce_twin_element_front_wing_c", {0, 1}, {0, 1}, 0});
  const std::string t = q.render();
  CHECK(t.find("<title>high_downforce_twin_element_front_wing_c</title>") != std::string::npos);
}

TEST_CASE("a bar chart marks the zero bar as the best and gives every other bar its value") {
  const std::string s =
      svg::bar_chart("b", "t", "delta (s)", {"track"}, {"a", "b", "c"}, {{0.297, 0.0, 1.751}});
  CHECK(s.find(">best<") != std::string::npos);
  CHECK(s.find("class=\"best-mark\"") != std::string::npos);
  CHECK(s.find(">+0.30<") != std::string::npos);  // two decimals where the largest is >= 1 s
  CHECK(s.find(">+1.75<") != std::string::npos);
}
