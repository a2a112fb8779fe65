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

/// format_number's text appended to `out` (the same rules), without a string of its own: the
/// form for files of many numbers (a trace's CSV).
void append_number(std::string& out, double v);

/// Whether a fixed-point text that reads as minus zero ("-0.0") keeps its sign.
enum class MinusZero { keep, fold };

/// printf's "%.*f" text of v with `decimals` places appended to `out` (with MinusZero::fold,
/// "-0.0" as "0.0", as fixed() writes it): std::to_chars in fixed form, which C++17 defines as
/// printf's conversion ([charconv.to.chars]), several times faster than printf, for drawings
/// and tables of many numbers.
void append_fixed(std::string& out, double v, int decimals, MinusZero z = MinusZero::keep);

}  // namespace lapwing
