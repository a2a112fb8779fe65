#include "lapwing/report/svg.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

#include "lapwing/base/format.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing::svg {

namespace {

// Pixel coordinates to 0.1 px: enough for a screen, small files, same bytes every time.
void add_num(std::string& o, double v) {
  append_fixed(o, std::abs(v) < 0.05 ? 0.0 : v, 1);
}
std::string num(double v) {
  std::string s;
  add_num(s, v);
  return s;
}

std::string tick_text(double v, double step) {
  const int decimals = step >= 1.0 ? 0 : static_cast<int>(std::ceil(-std::log10(step) - 1e-9));
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.*f", std::max(0, decimals),
                std::abs(v) < step * 1e-9 ? 0.0 : v);
  return buf;
}

double tick_step(double lo, double hi, int count) {
  const double raw = (hi - lo) / std::max(1, count);
  const double mag = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (raw <= m * mag) return m * mag;
  return 10.0 * mag;
}

}  // namespace

std::vector<double> nice_ticks(double lo, double hi, int count) {
  if (!(hi > lo)) return {lo};
  const double step = tick_step(lo, hi, count);
  std::vector<double> t;
  for (double v = std::ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step)
    t.push_back(std::abs(v) < step * 1e-9 ? 0.0 : v);
  return t;
}

const std::string& series_colour(std::size_t i) {
  // Okabe & Ito's colour-universal-design hues, reordered for lines on white.
  static const std::string palette[] = {"#0072B2", "#D55E00", "#009E73", "#CC79A7",
                                        "#E69F00", "#56B4E9", "#000000", "#B8A200"};
  return palette[i % 8];
}

std::string ramp_colour(double t) {
  t = std::clamp(t, 0.0, 1.0);
  const double stops[3][3] = {{35, 48, 92}, {42, 127, 138}, {242, 229, 138}};
  const Bracket b = even_bracket(t * 2.0, 2);
  auto channel = [&](int c) {
    return static_cast<int>(std::lround(lerp(stops[b.i][c], stops[b.i + 1][c], b.w)));
  };
  char buf[8];
  std::snprintf(buf, sizeof buf, "#%02x%02x%02x", channel(0), channel(1), channel(2));
  return buf;
}

std::string escape(const std::string& s) {
  std::string o;
  for (char c : s) {
    switch (c) {
      case '&':
        o += "&amp;";
        break;
      case '<':
        o += "&lt;";
        break;
      case '>':
        o += "&gt;";
        break;
      case '"':
        o += "&quot;";
        break;
      default:
        o += c;
    }
  }
  return o;
}

std::string text_with_title(const std::string& text, std::size_t max) {
  const std::string shown = shorten_middle(text, max);
  return escape(shown) + (shown == text ? std::string() : "<title>" + escape(text) + "</title>");
}

std::string legend_symbol(const Series& s) {
  const std::string& c = series_colour(s.colour);
  if (s.points)
    return "<circle cx=\"8\" cy=\"5\" r=\"" + num(std::max(s.radius, 2.5)) + "\" fill=\"" + c +
           "\" fill-opacity=\"" + (s.radius > 2.0 ? "0.9" : "0.45") + "\"/>";
  return "<line x1=\"0\" y1=\"5\" x2=\"16\" y2=\"5\" stroke=\"" + c + "\" stroke-width=\"" +
         num(std::max(s.width, 1.0)) + "\" stroke-opacity=\"" + num(s.opacity) + "\"/>";
}

