// A small SVG plot writer: linear scales, "nice" ticks, line and point series, labels, and
// contour lines. One look for every plot of the report: the palette, fonts and sizes live here.
#pragma once

#include <array>
#include <string>
#include <utility>
#include <vector>

namespace lapwing::svg {

/// A linear map from a data interval to a pixel interval.
struct Scale {
  double d0, d1, p0, p1;
  double operator()(double v) const { return p0 + (v - d0) * (p1 - p0) / (d1 - d0); }
};

/// Tick values covering [lo, hi] at a 1-2-5 step, about `count` of them.
std::vector<double> nice_ticks(double lo, double hi, int count);

/// The series colours: a colour-blind-safe qualitative palette (eight hues distinguishable in
/// the common forms of colour blindness), in order of use.
const std::string& series_colour(std::size_t i);
/// A sequential ramp for values 0..1 (dark blue through teal to light yellow: lightness rises
/// monotonically, readable in grey too).
std::string ramp_colour(double t);

/// XML text escape.
std::string escape(const std::string& s);

struct Series {
  std::string name;  // in the legend (shortened past legend_chars, the full name on hover)
  std::vector<double> x, y;
  std::size_t colour = 0;
  bool points = false;   // points (scatter) instead of a line
  double width = 1.6;    // line width
  double radius = 1.6;   // point radius
  double opacity = 1.0;  // of the line (points: 0.45 when small, 0.9 when marks)
  bool in_legend = true;
};

/// A legend entry that is not a series: its symbol as SVG in a 16 x 10 box with its top-left
/// corner at (0, 0), and its name.
struct Key {
  std::string name;
  std::string symbol;
};

/// Names in legends and on axes longer than this many code points are shortened in the
/// middle (text_table's shorten_middle), the full name in a <title> (shown on hover).
inline constexpr std::size_t legend_chars = 20;

/// `text` as SVG text content, shortened to `max` code points with the full text as a
/// <title> child when longer.
std::string text_with_title(const std::string& text, std::size_t max);

/// The symbol a series has in the legend: a line of its width and opacity, or a point of its
/// radius and opacity, in its colour.
std::string legend_symbol(const Series& s);

/// A vertical colour bar for the ramp: `lo` at the bottom, `hi` at the top, ticks at round
/// values with their numbers, and a title (with the unit) above. `light_high`: the light end
/// of the ramp stands for `hi` (else for `lo`). Drawn with its top-left corner at (x, y).
std::string colour_bar(const std::string& id, double x, double y, double width, double height,
                       double lo, double hi, bool light_high, const std::string& title);

struct Label {
  double x, y;  // data coordinates
  std::string text;
};

/// A plot with axes, ticks, axis titles, a legend and optional labels, rendered to one <svg>
/// element with the given id.
class Plot {
 public:
  Plot(std::string id, std::string title, std::string x_title, std::string y_title, int width = 860,
       int height = 300);

  void add(Series s) { series_.push_back(std::move(s)); }
  /// A legend entry that is not a series (a contour line, a band), after the series'.
  void key(Key k) { keys_.push_back(std::move(k)); }
  void label(double x, double y, std::string text) { labels_.push_back({x, y, std::move(text)}); }
  /// A vertical marker at x with a short text at the top (corner numbers along a trace).
  void marker(double x, std::string text) { markers_.push_back({x, 0.0, std::move(text)}); }
  void x_range(double lo, double hi) {
    xr_ = {lo, hi};
    fixed_x_ = true;
  }
  void y_range(double lo, double hi) {
    yr_ = {lo, hi};
    fixed_y_ = true;
  }
  /// Same data units per pixel on both axes (maps).
  void equal_aspect() { equal_ = true; }
  /// Raw SVG drawn inside the plot area before the series (heat cells, contour lines), given a
  /// function of the final scales.
  void underlay(std::string svg) { underlay_ += std::move(svg); }
  /// Raw SVG drawn after everything, unclipped (keys and labels in the margins).
  void overlay(std::string svg) { overlay_ += std::move(svg); }
  /// No ticks or grid lines along x (categorical axes).
  void hide_x_ticks() { hide_x_ticks_ = true; }

  Scale x_scale() const;
  Scale y_scale() const;
  std::string render() const;

 private:
  void fit() const;
  std::string id_, title_, x_title_, y_title_;
  int width_, height_;
  std::vector<Series> series_;
  std::vector<Label> labels_, markers_;
  std::vector<Key> keys_;
  std::string underlay_, overlay_;
  bool hide_x_ticks_ = false;
  mutable std::pair<double, double> xr_{0, 1}, yr_{0, 1};
  bool fixed_x_ = false, fixed_y_ = false, equal_ = false;
  mutable bool fitted_ = false;
};

/// Plot area margins (pixels), shared by every plot; the legend sits in the right margin.
inline constexpr int margin_left = 64, margin_right = 170, margin_top = 30, margin_bottom = 46;

/// A grouped bar chart: groups (e.g. tracks) of bars (e.g. configs), one value each. Each bar
/// carries its value above it; a bar of zero height (the best config on a track, against
/// which the others are measured) is drawn as a marked "best" at the baseline.
std::string bar_chart(const std::string& id, const std::string& title, const std::string& y_title,
                      const std::vector<std::string>& groups, const std::vector<std::string>& bars,
                      const std::vector<std::vector<double>>& values, int width = 860,
                      int height = 300);

/// Contour segments of a grid z[i][j] over axes x[i], y[j] at `level` (marching squares,
/// linear along cell edges): pairs of points (x0, y0, x1, y1).
std::vector<std::array<double, 4>> contour_segments(const std::vector<double>& x,
                                                    const std::vector<double>& y,
                                                    const std::vector<double>& z_row_major,
                                                    double level);

}  // namespace lapwing::svg
