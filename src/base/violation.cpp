#include "lapwing/base/violation.hpp"

#include <cmath>

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

std::string join_path(std::string_view prefix, std::string_view path) {
  if (prefix.empty()) return std::string(path);
  if (path.empty()) return std::string(prefix);
  return std::string(prefix) + (path.front() == '[' ? "" : ".") + std::string(path);
}

std::optional<std::size_t> last_index(std::string_view path) {
  if (path.size() < 3 || path.back() != ']') return std::nullopt;
  const std::size_t open = path.rfind('[');
  if (open == std::string_view::npos || open + 2 > path.size() - 1) return std::nullopt;
  std::size_t i = 0;
  constexpr std::size_t most = std::numeric_limits<std::size_t>::max();
  for (const char c : path.substr(open + 1, path.size() - open - 2)) {
    if (c < '0' || c > '9') return std::nullopt;
    const auto d = static_cast<std::size_t>(c - '0');
    // An index beyond what a size_t holds is no item of any list (it wrapped round to a small
    // one: gears[18446744073709551617] was gears[1]): the largest, which no list reaches.
    if (i > (most - d) / 10) return most;
    i = 10 * i + d;
  }
  return i;
}

Violation& Violation::under(std::string_view prefix) {
  // A rule about the whole part (an empty field) names the part.
  field = join_path(prefix, field);
  if (!at.empty()) at = join_path(prefix, at);
  if (!point.empty()) point = join_path(prefix, point);
  return *this;
}

std::string Violation::message(const ValueText& text, std::string_view point_name) const {
  auto value_text = [&](const std::string& path, double v) {
    return text ? text(path, v) : format_readable(v);
  };
  switch (kind) {
    case Kind::range:
      return "value " + value_text(where(), value) + " is out of range: must be " + rule;
    case Kind::order:
      return "values must be strictly " + rule + " (item " + std::to_string(item) + ": " +
             value_text(where(), value) + " after " +
             value_text(field + "[" + std::to_string(item - 1) + "]", previous) + ")";
    case Kind::rule:
      break;
  }
  const std::size_t token = rule.find("{point}");
  if (token == std::string::npos) return rule;
  return rule.substr(0, token) + std::string(point_name.empty() ? point_text : point_name) +
         rule.substr(token + 7);
}

Violation out_of_range(std::string field, double value, const Range& r, bool si_units) {
  Violation v;
  v.kind = Violation::Kind::range;
  v.field = std::move(field);
  v.value = value;
  v.rule = r.describe() + (si_units ? " in SI units" : "");
  return v;
}

Violation out_of_range(std::string field, double value, const Range& r, Quantity q) {
  // An angle's range in degrees and a temperature's in C, the units their keys default to and
  // the ones typed most: "[0.12217304764, 0.296705972839] in SI units" read as if 0.2 (degrees)
  // lay inside it, "[223.15, 343.15]" beside 71 C (helpers' findings). The value too, where no
  // typed text stands for it; the ends shown to a millionth (a range of 4 pi plus its
  // rounding's margin reads 720, not 720.000000001).
  if (q == Quantity::angle || q == Quantity::temperature) {
    const bool angle = q == Quantity::angle;
    const auto shown = [angle](double x) {  // the unbounded ends stay unbounded
      if (std::abs(x) >= 1e308) return x;
      return std::round((angle ? x / units::deg : x - units::celsius_zero_k) * 1e6) / 1e6;
    };
    Violation v =
        out_of_range(std::move(field), angle ? value / units::deg : value - units::celsius_zero_k,
                     Range{shown(r.lo), shown(r.hi), r.lo_open, r.hi_open}, false);
    v.rule += angle ? " deg" : " C";
    return v;
  }
  return out_of_range(std::move(field), value, r, q != Quantity::number && q != Quantity::fraction);
}

Violation out_of_order(const std::string& field, const std::vector<double>& values, std::size_t i,
                       bool increasing) {
  Violation v;
  v.kind = Violation::Kind::order;
  v.field = field;
  v.at = field + "[" + std::to_string(i) + "]";
  v.item = i;
  v.value = values[i];
  v.previous = values[i - 1];
  v.rule = increasing ? "increasing" : "decreasing";
  return v;
}

Violation broken_rule(std::string field, std::string sentence, std::string at) {
  Violation v;
  v.field = std::move(field);
  v.at = std::move(at);
  v.rule = std::move(sentence);
  return v;
}

FirstViolation& FirstViolation::range(std::string_view field, double v, const Range& r,
                                      Quantity q) {
  if (!first_ && !r.contains(v)) first_ = out_of_range(std::string(field), v, r, q);
  return *this;
}

FirstViolation& FirstViolation::range(std::string_view field, double v, const Range& r,
                                      bool si_units) {
  if (!first_ && !r.contains(v)) first_ = out_of_range(std::string(field), v, r, si_units);
  return *this;
}

FirstViolation& FirstViolation::each(std::string_view field, const std::vector<double>& v,
                                     const Range& r, Quantity q) {
  for (std::size_t i = 0; i < v.size() && !first_; ++i)
    if (!r.contains(v[i]))
      first_ = out_of_range(std::string(field) + "[" + std::to_string(i) + "]", v[i], r, q);
  return *this;
}

FirstViolation& FirstViolation::order(std::string_view field, const std::vector<double>& v,
                                      bool increasing) {
  for (std::size_t i = 1; i < v.size() && !first_; ++i)
    if (!(increasing ? v[i] > v[i - 1] : v[i] < v[i - 1]))
      first_ = out_of_order(std::string(field), v, i, increasing);
  return *this;
}

}  // namespace lapwing
