#include "lapwing/base/text.hpp"

#include <algorithm>
#include <cstdio>

namespace lapwing {

namespace {

// Length of the valid UTF-8 sequence starting at s[i], or 0 when none starts there (RFC 3629,
// section 4: the well-formed byte sequences).
std::size_t sequence_length(std::string_view s, std::size_t i) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
  const unsigned char b0 = byte(i);
  if (b0 < 0x80) return 1;
  std::size_t n = 0;
  unsigned char lo = 0x80, hi = 0xBF;  // the range of the second byte
  if (b0 >= 0xC2 && b0 <= 0xDF) {
    n = 2;
  } else if (b0 >= 0xE0 && b0 <= 0xEF) {
    n = 3;
    if (b0 == 0xE0) lo = 0xA0;  // no overlong forms
    if (b0 == 0xED) hi = 0x9F;  // no surrogates
  } else if (b0 >= 0xF0 && b0 <= 0xF4) {
    n = 4;
    if (b0 == 0xF0) lo = 0x90;  // no overlong forms
    if (b0 == 0xF4) hi = 0x8F;  // nothing above U+10FFFF
  } else {
    return 0;  // 0x80..0xC1 (continuation, overlong lead) and 0xF5..0xFF never start one
  }
  if (i + n > s.size()) return 0;
  if (byte(i + 1) < lo || byte(i + 1) > hi) return 0;
  for (std::size_t k = 2; k < n; ++k)
    if (byte(i + k) < 0x80 || byte(i + k) > 0xBF) return 0;
  return n;
}

// The code point of a valid sequence of length n at s[i].
char32_t decode(std::string_view s, std::size_t i, std::size_t n) {
  const auto byte = [&](std::size_t k) { return static_cast<char32_t>(s[k]) & 0xFF; };
  if (n == 1) return byte(i);
  char32_t c = byte(i) & (0xFF >> (n + 1));
  for (std::size_t k = 1; k < n; ++k) c = (c << 6) | (byte(i + k) & 0x3F);
  return c;
}

void append_hex_byte(std::string& out, unsigned char b) {
  char buf[8];
  std::snprintf(buf, sizeof buf, "\\x%02X", b);
  out += buf;
}

}  // namespace

std::optional<std::size_t> invalid_utf8_at(std::string_view text) {
  for (std::size_t i = 0; i < text.size();) {
    const std::size_t n = sequence_length(text, i);
    if (n == 0) return i;
    i += n;
  }
  return std::nullopt;
}

TextPosition position_of(std::string_view text, std::size_t offset) {
  TextPosition p;
  for (std::size_t i = 0; i < offset && i < text.size(); ++i) {
    if (text[i] == '\n') {
      ++p.line;
      p.col = 1;
    } else {
      ++p.col;
    }
  }
  return p;
}

std::string invalid_utf8_message(std::string_view text, std::size_t offset) {
  std::string out = "the text is not valid UTF-8 (byte ";
  char buf[8];
  std::snprintf(buf, sizeof buf, "0x%02X", static_cast<unsigned char>(text[offset]));
  return out + buf + ")";
}

std::string printable(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const std::size_t n = sequence_length(text, i);
    if (n == 0) {
      append_hex_byte(out, static_cast<unsigned char>(text[i]));
      ++i;
      continue;
    }
    const char32_t c = decode(text, i, n);
    if (c == '\n') {
      out += "\\n";
    } else if (c == '\r') {
      out += "\\r";
    } else if (c == '\t') {
      out += "\\t";
    } else if (c < 0x20 || c == 0x7F) {
      append_hex_byte(out, static_cast<unsigned char>(c));
    } else if ((c >= 0x80 && c <= 0x9F) || c == 0x2028 || c == 0x2029) {
      char buf[12];
      std::snprintf(buf, sizeof buf, "\\u%04X", static_cast<unsigned>(c));
      out += buf;
    } else {
      out.append(text.substr(i, n));
    }
    i += n;
  }
  return out;
}

std::string valid_utf8(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const std::size_t n = sequence_length(text, i);
    if (n == 0) {
      out += "\xEF\xBF\xBD";  // U+FFFD
      ++i;
    } else {
      out.append(text.substr(i, n));
      i += n;
    }
  }
  return out;
}

std::string shell_word(std::string_view word) {
  const auto plain = [](char c) {
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
           std::string_view("_@%+=:,./-").find(c) != std::string_view::npos;
  };
  if (!word.empty() && std::all_of(word.begin(), word.end(), plain)) return std::string(word);
  std::string out = "'";
  for (const char c : word) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return out + "'";
}

std::vector<std::string> shell_words(std::string_view command) {
  std::vector<std::string> out;
  std::string word;
  bool in_word = false;
  for (std::size_t i = 0; i < command.size(); ++i) {
    const char c = command[i];
    if (c == ' ') {
      if (in_word) out.push_back(word);
      word.clear();
      in_word = false;
    } else if (c == '\'') {
      const std::size_t end = command.find('\'', i + 1);
      word += command.substr(i + 1, (end == std::string_view::npos ? command.size() : end) - i - 1);
      i = end == std::string_view::npos ? command.size() : end;
      in_word = true;
    } else if (c == '\\' && i + 1 < command.size()) {
      word += command[++i];
      in_word = true;
    } else {
      word += c;
      in_word = true;
    }
  }
  if (in_word) out.push_back(word);
  return out;
}

}  // namespace lapwing
