// Numbers as text: full precision (the shortest text that reads back to the same double) for
// files, fixed decimals for tables.
#include <doctest/doctest.h>

#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <limits>
#include <random>
#include <stdexcept>
#include <string>

#include "lapwing/base/format.hpp"

using namespace lapwing;

TEST_CASE("numbers round-trip exactly through their text") {
  for (double v : {0.1, 1.0 / 3.0, 83.21400000000001, 1e-300, 6.02214076e23, -2.5, 287.1}) {
    const std::string s = format_number(v);
    CHECK(std::strtod(s.c_str(), nullptr) == v);
  }
  CHECK(format_number(0.1) == "0.1");
  CHECK(format_number(-0.0) == "0");
}

TEST_CASE("a non-finite number never reaches the output") {
  CHECK_THROWS_AS(format_number(std::nan("")), std::logic_error);
  CHECK_THROWS_AS(format_number(std::numeric_limits<double>::infinity()), std::logic_error);
}

TEST_CASE("fixed decimals are printf's %.Nf, and a value that rounds to zero has no sign") {
  // C11 7.21.6.1: %.Nf writes N decimals, rounded; "-0.000" would read as a negative value.
  CHECK(fixed(2.0 / 3.0, 3) == "0.667");
  CHECK(fixed(-0.0004, 3) == "0.000");
  CHECK(fixed(-1.5, 1) == "-1.5");
  CHECK(fixed(1234.5678, 0) == "1235");
  // However long the integer part: 1e155 is exactly representable to %f as 156 digits
  // (1 followed by the digits of the double nearest 1e155), never cut at a buffer's end.
  const std::string big = fixed(1e155, 3);
  CHECK(big.size() == 156 + 4);
  CHECK(big.rfind("1000000000", 0) == 0);
  CHECK(big.substr(big.size() - 4) == ".000");
  CHECK(fixed(-1.7976931348623157e308, 0).size() == 310);  // DBL_MAX: 309 digits and a sign
}

TEST_CASE("fixed decimals agree with the C library's printf for any double") {
  // The C library's %.*f (C11 7.21.6.1) as the reference: random bit patterns (every magnitude,
  // both signs), values near the table's ties (k + 0.5 units of the last decimal, exactly
  // representable halves among them: 0.125 to 2 decimals), NaN and the infinities.
  const auto printf_fixed = [](double v, int d) {
    const int n = std::snprintf(nullptr, 0, "%.*f", d, v);
    std::string s(static_cast<std::size_t>(n), '\0');
    std::snprintf(s.data(), s.size() + 1, "%.*f", d, v);
    if (s.rfind("-0", 0) == 0 && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
    return s;
  };
  std::mt19937_64 random(20261203);
  int differ = 0, checked = 0;
  for (int k = 0; k < 100000; ++k) {
    const std::uint64_t bits = random();
    double v = 0.0;
    static_assert(sizeof v == sizeof bits);
    std::memcpy(&v, &bits, sizeof v);
    const int d = static_cast<int>(random() % 10);
    const double tie = (static_cast<double>(random() % 200000) + 0.5) / std::pow(10.0, d);
    for (double x : {v, tie, -tie, std::ldexp(static_cast<double>(random() % 4096), -10)}) {
      ++checked;
      differ += fixed(x, d) != printf_fixed(x, d);
    }
  }
  CHECK(checked == 400000);
  CHECK(differ == 0);
  for (double x : {std::nan(""), -std::nan(""), std::numeric_limits<double>::infinity(),
                   -std::numeric_limits<double>::infinity()})
    CHECK(fixed(x, 2) == printf_fixed(x, 2));
}

TEST_CASE("the appending forms write what the string forms return, after what is there") {
  // append_fixed keeps printf's sign of a minus zero ("%.1f" of -0.04 is "-0.0": C11 7.21.6.1)
  // unless asked to fold it, as fixed() does; the text already in the string is left alone,
  // whatever it ends with.
  const auto printf_fixed = [](double v, int d) {
    char buf[512];
    std::snprintf(buf, sizeof buf, "%.*f", d, v);
    return std::string(buf);
  };
  // The references apart from the code under test: printf with the minus-zero fold applied here,
  // and std::to_chars's shortest form (C++17 [charconv.to.chars]) with format_number's zero.
  const auto folded_printf = [&](double v, int d) {
    std::string t = printf_fixed(v, d);
    if (t.rfind("-0", 0) == 0 && t.find_first_not_of("-0.") == std::string::npos) t.erase(0, 1);
    return t;
  };
  const auto shortest = [](double v) {
    if (v == 0.0) return std::string("0");
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, r.ptr);
  };
  std::mt19937_64 random(20261204);
  int differ = 0;
  for (int k = 0; k < 20000; ++k) {
    const double v = std::ldexp(static_cast<double>(random() % 2000001) - 1e6,
                                static_cast<int>(random() % 40) - 30);
    const int d = static_cast<int>(random() % 6);
    std::string kept = "x-0", folded = "y-", number = "z,";
    append_fixed(kept, v, d);
    append_fixed(folded, v, d, MinusZero::fold);
    append_number(number, v);
    differ += kept != "x-0" + printf_fixed(v, d);
    differ += folded != "y-" + folded_printf(v, d);
    differ += number != "z," + shortest(v);
  }
  CHECK(differ == 0);
  std::string s = "-0";
  append_fixed(s, -0.04, 1);
  CHECK(s == "-0-0.0");
  append_fixed(s, -0.04, 1, MinusZero::fold);
  CHECK(s == "-0-0.00.0");
  append_fixed(s, std::numeric_limits<double>::infinity(), 1);
  CHECK(s == "-0-0.00.0inf");
  std::string big;
  append_fixed(big, -1.7976931348623157e308, 100);  // 411 characters: printf's own, past 400
  CHECK(big.size() == 411);
  CHECK(big == printf_fixed(-1.7976931348623157e308, 100));
  std::string bad;
  CHECK_THROWS_AS(append_number(bad, std::nan("")), std::logic_error);
}