std::string colour_bar(const std::string& id, double x, double y, double width, double height,
                       double lo, double hi, bool light_high, const std::string& title) {
  // A gradient through the ramp's stops (the ramp is piecewise linear in three stops, so 11
  // stops reproduce it), top = hi.
  std::string o =
      "<defs><linearGradient id=\"" + escape(id) + "\" x1=\"0\" y1=\"1\" x2=\"0\" y2=\"0\">";
  for (int k = 0; k <= 10; ++k) {
    const double f = k / 10.0;  // 0 at the bottom (lo), 1 at the top (hi)
    o += "<stop offset=\"" + num(100 * f) + "%\" stop-color=\"" +
         ramp_colour(light_high ? f : 1.0 - f) + "\"/>";
  }
  o += "</linearGradient></defs>";
  o += "<text class=\"legend\" x=\"" + num(x) + "\" y=\"" + num(y - 8) + "\">" + escape(title) +
       "</text>";
  o += "<rect class=\"colour-bar\" x=\"" + num(x) + "\" y=\"" + num(y) + "\" width=\"" +
       num(width) + "\" height=\"" + num(height) + "\" fill=\"url(#" + escape(id) + ")\"/>";
  if (hi > lo) {
    const auto t = nice_ticks(lo, hi, 5);
    const double step = t.size() > 1 ? t[1] - t[0] : hi - lo;
    for (double v : t) {
      const double py = y + height * (hi - v) / (hi - lo);
      o += "<line class=\"bar-tick\" x1=\"" + num(x + width) + "\" y1=\"" + num(py) + "\" x2=\"" +
           num(x + width + 4) + "\" y2=\"" + num(py) + "\"/><text class=\"tick\" x=\"" +
           num(x + width + 7) + "\" y=\"" + num(py + 4) + "\">" + tick_text(v, step) + "</text>";
    }
  }
  return o + "\n";
}

Plot::Plot(std::string id, std::string title, std::string x_title, std::string y_title, int width,
           int height)
    : id_(std::move(id)),
      title_(std::move(title)),
      x_title_(std::move(x_title)),
      y_title_(std::move(y_title)),
      width_(width),
      height_(height) {}

void Plot::fit() const {
  if (fitted_) return;
  fitted_ = true;
  double x0 = std::numeric_limits<double>::infinity(), x1 = -x0, y0 = x0, y1 = -x0;
  for (const auto& s : series_)
    for (std::size_t i = 0; i < s.x.size(); ++i) {
      x0 = std::min(x0, s.x[i]);
      x1 = std::max(x1, s.x[i]);
      y0 = std::min(y0, s.y[i]);
      y1 = std::max(y1, s.y[i]);
    }
  if (!std::isfinite(x0)) x0 = 0, x1 = 1, y0 = 0, y1 = 1;
  if (!(x1 > x0)) x0 -= 0.5, x1 += 0.5;
  if (!(y1 > y0)) y0 -= 0.5, y1 += 0.5;
  if (!fixed_x_) xr_ = {x0, x1};
  if (!fixed_y_) {
    // Round out to the ticks.
    const double step = tick_step(y0, y1, 5);
    yr_ = {std::floor(y0 / step) * step, std::ceil(y1 / step) * step};
  }
  if (equal_) {
    const double pw = width_ - margin_left - margin_right,
                 ph = height_ - margin_top - margin_bottom;
    const double sx = (xr_.second - xr_.first) / pw, sy = (yr_.second - yr_.first) / ph;
    if (sx > sy) {
      const double c = 0.5 * (yr_.first + yr_.second), h = 0.5 * sx * ph;
      yr_ = {c - h, c + h};
    } else {
      const double c = 0.5 * (xr_.first + xr_.second), h = 0.5 * sy * pw;
      xr_ = {c - h, c + h};
    }
  }
}

Scale Plot::x_scale() const {
  fit();
  return {xr_.first, xr_.second, static_cast<double>(margin_left),
          static_cast<double>(width_ - margin_right)};
}

Scale Plot::y_scale() const {
  fit();
  return {yr_.first, yr_.second, static_cast<double>(height_ - margin_bottom),
          static_cast<double>(margin_top)};
}

