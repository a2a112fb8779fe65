#include "lapwing/base/range.hpp"

#include "lapwing/base/format.hpp"

namespace lapwing {

bool Range::contains(double v) const {
  if (lo_open ? !(v > lo) : !(v >= lo)) return false;
  if (hi_open ? !(v < hi) : !(v <= hi)) return false;
  return true;
}

std::string Range::describe() const {
  const bool has_lo = lo > -1e307, has_hi = hi < 1e307;
  if (has_lo && has_hi)
    return std::string(lo_open ? "(" : "[") + format_readable(lo) + ", " + format_readable(hi) +
           (hi_open ? ")" : "]");
  if (has_lo) return std::string(lo_open ? "> " : ">= ") + format_readable(lo);
  if (has_hi) return std::string(hi_open ? "< " : "<= ") + format_readable(hi);
  return "any finite number";
}

}  // namespace lapwing
