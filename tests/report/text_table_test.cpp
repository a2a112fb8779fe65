// Terminal tables: columns as wide as their widest cell, counted in code points.
#include <doctest/doctest.h>

#include <sstream>

#include "lapwing/report/text_table.hpp"

using namespace lapwing;

namespace {
// Lines of a text.
std::vector<std::string> lines(const std::string& t) {
  std::vector<std::string> out;
  std::istringstream in(t);
  for (std::string l; std::getline(in, l);) out.push_back(l);
  return out;
}
}  // namespace

TEST_CASE("display width counts UTF-8 code points, not bytes") {
  // U+00F4 (2 bytes), U+2026 (3 bytes): one column each (Unicode, UTF-8 encoding, RFC 3629).
  CHECK(display_width("abc") == 3);
  CHECK(display_width("C\xC3\xB4te") == 4);
  CHECK(display_width("a\xE2\x80\xA6z") == 3);
  CHECK(display_width("") == 0);
}

TEST_CASE("a column is as wide as its longest cell, so a long track name keeps the table aligned") {
  const std::string t = text_table({"config", "brannock-park-survey", "c\xC3\xB4te"},
                                   {{"low", "65.619", "1.0"}, {"high_trim", "63.940", "22.5"}});
  const auto l = lines(t);
  REQUIRE(l.size() == 4);
  // Every right-aligned column ends at the same column on every line: the lines are equally
  // wide (trailing blanks are trimmed, and the last column is right-aligned).
  for (const auto& x : l) CHECK(display_width(x) == display_width(l[0]));
  CHECK(l[2].find("   65.619") != std::string::npos);  // padded to the 20-wide header
}

TEST_CASE("long names are shortened in the middle to the given width") {
  const std::string name = "Brannock Park (surveyed centerline)";  // 35 code points
  CHECK(shorten_middle(name, 40) == name);
  const std::string s = shorten_middle(name, 20);
  CHECK(display_width(s) == 20);
  CHECK(s.rfind("Brannock P", 0) == 0);                // the start kept
  CHECK(s.substr(s.size() - 9) == "nterline)");        // and the end
  CHECK(s.find("\xE2\x80\xA6") != std::string::npos);  // joined by an ellipsis
  // Never cut inside a code point.
  CHECK(display_width(shorten_middle("\xC3\xB4\xC3\xB4\xC3\xB4\xC3\xB4\xC3\xB4\xC3\xB4", 4)) == 4);
}