std::string Plot::render() const {
  const Scale sx = x_scale(), sy = y_scale();
  const std::string w = std::to_string(width_), h = std::to_string(height_);
  std::string o = "<svg id=\"" + escape(id_) + "\" class=\"plot\" width=\"" + w + "\" height=\"" +
                  h + "\" viewBox=\"0 0 " + w + " " + h + "\" role=\"img\" aria-label=\"" +
                  escape(title_) + "\">\n";
  o += "<title>" + escape(title_) + "</title>\n";
  o += "<defs><clipPath id=\"" + escape(id_) + "-clip\"><rect x=\"" + num(sx.p0) + "\" y=\"" +
       num(sy.p1) + "\" width=\"" + num(sx.p1 - sx.p0) + "\" height=\"" + num(sy.p0 - sy.p1) +
       "\"/></clipPath></defs>\n";
  o += "<text class=\"plot-title\" x=\"" + num(sx.p0) + "\" y=\"18\">" + escape(title_) +
       "</text>\n";
  // Grid and ticks.
  o += "<g class=\"grid\">\n";
  const auto xt = hide_x_ticks_ ? std::vector<double>{} : nice_ticks(xr_.first, xr_.second, 8);
  const auto yt = nice_ticks(yr_.first, yr_.second, 5);
  const double xstep = xt.size() > 1 ? xt[1] - xt[0] : 1.0,
               ystep = yt.size() > 1 ? yt[1] - yt[0] : 1.0;
  for (double v : xt)
    o += "<line x1=\"" + num(sx(v)) + "\" y1=\"" + num(sy.p0) + "\" x2=\"" + num(sx(v)) +
         "\" y2=\"" + num(sy.p1) + "\"/><text class=\"tick\" x=\"" + num(sx(v)) + "\" y=\"" +
         num(sy.p0 + 15) + "\" text-anchor=\"middle\">" + tick_text(v, xstep) + "</text>\n";
  for (double v : yt)
    o += "<line x1=\"" + num(sx.p0) + "\" y1=\"" + num(sy(v)) + "\" x2=\"" + num(sx.p1) +
         "\" y2=\"" + num(sy(v)) + "\"/><text class=\"tick\" x=\"" + num(sx.p0 - 6) + "\" y=\"" +
         num(sy(v) + 4) + "\" text-anchor=\"end\">" + tick_text(v, ystep) + "</text>\n";
  o += "</g>\n";
  o += "<rect class=\"frame\" fill=\"none\" x=\"" + num(sx.p0) + "\" y=\"" + num(sy.p1) +
       "\" width=\"" + num(sx.p1 - sx.p0) + "\" height=\"" + num(sy.p0 - sy.p1) + "\"/>\n";
  o += "<g clip-path=\"url(#" + escape(id_) + "-clip)\">\n" + underlay_;
  for (const auto& s : series_) {
    const std::string& c = series_colour(s.colour);
    if (s.points) {
      o += "<g fill=\"" + c + "\" fill-opacity=\"" + (s.radius > 2.0 ? "0.9" : "0.45") + "\">";
      const std::string radius = num(s.radius);
      for (std::size_t i = 0; i < s.x.size(); ++i) {
        o += "<circle cx=\"";
        add_num(o, sx(s.x[i]));
        o += "\" cy=\"";
        add_num(o, sy(s.y[i]));
        o += "\" r=\"";
        o += radius;
        o += "\"/>";
      }
      o += "</g>\n";
    } else {
      o += "<polyline fill=\"none\" stroke=\"" + c + "\" stroke-width=\"" + num(s.width) +
           (s.opacity < 1.0 ? "\" stroke-opacity=\"" + num(s.opacity) : std::string()) +
           "\" stroke-linejoin=\"round\" points=\"";
      for (std::size_t i = 0; i < s.x.size(); ++i) {
        if (i) o += ' ';
        add_num(o, sx(s.x[i]));
        o += ',';
        add_num(o, sy(s.y[i]));
      }
      o += "\"/>\n";
    }
  }
  for (const auto& m : markers_)
    o += "<line class=\"marker\" x1=\"" + num(sx(m.x)) + "\" y1=\"" + num(sy.p0) + "\" x2=\"" +
         num(sx(m.x)) + "\" y2=\"" + num(sy.p1) + "\"/><text class=\"marker-text\" x=\"" +
         num(sx(m.x)) + "\" y=\"" + num(sy.p1 + 11) + "\" text-anchor=\"middle\">" +
         escape(m.text) + "</text>\n";
  for (const auto& l : labels_)
    o += "<text class=\"label\" x=\"" + num(sx(l.x)) + "\" y=\"" + num(sy(l.y)) +
         "\" text-anchor=\"middle\">" + escape(l.text) + "</text>\n";
  o += "</g>\n";
  // Legend, right of the plot area.
  // Legend, right of the plot area: each entry's symbol as it is drawn in the plot.
  double ly = sy.p1 + 4;
  auto entry = [&](const std::string& name, const std::string& symbol) {
    o += "<g class=\"legend-entry\" transform=\"translate(" + num(sx.p1 + 12) + " " + num(ly) +
         ")\">" + symbol + "<text class=\"legend\" x=\"22\" y=\"9\">" +
         text_with_title(name, legend_chars) + "</text></g>\n";
    ly += 16;
  };
  for (const auto& s : series_)
    if (!s.name.empty() && s.in_legend) entry(s.name, legend_symbol(s));
  for (const auto& k : keys_) entry(k.name, k.symbol);
  o += "<text class=\"axis-title\" x=\"" + num(0.5 * (sx.p0 + sx.p1)) + "\" y=\"" +
       num(height_ - 8) + "\" text-anchor=\"middle\">" + escape(x_title_) + "</text>\n";
  o += "<text class=\"axis-title\" transform=\"translate(16 " + num(0.5 * (sy.p0 + sy.p1)) +
       ") rotate(-90)\" text-anchor=\"middle\">" + escape(y_title_) + "</text>\n";
  o += overlay_;
  o += "</svg>\n";
  return o;
}

