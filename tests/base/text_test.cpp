// Text from outside made safe: UTF-8 as RFC 3629 defines it (its section 4 grammar and the
// examples of Unicode 15, table 3-7, "well-formed UTF-8 byte sequences"), and one printable line
// for messages (issue 19, findings 8 and 10).
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/base/text.hpp"

using namespace lapwing;

TEST_CASE(
    "UTF-8 validity follows RFC 3629: no overlong forms, no surrogates, none above U+10FFFF") {
  CHECK_FALSE(invalid_utf8_at("plain ASCII").has_value());
  CHECK_FALSE(invalid_utf8_at("Br\xC3\xA4nnock \xE2\x80\x93 \xF0\x9F\x8F\x81").has_value());
  CHECK_FALSE(invalid_utf8_at("\xF4\x8F\xBF\xBF").has_value());  // U+10FFFF, the last
  CHECK(invalid_utf8_at("ab\xFF").value() == 2);                 // never in UTF-8
  CHECK(invalid_utf8_at("a\xC0\xAF").value() == 1);              // overlong '/'
  CHECK(invalid_utf8_at("\xE0\x80\xAF").value() == 0);           // overlong, 3 bytes
  CHECK(invalid_utf8_at("\xED\xA0\x80").value() == 0);           // U+D800, a surrogate
  CHECK(invalid_utf8_at("\xF4\x90\x80\x80").value() == 0);       // U+110000
  CHECK(invalid_utf8_at("x\xE2\x80").value() == 1);              // cut short at the end
  CHECK(invalid_utf8_at("\x80").value() == 0);                   // a lone continuation
}

TEST_CASE("a byte offset is placed at its line and byte column") {
  const std::string text = "a: 1\nname: x\xFFy\n";
  const auto at = invalid_utf8_at(text);
  REQUIRE(at.has_value());
  const TextPosition p = position_of(text, *at);
  CHECK(p.line == 2);
  CHECK(p.col == 8);
  CHECK(invalid_utf8_message(text, *at) == "the text is not valid UTF-8 (byte 0xFF)");
}

TEST_CASE("printable text is one line, escapes controls and bad bytes, and is idempotent") {
  CHECK(printable("two\nlines") == "two\\nlines");
  CHECK(printable("cr\r tab\t bell\x07 del\x7F") == "cr\\r tab\\t bell\\x07 del\\x7F");
  CHECK(printable("bad \xFF byte") == "bad \\xFF byte");
  CHECK(printable("C1 \xC2\x85 and U+2028 \xE2\x80\xA8") == "C1 \\u0085 and U+2028 \\u2028");
  const std::string ok = "Br\xC3\xA4nnock \xE2\x80\x93 turn 3";
  CHECK(printable(ok) == ok);
  const std::string once = printable("a\nb\xFE\x01");
  CHECK(printable(once) == once);
  CHECK(once.find('\n') == std::string::npos);
  CHECK_FALSE(invalid_utf8_at(once).has_value());
}

TEST_CASE("valid_utf8 replaces each bad byte by U+FFFD and keeps the rest") {
  CHECK(valid_utf8("a\xFF"
                   "b") ==
        "a\xEF\xBF\xBD"
        "b");
  CHECK(valid_utf8("\xC3\xA4") == "\xC3\xA4");
  CHECK_FALSE(invalid_utf8_at(valid_utf8("\xC0\xAF\xED\xA0\x80")).has_value());
}

TEST_CASE("an input error is one printable line whatever its key, value or file name holds") {
  // A key written "a\nb" in a quoted YAML key, a value holding a newline, a file name with one.
  const InputError e("dir\n/x.yaml", Mark{3, 5}, "unknown key 'a\nb'", "a\nb");
  const std::string what = e.what();
  CHECK(what == "dir\\n/x.yaml:3:5: error: unknown key 'a\\nb' (a\\nb)");
  const InvalidInput i("car 'x\xFF'", broken_rule("name", "bad\rname"));
  CHECK(std::string(i.what()) == "car 'x\\xFF': error: bad\\rname (name)");
}

TEST_CASE("a command's words are quoted as a POSIX shell reads them back, and split again") {
  // POSIX Shell Command Language, 2.2.3: inside single quotes every character stands for itself,
  // so a quote is written by ending the quotes, an escaped quote, and quotes again: '\''.
  CHECK(shell_word("--out") == "--out");
  CHECK(shell_word("tyres.mu_lat=1.5,1.7") == "tyres.mu_lat=1.5,1.7");
  CHECK(shell_word("35 C") == "'35 C'");
  CHECK(shell_word("") == "''");
  CHECK(shell_word("it's") == "'it'\\''s'");
  CHECK(shell_word("$HOME*") == "'$HOME*'");
  // 2.2.1: a backslash outside quotes keeps the next character as it is.
  CHECK(shell_words("a 'b c'  d\\ e 'it'\\''s' ''") ==
        std::vector<std::string>{"a", "b c", "d e", "it's", ""});
  const std::vector<std::string> words{"lapwing", "--temperature", "35 C",
                                       "--out",   "a b/it's.x",    ""};
  std::string line;
  for (const std::string& w : words) line += (line.empty() ? "" : " ") + shell_word(w);
  CHECK(shell_words(line) == words);
}
