// An interval of allowed values, open or closed at each end: the rules of the model's values
// (validate()) and of the files' notations (the loaders) are written with it.
#pragma once

#include <string>

namespace lapwing {

struct Range {
  double lo = -1e308;
  double hi = 1e308;
  bool lo_open = false;
  bool hi_open = false;
  /// Whether v lies inside (a NaN never does).
  bool contains(double v) const;
  /// "(0, 3]", "> 0", ">= 0", or "any finite number".
  std::string describe() const;
};

inline constexpr Range positive() {  // (0, inf)
  return Range{0.0, 1e308, true, false};
}
inline constexpr Range non_negative() {  // [0, inf)
  return Range{0.0, 1e308, false, false};
}
inline constexpr Range open_unit() {  // (0, 1)
  return Range{0.0, 1.0, true, true};
}

}  // namespace lapwing