std::string bar_chart(const std::string& id, const std::string& title, const std::string& y_title,
                      const std::vector<std::string>& groups, const std::vector<std::string>& bars,
                      const std::vector<std::vector<double>>& values, int width, int height) {
  Plot p(id, title, "", y_title, width, height);
  double top = 0.0;
  for (const auto& g : values)
    for (double v : g) top = std::max(top, v);
  p.x_range(0.0, static_cast<double>(groups.size()));
  p.y_range(0.0, top > 0 ? top * 1.15 : 1.0);  // room for the values above the bars
  const Scale sx = p.x_scale(), sy = p.y_scale();
  std::string cells, labels;
  const double group_w = (sx.p1 - sx.p0) / std::max<std::size_t>(1, groups.size());
  const double bar_w = 0.8 * group_w / std::max<std::size_t>(1, bars.size());
  // Values above the bars where a bar is wide enough for "+0.00" at 10 px, upright otherwise.
  const bool upright = bar_w >= 30.0;
  for (std::size_t g = 0; g < groups.size(); ++g) {
    for (std::size_t b = 0; b < bars.size() && b < values[g].size(); ++b) {
      const double x = sx.p0 + g * group_w + 0.1 * group_w + b * bar_w;
      const double v = values[g][b];
      const double y = sy(v);
      const double cx = x + 0.45 * bar_w;
      const std::string tip = "<title>" + escape(groups[g] + ", " + bars[b]) + "</title>";
      if (v > 0.0) {
        cells += "<rect x=\"" + num(x) + "\" y=\"" + num(y) + "\" width=\"" + num(bar_w * 0.9) +
                 "\" height=\"" + num(sy.p0 - y) + "\" fill=\"" + series_colour(b) + "\">" + tip +
                 "</rect>\n";
        char buf[32];
        std::snprintf(buf, sizeof buf, "+%.*f", top >= 1.0 ? 2 : 3, v);
        labels += upright ? "<text class=\"bar-value\" x=\"" + num(cx) + "\" y=\"" + num(y - 4) +
                                "\" text-anchor=\"middle\">" + buf + "</text>\n"
                          : "<text class=\"bar-value\" transform=\"translate(" + num(cx + 3) + " " +
                                num(y - 4) + ") rotate(-90)\">" + buf + "</text>\n";
      } else {
        // The best: no height to show, so a marked foot and the word.
        cells += "<rect class=\"best-bar\" x=\"" + num(x) + "\" y=\"" + num(sy.p0 - 4) +
                 "\" width=\"" + num(bar_w * 0.9) + "\" height=\"4\" fill=\"" + series_colour(b) +
                 "\">" + tip + "</rect>\n";
        labels += "<path class=\"best-mark\" d=\"M" + num(cx - 5) + " " + num(sy.p0 - 14) + " L" +
                  num(cx + 5) + " " + num(sy.p0 - 14) + " L" + num(cx) + " " + num(sy.p0 - 6) +
                  " Z\" fill=\"" + series_colour(b) + "\"/>";
        labels += upright ? "<text class=\"bar-best\" x=\"" + num(cx) + "\" y=\"" +
                                num(sy.p0 - 18) + "\" text-anchor=\"middle\">best</text>\n"
                          : "<text class=\"bar-best\" transform=\"translate(" + num(cx + 4) + " " +
                                num(sy.p0 - 18) + ") rotate(-90)\">best</text>\n";
      }
    }
    // The group's name, shortened to the group's width (about 6.5 px a character at 11 px).
    const auto fits = static_cast<std::size_t>(std::max(4.0, group_w / 6.5));
    labels += "<text class=\"tick\" x=\"" + num(sx.p0 + (g + 0.5) * group_w) + "\" y=\"" +
              num(sy.p0 + 15) + "\" text-anchor=\"middle\">" + text_with_title(groups[g], fits) +
              "</text>\n";
  }
  p.underlay(cells);
  p.overlay(labels);
  p.hide_x_ticks();
  for (std::size_t b = 0; b < bars.size(); ++b)
    p.key({bars[b],
           "<rect x=\"2\" y=\"0\" width=\"12\" height=\"10\" fill=\"" + series_colour(b) + "\"/>"});
  return p.render();
}

