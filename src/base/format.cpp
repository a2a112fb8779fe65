#include "lapwing/base/format.hpp"

#include <cassert>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <stdexcept>

namespace lapwing {

std::string format_number(double v) {
  std::string s;
  append_number(s, v);
  return s;
}

void append_number(std::string& out, double v) {
  if (!std::isfinite(v)) throw std::logic_error("internal: a non-finite number reached the output");
  if (v == 0.0) {  // also folds -0
    out += '0';
    return;
  }
  char buf[32];
  auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
  assert(ec == std::errc());
  out.append(buf, end);
}

std::string format_readable(double v) {
  std::ostringstream os;
  os.precision(12);
  os << v;
  return os.str();
}

std::string fixed(double v, int decimals) {
  std::string s;
  append_fixed(s, v, decimals, MinusZero::fold);
  return s;
}

void append_fixed(std::string& out, double v, int decimals, MinusZero z) {
  const std::size_t at = out.size();
  // std::to_chars in fixed form gives what printf's %.*f gives (both correctly rounded: C++17
  // [charconv.to.chars]), several times faster. A double's integer part takes up to 309
  // digits: a buffer for all of them, so that no value is cut (a 64-byte buffer once cut a lap
  // time of 2.5e155 s to 63 digits); printf for NaN and infinities and beyond the buffer.
  char buf[400];
  const auto [end, ec] =
      std::isfinite(v) ? std::to_chars(buf, buf + sizeof buf, v, std::chars_format::fixed, decimals)
                       : std::to_chars_result{buf, std::errc::value_too_large};
  if (ec == std::errc()) {
    out.append(buf, end);
  } else {
    const int n = std::snprintf(nullptr, 0, "%.*f", decimals, v);
    out.resize(at + static_cast<std::size_t>(n > 0 ? n : 0) + 1);
    std::snprintf(out.data() + at, out.size() - at, "%.*f", decimals, v);
    out.pop_back();  // snprintf's terminating zero
  }
  if (z == MinusZero::fold && out.compare(at, 2, "-0") == 0 &&
      out.find_first_not_of("-0.", at) == std::string::npos)
    out.erase(at, 1);
}

}  // namespace lapwing
