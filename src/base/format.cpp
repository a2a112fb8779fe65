#include "lapwing/base/format.hpp"

#include <cassert>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <stdexcept>

namespace lapwing {

std::string format_number(double v) {
  if (!std::isfinite(v)) throw std::logic_error("internal: a non-finite number reached the output");
  if (v == 0.0) return "0";  // also folds -0
  char buf[32];
  auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
  assert(ec == std::errc());
  return std::string(buf, end);
}

std::string format_readable(double v) {
  std::ostringstream os;
  os.precision(12);
  os << v;
  return os.str();
}

std::string fixed(double v, int decimals) {
  std::string s;
  // std::to_chars in fixed form gives what printf's %.*f gives (both correctly rounded: C++17
  // [charconv.to.chars]), several times faster. A double's integer part takes up to 309
  // digits: a buffer for all of them, so that no value is cut (a 64-byte buffer once cut a lap
  // time of 2.5e155 s to 63 digits); printf for NaN and infinities and beyond the buffer.
  char buf[400];
  const auto [end, ec] =
      std::isfinite(v) ? std::to_chars(buf, buf + sizeof buf, v, std::chars_format::fixed, decimals)
                       : std::to_chars_result{buf, std::errc::value_too_large};
  if (ec == std::errc()) {
    s.assign(buf, end);
  } else {
    const int n = std::snprintf(nullptr, 0, "%.*f", decimals, v);
    s.assign(static_cast<std::size_t>(n > 0 ? n : 0), '\0');
    std::snprintf(s.data(), s.size() + 1, "%.*f", decimals, v);
  }
  if (s.rfind("-0", 0) == 0 && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
  return s;
}

}  // namespace lapwing
