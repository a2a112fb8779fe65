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
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string s = buf;
  if (s.rfind("-0", 0) == 0 && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
  return s;
}

}  // namespace lapwing