std::vector<std::array<double, 4>> contour_segments(const std::vector<double>& x,
                                                    const std::vector<double>& y,
                                                    const std::vector<double>& z, double level) {
  std::vector<std::array<double, 4>> out;
  const std::size_t nx = x.size(), ny = y.size();
  auto at = [&](std::size_t i, std::size_t j) { return z[i * ny + j]; };
  // Point where the level crosses the edge from (xa, ya, za) to (xb, yb, zb).
  auto cross = [level](double xa, double ya, double za, double xb, double yb, double zb) {
    const double t = (level - za) / (zb - za);
    return std::array<double, 2>{lerp(xa, xb, t), lerp(ya, yb, t)};
  };
  for (std::size_t i = 0; i + 1 < nx; ++i)
    for (std::size_t j = 0; j + 1 < ny; ++j) {
      // Corners counter-clockwise: (i,j) (i+1,j) (i+1,j+1) (i,j+1).
      const double xs[4] = {x[i], x[i + 1], x[i + 1], x[i]};
      const double ys[4] = {y[j], y[j], y[j + 1], y[j + 1]};
      const double zs[4] = {at(i, j), at(i + 1, j), at(i + 1, j + 1), at(i, j + 1)};
      std::vector<std::array<double, 2>> pts;
      for (int e = 0; e < 4; ++e) {
        const int f = (e + 1) % 4;
        if ((zs[e] < level) != (zs[f] < level))
          pts.push_back(cross(xs[e], ys[e], zs[e], xs[f], ys[f], zs[f]));
      }
      // Two crossings: one segment; four (a saddle): pair them in edge order.
      for (std::size_t k = 0; k + 1 < pts.size(); k += 2)
        out.push_back({pts[k][0], pts[k][1], pts[k + 1][0], pts[k + 1][1]});
    }
  return out;
}

}  // namespace lapwing::svg
