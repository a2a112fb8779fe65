#include "lapwing/base/named_value.hpp"

#include <algorithm>
#include <vector>

#include "lapwing/base/format.hpp"

namespace lapwing {

namespace {

// The units a quantity accepts, as a list ("m", "mm", ...).
std::vector<std::string> unit_names(Quantity q) {
  std::vector<std::string> out;
  const std::string all = accepted_units(q);
  for (std::size_t a = 0; a < all.size();) {
    const std::size_t b = std::min(all.find(", ", a), all.size());
    out.push_back(all.substr(a, b - a));
    a = b + 2;
  }
  return out;
}

}  // namespace

std::string describe_in_units(Quantity q, const Range& r) {
  const std::string unit = q == Quantity::fraction ? "%" : unit_names(q).front();
  // si = value scale + offset, so value = (si - offset) / scale.
  const double offset = *to_si(0.0, unit, q), scale = *to_si(1.0, unit, q) - offset;
  Range shown = r;
  shown.lo = (r.lo - offset) / scale;
  shown.hi = (r.hi - offset) / scale;
  return shown.describe() + " " + unit;
}

std::optional<double> parse_named_value(const std::string& text, const std::string& name,
                                        Quantity q, const Range& r, std::string& error) {
  std::string err;
  const auto v = parse_quantity(text, q, err);
  if (!v) {
    error = name + ": " + err;
    return std::nullopt;
  }
  if (r.contains(*v)) return v;
  error = name + ": " + text + " is out of range (" + describe_in_units(q, r) + ")";
  // A plain number out of range is most often a number typed in another unit (2 for 2 %):
  // suggest every unit in which it is in range.
  if (const auto plain = parse_number(text)) {
    std::string suggestions;
    for (const auto& unit : unit_names(q)) {
      const auto si = to_si(*plain, unit, q);
      if (si && r.contains(*si))
        suggestions += (suggestions.empty() ? "" : " or ") + format_number(*plain) + " " + unit;
    }
    if (!suggestions.empty()) error += "; did you mean " + suggestions + "?";
  }
  return std::nullopt;
}

}  // namespace lapwing
