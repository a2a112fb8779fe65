// Numbers as text: the shortest round-trip form for files, fixed decimals for tables.
#pragma once

#include <string>

namespace lapwing {

/// Shortest decimal form that reads back to the same double (std::to_chars). Throws
/// std::logic_error on a non-finite value: a NaN in the output is a bug, never written.
std::string format_number(double v);

/// Twelve significant digits, for messages ("12.5663706144", "1e+09"); NaN and infinity as
/// "nan" and "inf" (a message may have to name them).
std::string format_readable(double v);

/// Fixed-point text with `decimals` places (for terminal tables); "-0.0" is written "0.0".
std::string fixed(double v, int decimals);

}  // namespace lapwing
