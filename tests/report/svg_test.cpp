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
